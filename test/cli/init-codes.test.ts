// `threadcount init` on numbers that name or number things rather than measure them (years, codes,
// identifiers, running numbers): drafted as breakdowns, a key or a distinct count, never a sum. The
// data are vega-datasets' files (v3.2.1), each named beside its test; expected values are worked out
// here from the files themselves.
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { parse } from 'yaml';
import { vegaDataFile } from '../helpers/open-data.js';
import { runCli as run } from '../helpers/run-cli.js';

afterEach(() => vi.restoreAllMocks());

type Dataset = { metrics: Record<string, unknown>[]; dimensions: Record<string, unknown>[]; key_column?: string; time_column: unknown };

async function draft(source: string): Promise<{ out: string; text: string; ds: Dataset; file: string }> {
  const file = join(mkdtempSync(join(tmpdir(), 'tc-init-codes-')), 'draft.yaml');
  const r = await run(['init', '--source', source, '--out', file]);
  expect(r.code, r.err).toBe(0);
  const text = readFileSync(file, 'utf8');
  return { out: r.out, text, ds: (parse(text) as { datasets: Dataset[] }).datasets[0]!, file };
}

/** The columns a metric adds up (`sum: '"Candidate_District"'` reads Candidate_District). */
const summed = (ds: Dataset) => ds.metrics.filter((m) => typeof m.sum === 'string').map((m) => String(m.sum).replace(/^"|"$/g, ''));

describe('init on numbers that are codes, years and identifiers', () => {
  it('drafts a district number and a party code as breakdowns, never sums (political-contributions.json: US FEC candidate summaries)', async () => {
    const rows = JSON.parse(readFileSync(vegaDataFile('political-contributions.json'), 'utf8')) as Record<string, unknown>[];
    const districts = new Set(rows.map((r) => r.Candidate_District)).size;
    const { ds, text } = await draft(vegaDataFile('political-contributions.json'));
    expect(summed(ds)).not.toContain('Candidate_District');
    expect(summed(ds)).not.toContain('Party_Code');
    expect(ds.metrics.map((m) => m.name)).not.toContain('distinct_party_code');
    expect(ds.dimensions.map((d) => d.column)).toEqual(expect.arrayContaining(['Candidate_District', 'Party_Code']));
    // Why, above the dimension in the file.
    expect(text).toContain(`# drafted by init: an identifier or code (its name says so; ${districts} values), so a breakdown, never added up\n      - name: candidate_district`);
    // The money columns are still amounts.
    expect(summed(ds)).toEqual(expect.arrayContaining(['Total_Receipts', 'Total_Disbursements']));
  });

  it('drafts whole-number years beside a value as breakdowns, with their span (budgets.json: US budget forecasts by budget year)', async () => {
    const rows = JSON.parse(readFileSync(vegaDataFile('budgets.json'), 'utf8')) as { budgetYear: number; forecastYear: number }[];
    const span = (xs: number[]) => `${Math.min(...xs)} to ${Math.max(...xs)}`;
    const { ds, text } = await draft(vegaDataFile('budgets.json'));
    expect(summed(ds)).toEqual([]);
    expect(ds.dimensions.map((d) => d.column)).toEqual(['budgetYear', 'forecastYear']);
    expect(text).toContain(`# drafted by init: a year (${span(rows.map((r) => r.budgetYear))}), a part of a date, so a breakdown, never added up`);
    expect(text).toContain(`# drafted by init: a year (${span(rows.map((r) => r.forecastYear))}), a part of a date`);
  });

  it('takes a county FIPS code as the key, never a sum (unemployment.tsv: US county unemployment rates, one row per county)', async () => {
    const { ds } = await draft(vegaDataFile('unemployment.tsv'));
    expect(ds.key_column).toBe('id');
    expect(summed(ds)).toEqual([]);
    expect(ds.metrics.map((m) => m.average)).toContain('rate');
  });

  it('takes a running record number as the key and leaves a year with too many values out, with a comment (seattle-weather.csv, numbered)', async () => {
    // seattle-weather.csv (NOAA via vega-datasets, one row per day 2012-2015) with two columns added
    // here: `entry`, the row's number from 1 (no code word in its name: read from its values), and
    // `year_built`, 1800 plus the row's number modulo 290: neither is an amount.
    const csv = readFileSync(vegaDataFile('seattle-weather.csv'), 'utf8').trim().split('\n');
    const dir = mkdtempSync(join(tmpdir(), 'tc-init-codes-'));
    const lines = [`${csv[0]},entry,year_built`, ...csv.slice(1).map((l, i) => `${l},${i + 1},${1800 + (i % 290)}`)];
    writeFileSync(join(dir, 'weather.csv'), `${lines.join('\n')}\n`);
    const { ds, out, text } = await draft(join(dir, 'weather.csv'));
    expect(ds.key_column).toBe('entry');
    expect(summed(ds)).toEqual(['precipitation']);
    expect(out).toContain('left out (numbers that are not amounts): year_built (a year (1800 to 2089), a part of a date, with too many values for a breakdown)');
    expect(text).toContain('# left out by init (numbers that are not amounts; add a dimension if you need one): year_built');
  });

  it('averages readings per country per year rather than adding them up, and totals the population across countries in a year (gapminder.json: life expectancy, fertility and population by country, every 5 years)', async () => {
    const rows = JSON.parse(readFileSync(vegaDataFile('gapminder.json'), 'utf8')) as { country: string; year: number }[];
    // One row per country per year: the file's own shape, checked here.
    expect(new Set(rows.map((r) => `${r.country}|${r.year}`)).size).toBe(rows.length);
    const { ds, file } = await draft(vegaDataFile('gapminder.json'));
    expect(ds.time_column).toEqual({ year: 'year' });
    expect(ds.metrics.filter((m) => m.average).map((m) => m.average)).toEqual(['life_expect', 'fertility']);
    // People add up across countries in one year but not over the years: a sum of kind level.
    expect(ds.metrics.find((m) => m.name === 'pop')).toMatchObject({ sum: 'pop', kind: 'level' });
    const check = await run(['check', '--config', file]);
    expect(check.code, check.out).toBe(0);
  });
});
