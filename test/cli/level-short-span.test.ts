// Two answers on vega-datasets' unemployment-across-industries.json (US BLS unemployed persons in
// thousands by industry, monthly, 2000–2010), run through `threadcount ask`; every expected figure
// is computed by this test's own SQL over the file (DuckDB).
// 1. A level (a count held at each month) over one year: its winter high and summer low are the
//    season, and with under two years no season can be taken out, so the move is not called a
//    trend ("a falling trend of about 1,440 thousand a year ... unlikely to be chance" before).
// 2. "unemployment in finance": the Finance industry's own figures, not every industry's.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { beforeAll, describe, expect, it } from 'vitest';
import { askPostTexts } from '../helpers/run-cli.js';
import { UNEMPLOYMENT_JSON, unemploymentConfigText } from '../helpers/open-data.js';

const json = UNEMPLOYMENT_JSON;
let dir = '';
let config = '';
const postsOf = (request: string) => askPostTexts(config, request, mkdtempSync(join(dir, 'out-')));

let oneYear: string[] = [];
let finance: string[] = [];
let months2005: { m: number; total: number }[] = [];
let finance2009 = 0;
let all2009 = 0;
beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'tc-level-short-'));
  config = join(dir, 'unemployment.yaml');
  writeFileSync(config, unemploymentConfigText('count'));
  const db = await DuckDBInstance.create(':memory:');
  const c = await db.connect();
  const file = json.replaceAll("'", "''");
  const rows = async (sql: string) => (await c.runAndReadAll(sql)).getRowObjectsJson();
  months2005 = (await rows(`SELECT month AS m, SUM(count) AS total FROM read_json_auto('${file}') WHERE year = 2005 GROUP BY month ORDER BY month`)).map((r) => ({ m: Number(r.m), total: Number(r.total) }));
  // A year of a level is the mean over its months of the month's figure.
  finance2009 = Number((await rows(`SELECT AVG(count) AS v FROM read_json_auto('${file}') WHERE year = 2009 AND series = 'Finance'`))[0]!.v);
  all2009 = Number((await rows(`SELECT AVG(t) AS v FROM (SELECT month, SUM(count) AS t FROM read_json_auto('${file}') WHERE year = 2009 GROUP BY month)`))[0]!.v);
  c.closeSync();
  oneYear = await postsOf('whats the average number of unemployed per month in 2005?');
  finance = await postsOf('how did unemployment in finance change from 2007 to 2009, year by year');
}, 300_000);

describe('a level over one year', () => {
  it('is not called a trend: the move is said with why it cannot be told from the season', () => {
    // The premise, from the file: 2005's two highest months are January and February (winter), its December below its January.
    const ranked = [...months2005].sort((a, b) => b.total - a.total);
    expect(months2005).toHaveLength(12);
    expect(ranked.slice(0, 2).map((r) => r.m).sort()).toEqual([1, 2]);
    const dec = months2005[11]!.total;
    const jan = months2005[0]!.total;
    expect(dec).toBeLessThan(jan);
    const all = oneYear.join('\n---\n');
    const answer = oneYear.find((p) => /too short a span to tell a trend from the season/.test(p));
    expect(answer, all).toBeDefined();
    expect(answer).toMatch(/^\*\d+\. Unemployed (fell|moved) from January 2005 to December 2005: too short a span/);
    expect(answer).toContain('With less than two years of months, a rise or fall cannot be told apart from the usual seasonal pattern');
    expect(all).not.toMatch(/(rising|falling) trend of about/);
    expect(all).not.toMatch(/a trend this steady is unlikely to be chance/);
  });
});

describe('"unemployment in finance"', () => {
  it('answers for the Finance industry, with its own 2009 figure', () => {
    const all = finance.join('\n---\n');
    const thousands = (v: number) => `${Math.round(v).toLocaleString('en')}\u00a0thousand`;
    expect(Math.round(finance2009)).not.toBe(Math.round(all2009));
    expect(all).toContain('Finance');
    expect(all).toContain(`2009 at ${thousands(finance2009)}`);
    expect(all).not.toContain(thousands(all2009));
  });
});
