// A whole thread on data stamped once a month: NOAA's Mauna Loa monthly mean CO2 as shipped by
// vega-datasets (co2-concentration.csv), run through `threadcount ask`. Each reading stands for its
// month, so the thread speaks in months, never in the stamps' days ("1 April 2020"); the months with
// no reading are said once, in the summary; a reading's plan says "highest and lowest", not busy
// and quiet. Every figure is checked against the CSV read here, not through DuckDB.
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../helpers/run-cli.js';
import { vegaDataFile } from '../helpers/open-data.js';

const csv = vegaDataFile('co2-concentration.csv');
const rows = readFileSync(csv, 'utf8').trim().split('\n').slice(1).map((l) => {
  const [date, co2] = l.split(',');
  return { month: date!.slice(0, 7), co2: Number(co2) };
});
const first = rows[0]!.month;
const last = rows[rows.length - 1]!.month;
const monthName = (ym: string) => new Date(`${ym}-01T00:00:00Z`).toLocaleString('en-IE', { month: 'long', year: 'numeric', timeZone: 'UTC' });

/** Months between the first and last reading with no row in the CSV. */
function missingMonths(): string[] {
  const have = new Set(rows.map((r) => r.month));
  const out: string[] = [];
  for (let d = new Date(`${first}-01T00:00:00Z`); d.toISOString().slice(0, 7) <= last; d.setUTCMonth(d.getUTCMonth() + 1)) {
    if (!have.has(d.toISOString().slice(0, 7))) out.push(d.toISOString().slice(0, 7));
  }
  return out;
}

let posts: string[] = [];

beforeAll(async () => {
  const dir = mkdtempSync(join(tmpdir(), 'tc-monthly-'));
  const config = join(dir, 'co2.yaml');
  writeFileSync(config, `version: 1
datasets:
  - name: co2
    label: Mauna Loa CO2
    source: { kind: csv, path: "${csv}" }
    time_column: Date
    timezone: UTC
    metrics:
      - { name: co2, label: CO2, average: '"CO2"', unit: number, unit_label: ppm, kind: level }
`);
  const r = await runCli(['ask', '--config', config, '--request', 'How has CO2 changed and when in the year is it highest?', '--out', join(dir, 'out')]);
  expect(r.code, r.err).toBe(0);
  posts = (JSON.parse(readFileSync(join(dir, 'out', 'thread.json'), 'utf8')) as { posts: { text: string }[] }).posts.map((p) => p.text);
}, 300_000);

describe('a thread on monthly readings', () => {
  it('says the period in months, keeps the label as written, and speaks of highs and lows for a reading', () => {
    const card = posts.find((p) => p.includes('Here is what I understood'))!;
    expect(card).toContain(`all the data, ${monthName(first)} to ${monthName(last)}`);
    expect(card).not.toMatch(/\b1 (?:January|February|March|April|May|June|July|August|September|October|November|December) \d{4}/);
    expect(card).toContain('How fast CO2 is growing');
    expect(card).toContain('run highest and lowest for CO2');
    expect(card).not.toMatch(/busiest|quietest/);
    expect(card).toContain('(from "CO2")');
  });

  it('counts the last month as complete and the year so far to its end, with the means of the CSV', () => {
    // The last stamped month is whole: the peak may be it, and the year so far runs to its last day.
    const year = last.slice(0, 4);
    const lastMonth = Number(last.slice(5, 7));
    const mean = (y: string) => {
      const v = rows.filter((r) => r.month.startsWith(y) && Number(r.month.slice(5, 7)) <= lastMonth).map((r) => r.co2);
      return v.reduce((a, b) => a + b, 0) / v.length;
    };
    const endDay = new Date(Date.UTC(Number(year), lastMonth, 0)).getUTCDate();
    const growth = posts.find((p) => p.includes('Year to date'))!;
    expect(growth).toContain(`Year to date (to ${endDay} ${monthName(last).split(' ')[0]} ${year})`);
    const said = /averaged ([\d.]+)\s?ppm, \+([\d.]+)\s?ppm on the same dates of (\d{4}) \(([\d.]+)\s?ppm\)/u.exec(growth)!;
    expect(Number(said[1])).toBeCloseTo(mean(year), 0);
    expect(Number(said[4])).toBeCloseTo(mean(String(Number(year) - 1)), 0);
    expect(Number(said[2])).toBeCloseTo(mean(year) - mean(String(Number(year) - 1)), 1);
  });

  it('says the months without a reading once, in the summary, with their number from the CSV', () => {
    const gaps = missingMonths();
    expect(gaps.length).toBeGreaterThan(0);
    const answers = posts.filter((p) => /^\*\d+\. /.test(p));
    expect(answers.length).toBeGreaterThan(3);
    for (const a of answers) expect(a).not.toMatch(/no data at all|has no data for/);
    const summary = posts.find((p) => p.startsWith('*Summary*'))!;
    expect(summary.match(/has no data for/g)).toHaveLength(1);
    expect(summary).toContain(`CO2 has no data for ${gaps.length} months, the first ${monthName(gaps[0]!)}`);
    expect(summary).toMatch(new RegExp(`The latest data is for ${monthName(last)}, about \\d+ (?:years|months) ago`));
  });

  it('keeps the summary line of the trend to its headline', () => {
    const summary = posts.find((p) => p.startsWith('*Summary*'))!;
    const trendLine = summary.split('\n').find((l) => /trend of about/.test(l))!;
    expect(trendLine).toBeDefined();
    expect(trendLine).not.toContain('Decade by decade');
  });
});
