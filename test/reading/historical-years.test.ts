// Years far back in a long table, and decades. On a table from 1900 to 2017, "deaths since 1950"
// was read with no period at all (a year more than 30 years before the data's end was dropped even
// after "since"), and "the 2000s vs the 1990s" was not read as a period, so the bot answered 2017
// against 2016 and said deaths fell where they rose. Both now read as the years asked.
// Data: vega-datasets' disasters.csv (Our World in Data's deaths from natural disasters by type
// and year, 1900–2017, with an "All natural disasters" row per year beside the parts, which the
// config leaves out). Expected windows and figures come from the test's own DuckDB SQL over the file.
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../helpers/run-cli.js';
import { vegaDataFile } from '../helpers/open-data.js';

const DISASTERS = vegaDataFile('disasters.csv');
let dir = '';
let config = '';
let lastYear = 0;
let firstYear = 0;

interface Window { from: string; to: string }
interface BriefJson { window: Window | null; compareWindow: Window | null; questions: { kind: string }[] }

async function sql(query: string): Promise<unknown[][]> {
  const db = await DuckDBInstance.create(':memory:');
  const c = await db.connect();
  const rows = (await c.runAndReadAll(query)).getRows();
  c.closeSync();
  return rows;
}

async function read(text: string): Promise<BriefJson> {
  const r = await runCli(['read', '--config', config, '--now', '2026-12-05T12:00:00Z', text]);
  expect(r.code, r.err).toBe(0);
  return JSON.parse(r.out) as BriefJson;
}

const parts = `FROM read_csv_auto('${DISASTERS}') WHERE Entity <> 'All natural disasters'`;

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'tc-historical-years-'));
  config = join(dir, 'disasters.yaml');
  writeFileSync(config, `version: 1
datasets:
  - name: disasters
    label: Disasters
    source: { kind: csv, paths: ["${DISASTERS}"] }
    time_column: { year: Year }
    timezone: UTC
    metrics:
      - { name: deaths, label: Deaths, sum: '"Deaths"', when: "Entity <> 'All natural disasters'", unit: count, kind: flow }
    dimensions:
      - { name: disaster_type, label: Disaster type, also_called: [type], expr: "case when Entity <> 'All natural disasters' then Entity end" }
`);
  const [[lo, hi]] = (await sql(`SELECT min("Year"), max("Year") ${parts}`)) as [[number, number]];
  firstYear = Number(lo);
  lastYear = Number(hi);
});

describe('a year long before the data ends, after a word that dates it', () => {
  it('"since 1950" runs from 1950 to the data\'s last year (SQL: max(Year))', async () => {
    expect(firstYear).toBeLessThan(1950); // the file reaches back before 1950, so it is inside the data
    const b = await read('top 5 disaster types by deaths since 1950');
    expect(b.window).toEqual({ from: '1950-01-01', to: `${lastYear}-12-31` });
  });

  it('"per year since 1970" and "between 1920 and 1960" keep their years', async () => {
    expect((await read('deaths per year since 1970, any unusual years?')).window).toEqual({ from: '1970-01-01', to: `${lastYear}-12-31` });
    expect((await read('how did deaths change between 1920 and 1960?')).window).toEqual({ from: '1920-01-01', to: '1960-12-31' });
    expect((await read('deaths from 1950 to 1970')).window).toEqual({ from: '1950-01-01', to: '1970-12-31' });
  });

  it('a number after "of" far back is still a count, not a year', async () => {
    expect((await read('years with a total of 1950 deaths')).window).toBeNull();
  });
});

describe('decades', () => {
  it('"the 2000s vs the 1990s" sets the two decades against each other, and the answer has SQL\'s totals', async () => {
    const b = await read('did deaths fall in the 2000s vs the 1990s');
    expect(b.window).toEqual({ from: '2000-01-01', to: '2009-12-31' });
    expect(b.compareWindow).toEqual({ from: '1990-01-01', to: '1999-12-31' });

    const [[d1990s, d2000s]] = (await sql(`SELECT sum("Deaths") FILTER (WHERE "Year" BETWEEN 1990 AND 1999), sum("Deaths") FILTER (WHERE "Year" BETWEEN 2000 AND 2009) ${parts}`)) as [[bigint, bigint]];
    const out = join(dir, 'decades');
    const r = await runCli(['ask', '--config', config, '--request', 'did deaths fall in the 2000s vs the 1990s', '--out', out]);
    expect(r.code, r.err).toBe(0);
    const posts = (JSON.parse(readFileSync(join(out, 'thread.json'), 'utf8')) as { posts: { text: string }[] }).posts.map((p) => p.text).join('\n');
    const pct = ((Number(d2000s) / Number(d1990s) - 1) * 100).toFixed(1);
    expect(Number(d2000s)).toBeGreaterThan(Number(d1990s)); // SQL: deaths rose, so the answer must not say they fell
    expect(posts).toContain(`rose ${pct}%`);
    expect(posts).toMatch(/No: deaths in 2000 to 2009 were [\d.]+% above 1990 to 1999/);

    // The breakdown is computed by the config (an expression leaving out the total row): its
    // missing-values note names it by its label, with SQL's count of the rows it leaves blank.
    const [[blank, all]] = (await sql(`SELECT count(*) FILTER (WHERE Entity = 'All natural disasters'), count(*) FROM read_csv_auto('${DISASTERS}')`)) as [[bigint, bigint]];
    expect(posts).toContain(`Disaster type is missing in ${((Number(blank) / Number(all)) * 100).toFixed(1)}% of rows (${Number(blank)})`);
    expect(posts).not.toMatch(/case when/i);
  });

  it('"in the \'90s" and "since the 1950s" read as the decade and its stretch to the data\'s end', async () => {
    expect((await read("deaths in the '90s")).window).toEqual({ from: '1990-01-01', to: '1999-12-31' });
    expect((await read('deaths since the 1950s')).window).toEqual({ from: '1950-01-01', to: `${lastYear}-12-31` });
  });
});
