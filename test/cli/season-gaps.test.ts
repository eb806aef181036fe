// Seasonality over more than two years of months, where one calendar month has no rows in any
// year (a league's summer break): the answer says which month has no data, and never that there is
// too little history ("needs at least two full years ... this period has 42 complete months"
// before). Data: vega-datasets football.json (match results of five European leagues, 2013–2017),
// run through `threadcount ask`; expected months and counts come from this test's own SQL (DuckDB).
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../helpers/run-cli.js';
import { vegaDataFile } from '../helpers/open-data.js';

const json = vegaDataFile('football.json');
const MONTHS = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];
let posts: string[] = [];
let emptyMonths: number[] = [];
let completeMonths = 0;

beforeAll(async () => {
  const dir = mkdtempSync(join(tmpdir(), 'tc-season-gaps-'));
  const db = await DuckDBInstance.create(':memory:');
  const c = await db.connect();
  const file = json.replaceAll("'", "''");
  const rows = async (sql: string) => (await c.runAndReadAll(sql)).getRowObjectsJson();
  // Calendar months with no match in any year of the file.
  emptyMonths = (await rows(`SELECT m FROM range(1, 13) t(m) WHERE m NOT IN (SELECT DISTINCT month(CAST(date AS DATE)) FROM read_json_auto('${file}')) ORDER BY m`)).map((r) => Number(r.m));
  // Months with matches, leaving out the file's first and last month (the data starts and ends inside them).
  completeMonths = Number((await rows(`WITH d AS (SELECT CAST(date AS DATE) AS d FROM read_json_auto('${file}')) SELECT COUNT(DISTINCT date_trunc('month', d)) AS n FROM d WHERE date_trunc('month', d) > (SELECT date_trunc('month', MIN(d)) FROM d) AND date_trunc('month', d) < (SELECT date_trunc('month', MAX(d)) FROM d)`))[0]!.n);
  c.closeSync();
  const config = join(dir, 'football.yaml');
  writeFileSync(config, `version: 1
datasets:
  - name: football
    label: Football matches
    source: { kind: json, paths: ["${json}"] }
    time_column: date
    timezone: UTC
    metrics:
      - { name: matches, label: Matches, also_called: [games], count: rows, unit: count, kind: flow }
    dimensions:
      - { name: division, label: Division, also_called: [league], column: division }
`);
  const out = mkdtempSync(join(dir, 'out-'));
  const r = await runCli(['ask', '--config', config, '--request', 'is the number of matches seasonal? which months have the most games', '--out', out]);
  expect(r.code, r.err).toBe(0);
  posts = (JSON.parse(readFileSync(join(out, 'thread.json'), 'utf8')) as { posts: { text: string }[] }).posts.map((p) => p.text);
}, 300_000);

describe('seasonality with a month empty in every year', () => {
  it('names the empty month instead of calling the history too short', () => {
    expect(emptyMonths.length).toBeGreaterThan(0);
    expect(completeMonths).toBeGreaterThanOrEqual(24);
    const all = posts.join('\n---\n');
    const names = emptyMonths.map((m) => MONTHS[m - 1]!);
    const answer = posts.find((p) => /no seasonal pattern measured/.test(p));
    expect(answer, all).toBeDefined();
    for (const n of names) expect(answer).toContain(n);
    expect(answer).toContain(`Over ${completeMonths} complete months`);
    expect(all).not.toMatch(/Fewer than two full years of data/);
    expect(all).not.toMatch(/too little history to measure seasonality/);
  });
});
