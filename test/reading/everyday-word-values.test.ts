// A value of the data that is also an everyday word of requests ("Finance" among industries, where
// "finance" is usually an office word: "the finance team") and a lower-case part of a longer value
// ("retail" of "Wholesale and Retail Trade") are the data's values when written right beside the
// measure they narrow ("unemployment in finance", "retail unemployment") or joined to another value
// of their breakdown ("construction and retail"); beside an office noun they stay ordinary words.
// Before, they were dropped and the answer covered every industry, saying nothing. Data:
// vega-datasets unemployment-across-industries.json; the expected values are read from the file by
// this test's own SQL (DuckDB).
import { DuckDBInstance } from '@duckdb/node-api';
import { beforeAll, describe, expect, it } from 'vitest';
import { vegaDataFile } from '../helpers/open-data.js';
import { readUnemployment } from './public-data.js';

let finance = '';
let retail = '';
let construction = '';
beforeAll(async () => {
  const db = await DuckDBInstance.create(':memory:');
  const c = await db.connect();
  const one = async (sql: string) => {
    const rows = (await c.runAndReadAll(sql)).getRowObjectsJson();
    expect(rows, sql).toHaveLength(1);
    return String(rows[0]!.series);
  };
  const file = vegaDataFile('unemployment-across-industries.json').replaceAll("'", "''");
  finance = await one(`SELECT DISTINCT series FROM read_json_auto('${file}') WHERE lower(series) = 'finance'`);
  retail = await one(`SELECT DISTINCT series FROM read_json_auto('${file}') WHERE lower(series) LIKE '%retail%'`);
  construction = await one(`SELECT DISTINCT series FROM read_json_auto('${file}') WHERE lower(series) = 'construction'`);
  c.closeSync();
}, 60_000);

const filtersOf = async (text: string) => (await readUnemployment(text)).questions[0]!.filters;

describe('an everyday word that is a value, beside the measure', () => {
  it('reads "unemployment in finance" and "finance unemployment" as the Finance industry', async () => {
    for (const text of ['how did unemployment in finance change from 2007 to 2009, year by year', 'finance unemployment since 2005', 'jobless rate for finance in 2009?']) {
      expect(await filtersOf(text), text).toEqual([{ dimension: 'series', values: [finance] }]);
    }
  });

  it('reads a lower-case part of a value beside the measure or joined to another value', async () => {
    expect(await filtersOf('retail unemployment in 2008')).toEqual([{ dimension: 'series', values: [retail] }]);
    expect(await filtersOf('unemployment in construction and retail in 2009')).toEqual([{ dimension: 'series', values: [construction, retail] }]);
  });

  it('leaves the word ordinary beside an office noun or away from any measure', async () => {
    expect(await filtersOf('unemployment by year for the finance team')).toEqual([]);
    expect(await filtersOf('finance review: unemployment month by month in 2009')).toEqual([]);
  });
});
