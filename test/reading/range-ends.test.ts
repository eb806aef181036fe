// A change asked over a range with two named ends ("did flights grow from January to June?",
// "which city warmed most between 2012 and 2015?") sets the range's last period against its first,
// as "since 2012" does; before, it was read as a window whose last year (or month) was set against
// the same dates a year earlier, which on data of one half-year compared with nothing at all.
// Data: vega-datasets' flights-3m.parquet (US domestic flights, January to June 2001, FAA on-time
// data as packaged by vega-datasets) and weather.csv (NOAA daily weather, Seattle and New York,
// 2012–2015). Expected figures come from the test's own DuckDB SQL over the files.
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../helpers/run-cli.js';
import { flightsParquetConfigText, vegaDataFile, weatherConfigText } from '../helpers/open-data.js';

const FLIGHTS = vegaDataFile('flights-3m.parquet');
let dir = '';
let flights = '';
let weather = '';

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'tc-range-ends-'));
  flights = join(dir, 'flights.yaml');
  writeFileSync(flights, `${flightsParquetConfigText()}    dimensions:\n      - { name: origin, label: Origin airport, column: origin, also_called: [airport] }\n`);
  weather = join(dir, 'weather.yaml');
  writeFileSync(weather, weatherConfigText(
    ['{ name: precipitation, label: Precipitation, sum: precipitation, unit: number, unit_label: mm, kind: flow, also_called: [rain, rainfall] }'],
    ['{ name: location, label: City, column: location, also_called: [city] }'],
  ));
});

const flightsOf = () => flights;
const weatherOf = () => weather;

interface BriefJson {
  questions: { kind: string; window: { from: string; to: string } | null; compareWindow: unknown; spanEnds: string | null }[];
}

async function read(config: string, text: string): Promise<BriefJson> {
  const r = await runCli(['read', '--config', config, '--now', '2026-12-05T12:00:00Z', text]);
  expect(r.code, r.err).toBe(0);
  return JSON.parse(r.out) as BriefJson;
}

async function sqlRows(query: string): Promise<unknown[][]> {
  const db = await DuckDBInstance.create(':memory:');
  const c = await db.connect();
  const rows = (await c.runAndReadAll(query)).getRows();
  c.closeSync();
  return rows;
}

describe('a change over a range with two named ends', () => {
  // Either reading sets the two ends against each other: a change verb before "from <month> to
  // <month>" names the two months as the periods compared; any other range keeps its stretch (for
  // the trend) and marks its ends, which the growth answers compare.
  it.each([
    ['how much did departures change between March and May', 'flights', 'month', { from: '2001-03-01', to: '2001-05-31' }],
    ['which city got wetter between 2012 and 2015', 'weather', 'year', { from: '2012-01-01', to: '2015-12-31' }],
    ['rainfall by city from 2013 to 2015: which grew most?', 'weather', 'year', { from: '2013-01-01', to: '2015-12-31' }],
    ['monthly flights Feb to May, up or down?', 'flights', 'month', { from: '2001-02-01', to: '2001-05-31' }],
  ])('reads "%s" (%s) as a stretch whose first whole period is set against its last', async (text, which, unit, window) => {
    const q = (await read(which === 'flights' ? flights : weather, text)).questions[0]!;
    expect(q.window).toEqual(window);
    expect(q.compareWindow).toBeNull();
    expect(q.spanEnds).toBe(unit);
  });

  it.each([
    ['did flights grow from January to June?', flightsOf, { from: '2001-06-01', to: '2001-06-30' }, { from: '2001-01-01', to: '2001-01-31' }],
    ['rainfall growth from Q1 2013 to Q4 2014 by city', weatherOf, { from: '2014-10-01', to: '2014-12-31' }, { from: '2013-01-01', to: '2013-03-31' }],
  ])('reads "%s" as its last named period against its first', async (text, config, window, compareWindow) => {
    const q = (await read(config(), text)).questions[0]!;
    expect(q.window).toEqual(window);
    expect(q.compareWindow).toEqual(compareWindow);
  });

  it('leaves a range inside one period, and a range of days, as a plain window', async () => {
    // "from 1 to 14 June": days, not whole months; the ends rule is for named months, quarters and years.
    expect((await read(flights, 'did flights grow from 1 to 14 June?')).questions[0]!.spanEnds).toBeNull();
  });

  it('answers "did flights grow from January to June?" with June against January, totals and per day from SQL', async () => {
    const out = join(dir, 'jan-jun');
    const r = await runCli(['ask', '--config', flights, '--request', 'did flights grow from January to June?', '--out', out]);
    expect(r.code, r.err).toBe(0);
    const [[jan, jun]] = (await sqlRows(`SELECT COUNT(*) FILTER (WHERE date >= DATE '2001-01-01' AND date < DATE '2001-02-01'),
        COUNT(*) FILTER (WHERE date >= DATE '2001-06-01' AND date < DATE '2001-07-01') FROM read_parquet('${FLIGHTS}')`)) as [[bigint, bigint]];
    const driversCsv = readdirSync(join(out, 'tables')).find((f) => /growth_drivers/.test(f))!;
    const csv = readFileSync(join(out, 'tables', driversCsv), 'utf8').trim().split('\n');
    const head = csv[0]!.split(',');
    const rows = csv.slice(1).map((l) => l.split(','));
    // One row per origin and window (the rollup's subtotal rows carry a grouping flag of 1).
    const col = (x: string[], name: string) => x[head.indexOf(name)];
    const total = (w: string) => rows.filter((x) => col(x, 'window_name') === w && col(x, 'g_segment') === '0' && col(x, 'g_lfl') === '0').reduce((s, x) => s + Number(x[head.indexOf('flights')]), 0);
    expect(total('current')).toBe(Number(jun));
    expect(total('prior')).toBe(Number(jan));
    const posts = (JSON.parse(readFileSync(join(out, 'thread.json'), 'utf8')) as { posts: { text: string }[] }).posts.map((p) => p.text);
    const drivers = posts.find((t) => /^\*\d+\. [^\n]*drove the biggest change/.test(t))!;
    expect(drivers).toContain('Jun 2001 against Jan 2001');
    // January has 31 days and June 30: the per-day figures the caption gives, from the same counts.
    const perDay = (n: bigint, days: number) => Math.round(Number(n) / days).toLocaleString('en-GB');
    expect(drivers).toContain(`${perDay(jun, 30)} against ${perDay(jan, 31)} a day`);
    // Airports flying in January and not in June (the test's own SQL): one note lists them, not one note each.
    const [[goneList]] = (await sqlRows(`WITH s AS (SELECT origin, COUNT(*) FILTER (WHERE date >= DATE '2001-01-01' AND date < DATE '2001-02-01') AS j,
        COUNT(*) FILTER (WHERE date >= DATE '2001-06-01' AND date < DATE '2001-07-01') AS u FROM read_parquet('${FLIGHTS}') GROUP BY 1)
      SELECT list(origin ORDER BY origin) FILTER (WHERE j > 0 AND u = 0) FROM s`)) as [[{ items: string[] }]];
    const gone = goneList.items;
    expect(gone.length).toBeGreaterThan(2);
    const notes = drivers.split('\n').filter((l) => l.startsWith('_Note:'));
    const goneNotes = notes.filter((l) => /but none in the window asked for/.test(l));
    expect(goneNotes).toHaveLength(1);
    expect(goneNotes[0]).toContain(`${gone.length} origin airports had data in Jan 2001 but none in the window asked for: ${gone.slice(0, 6).join(', ')}`);
    expect(notes.filter((l) => /count as zero there|counts as zero/.test(l))).toHaveLength(1);
    // Nothing says there is no year earlier to compare with: the range's own ends are compared.
    expect(posts.join('\n')).not.toMatch(/no flights in either span/);
    // The verdict answers "did it grow?" on the totals, and says per day went the other way.
    const summary = posts.find((t) => t.startsWith('*Summary*'))!;
    const perDayRise = (Number(jun) / 30 / (Number(jan) / 31) - 1) * 100;
    expect(perDayRise).toBeGreaterThan(0);
    expect(Number(jun)).toBeLessThan(Number(jan));
    expect(summary).toContain(`No: flights are ${((1 - Number(jun) / Number(jan)) * 100).toFixed(1)}% below Jan 2001`);
    expect(summary).toContain(`per day, though, it rose ${perDayRise.toFixed(1)}% (30 days against 31)`);
  }, 300_000);
});
