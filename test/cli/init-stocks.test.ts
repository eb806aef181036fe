// `threadcount init` on tables whose rows are figures already counted: a wide table of payroll
// headcounts with one row per month (stocks, rolled up as the mean of their months), a net-change
// column beside them (a flow that sums), and grids of date × breakdown cells (no count of rows).
// Data: vega-datasets v3.2.1. us-employment.csv is the US BLS Current Employment Statistics,
// seasonally adjusted, in thousands, January 2006 to December 2015. Expected values are worked
// out here from the files themselves; the lag-1 correlation is checked against jStat (npm "jstat").
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { parse } from 'yaml';
import { vegaDataFile } from '../helpers/open-data.js';
import { describeWithPostgres, dropSchema, uniqueName, withClient } from '../helpers/postgres.js';
import { runCli as run } from '../helpers/run-cli.js';

afterEach(() => vi.restoreAllMocks());

const jStat = createRequire(import.meta.url)('jstat') as { corrcoeff(a: number[], b: number[]): number };

type Metric = Record<string, unknown>;
type Dataset = { metrics: Metric[]; dimensions: Record<string, unknown>[] };

async function draft(source: string): Promise<{ out: string; text: string; ds: Dataset; file: string }> {
  const file = join(mkdtempSync(join(tmpdir(), 'tc-init-stocks-')), 'draft.yaml');
  const r = await run(['init', '--source', source, '--out', file]);
  expect(r.code, r.err).toBe(0);
  const text = readFileSync(file, 'utf8');
  return { out: r.out, text, ds: (parse(text) as { datasets: Dataset[] }).datasets[0]!, file };
}

/** A CSV's rows as objects (the files used here have no quoted fields). */
function csvRows(path: string): Record<string, string>[] {
  const [header, ...lines] = readFileSync(path, 'utf8').trim().split('\n');
  const names = header!.split(',');
  return lines.map((l) => Object.fromEntries(l.split(',').map((v, i) => [names[i]!, v])));
}

/** The comment init wrote above a metric. */
function commentAbove(text: string, metric: string): string {
  const lines = text.split('\n');
  const at = lines.findIndex((l) => l.trim() === `- name: ${metric}`);
  return lines[at - 1]!.trim();
}

describe('init on a wide table of headcounts, one row per month (us-employment.csv)', () => {
  const csv = vegaDataFile('us-employment.csv');
  const rows = csvRows(csv).sort((a, b) => a.month!.localeCompare(b.month!));
  const nonfarm = rows.map((r) => Number(r.nonfarm));

  it('drafts each headcount as a level, from how slowly it moves, and says so with the figures', async () => {
    // The signal, worked out from the file: each month's nonfarm headcount correlates above 0.99 with
    // the month before (jStat), and a month's step is a fraction of a percent of the headcount.
    const lag1 = jStat.corrcoeff(nonfarm.slice(1), nonfarm.slice(0, -1));
    expect(lag1).toBeGreaterThan(0.99);
    const steps = nonfarm.slice(1).map((v, i) => Math.abs(v - nonfarm[i]!));
    const relativeStep = steps.reduce((a, b) => a + b, 0) / steps.length / (nonfarm.reduce((a, b) => a + Math.abs(b), 0) / nonfarm.length);
    expect(relativeStep).toBeLessThan(0.01);

    const { ds, text, file } = await draft(csv);
    const sectors = Object.keys(rows[0]!).filter((k) => k !== 'month' && k !== 'nonfarm_change');
    expect(sectors).toHaveLength(22);
    for (const sector of sectors) expect(ds.metrics.find((m) => m.name === sector), sector).toMatchObject({ sum: sector, kind: 'level' });
    // The reason is in the file, with the figures init measured (the same as jStat's to 3 decimals).
    const why = commentAbove(text, 'nonfarm');
    expect(why).toContain('# drafted by init: a level held at each month: the data has one row per month and nonfarm moves slowly for its size');
    expect(why).toContain(`each value correlates ${lag1.toFixed(3)} with the one before over 120 months`);
    expect(why).toContain(`a typical step is ${(relativeStep * 100).toFixed(1)}% of its size`);
    // Whole numbers added up: a count. The headcount in thousands is whole in this file.
    expect(ds.metrics.find((m) => m.name === 'nonfarm')).toMatchObject({ unit: 'count' });
    const check = await run(['check', '--config', file]);
    expect(check.code, check.out).toBe(0);
    expect(check.out).toMatch(/nonfarm: level, sum of nonfarm/);
  });

  it('drafts nonfarm_change as a flow that sums, because its values are the monthly steps of nonfarm', async () => {
    // From the file: nonfarm_change is the month's step in nonfarm (every month after the first), and
    // the year's jobs added are their sum: 2009 = −5,061 thousand, 2008 = −3,569 thousand.
    for (let i = 1; i < rows.length; i++) expect(Number(rows[i]!.nonfarm_change)).toBe(nonfarm[i]! - nonfarm[i - 1]!);
    const yearSum = (y: string) => rows.filter((r) => r.month!.startsWith(y)).reduce((a, r) => a + Number(r.nonfarm_change), 0);
    expect(yearSum('2009')).toBe(-5061);
    expect(yearSum('2008')).toBe(-3569);

    const { ds, text, out } = await draft(csv);
    expect(ds.metrics.find((m) => m.name === 'nonfarm_change')).toMatchObject({ sum: 'nonfarm_change', kind: 'flow', unit: 'count' });
    const low = Math.min(...rows.map((r) => Number(r.nonfarm_change)));
    const high = Math.max(...rows.map((r) => Number(r.nonfarm_change)));
    expect(commentAbove(text, 'nonfarm_change')).toBe(
      `# drafted by init: a net change in each row, added up over time: its values are the step from one month to the next of nonfarm, and its values go both ways (${low} to ${high}), so a period's change is the sum of its rows, rises netted against falls (make it average and kind: ratio if each row is a rate of change)`,
    );
    // One row per month of figures already counted: a count of rows would count months.
    expect(ds.metrics.map((m) => m.name)).not.toContain('rows');
    expect(out).toContain('no count of rows: the data has one row per month, holding figures already counted, so a count of rows would count months, not events');
  });
});

describe('init keeps amounts made in each month as flows (crimea.json)', () => {
  it('leaves deaths per month summed: they jump about from month to month', async () => {
    // vega-datasets' crimea.json: deaths per month in the British army in the Crimean War, April 1854 to
    // March 1856, by cause. A month's deaths are made in the month: its step is far above 1% of its size.
    const rows = (JSON.parse(readFileSync(vegaDataFile('crimea.json'), 'utf8')) as { date: string; disease: number }[]).sort((a, b) => a.date.localeCompare(b.date));
    const disease = rows.map((r) => r.disease);
    const steps = disease.slice(1).map((v, i) => Math.abs(v - disease[i]!));
    expect(steps.reduce((a, b) => a + b, 0) / steps.length / (disease.reduce((a, b) => a + b, 0) / disease.length)).toBeGreaterThan(0.1);
    const { ds } = await draft(vegaDataFile('crimea.json'));
    for (const cause of ['wounds', 'other', 'disease']) expect(ds.metrics.find((m) => m.name === cause), cause).toMatchObject({ sum: cause, kind: 'flow', unit: 'count' });
  });
});

describe('init on a grid of date × breakdown cells, and on events', () => {
  it('drafts no count of rows when each row is one year × source cell (iowa-electricity.csv)', async () => {
    // U.S. EIA net generation in Iowa: one row per source per year, 2001–2017 (3 sources × 17 years = 51 rows).
    const rows = csvRows(vegaDataFile('iowa-electricity.csv'));
    expect(new Set(rows.map((r) => `${r.year}|${r.source}`)).size).toBe(rows.length);
    const { ds, out } = await draft(vegaDataFile('iowa-electricity.csv'));
    expect(ds.metrics.map((m) => m.name)).not.toContain('rows');
    expect(out).toContain('no count of rows: the data has one row per year × source cell, holding figures already counted, so a count of rows would count cells, not events');
    expect(ds.metrics.find((m) => m.name === 'net_generation')).toMatchObject({ sum: 'net_generation', kind: 'flow', unit: 'count' });
  });

  it('keeps the count of rows when each row is an event at its own time (flights-2k.json)', async () => {
    // Flights with their departure times: rows are events, whose count is the number of flights.
    const { ds } = await draft(vegaDataFile('flights-2k.json'));
    expect(ds.metrics.find((m) => m.count === 'rows')).toMatchObject({ name: 'flights', label: 'Flights', count: 'rows', unit: 'count', kind: 'flow' });
  });
});

describe('init names and units', () => {
  it('says a currency code in a name by currency, not in the label or the name (movies.json grosses as a warehouse might name them)', async () => {
    // movies.json's Worldwide Gross (US dollars in the file's source) written under the name
    // worldwide_gross_usd, with its release date: the open values under a renamed column.
    const movies = JSON.parse(readFileSync(vegaDataFile('movies.json'), 'utf8')) as { 'Release Date': string | null; 'Worldwide Gross': number | null }[];
    const dir = mkdtempSync(join(tmpdir(), 'tc-init-names-'));
    const csv = join(dir, 'grosses.csv');
    const kept = movies.filter((m) => m['Release Date'] && m['Worldwide Gross'] !== null);
    writeFileSync(csv, `release_date,worldwide_gross_usd\n${kept.map((m) => `"${m['Release Date']}",${m['Worldwide Gross']}`).join('\n')}\n`);
    const { ds, out } = await draft(csv);
    expect(ds.metrics.find((m) => m.sum === 'worldwide_gross_usd')).toMatchObject({ name: 'worldwide_gross', label: 'Worldwide gross', unit: 'currency', currency: 'USD' });
    expect(out).toContain('in USD (read from "usd" in worldwide_gross_usd)');
  });

  it('reads "min" beside "max" as the low of a day, not minutes (seattle-weather.csv)', async () => {
    const { ds } = await draft(vegaDataFile('seattle-weather.csv'));
    const low = ds.metrics.find((m) => m.name === 'temp_min');
    expect(low).toMatchObject({ label: 'Temp min', average: 'temp_min' });
    expect(low).not.toHaveProperty('unit_label');
  });
});

describeWithPostgres('init on the headcounts as a PostgreSQL table', (adminUrl) => {
  const schema = uniqueName('tc_init_stocks');
  afterEach(() => {
    delete process.env.TC_INIT_STOCKS_URL;
  });

  it('reads the same steps through PostgreSQL: nonfarm a level, nonfarm_change its net change', async () => {
    const rows = csvRows(vegaDataFile('us-employment.csv'));
    await withClient(adminUrl, async (c) => {
      await c.query(`CREATE SCHEMA ${schema}`);
      await c.query(`CREATE TABLE ${schema}.payrolls (month date, nonfarm int, construction int, nonfarm_change int)`);
      const col = (k: string) => rows.map((r) => r[k]);
      await c.query(`INSERT INTO ${schema}.payrolls SELECT * FROM unnest($1::date[], $2::int[], $3::int[], $4::int[])`, [col('month'), col('nonfarm'), col('construction'), col('nonfarm_change')]);
    });
    try {
      const file = join(mkdtempSync(join(tmpdir(), 'tc-init-stocks-pg-')), 'payrolls.yaml');
      const r = await run(['init', '--source', adminUrl, '--table', `${schema}.payrolls`, '--url-env', 'TC_INIT_STOCKS_URL', '--out', file]);
      expect(r.code, r.err).toBe(0);
      const text = readFileSync(file, 'utf8');
      const ds = (parse(text) as { datasets: Dataset[] }).datasets[0]!;
      expect(ds.metrics.find((m) => m.name === 'nonfarm')).toMatchObject({ sum: 'nonfarm', kind: 'level' });
      expect(ds.metrics.find((m) => m.name === 'construction')).toMatchObject({ sum: 'construction', kind: 'level' });
      expect(ds.metrics.find((m) => m.name === 'nonfarm_change')).toMatchObject({ sum: 'nonfarm_change', kind: 'flow' });
      expect(commentAbove(text, 'nonfarm_change')).toContain('its values are the step from one month to the next of nonfarm');
      expect(ds.metrics.map((m) => m.name)).not.toContain('rows');
    } finally {
      await dropSchema(adminUrl, schema);
    }
  });
});
