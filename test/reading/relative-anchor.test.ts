// Every relative period of one request counts from the same anchor, and "last X" named beside
// "this X" is never the same span. Run through `threadcount read` and `ask` with --now fixed on
// vega-datasets' weather.csv (NOAA daily weather for Seattle and New York, 2012–2015); the
// figures expected are computed here by DuckDB SQL over the file.
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { beforeAll, describe, expect, it } from 'vitest';
import { askPostTexts, runCli } from '../helpers/run-cli.js';
import { WEATHER_CSV, writeWeatherConfig } from '../helpers/open-data.js';

const csv = WEATHER_CSV;
let dir = '';
let config = '';

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'tc-anchor-'));
  config = writeWeatherConfig(dir, [
    '{ name: precipitation, label: Precipitation, sum: precipitation, unit: number, unit_label: mm, kind: flow, also_called: [rain, rainfall] }',
    '{ name: temp_max, label: Daily high temperature, average: temp_max, unit: number, unit_label: °C, kind: level, also_called: [high temperature] }',
  ], [
    '{ name: weather, label: Weather type, column: weather, also_called: [weather type] }',
    '{ name: location, label: City, column: location, also_called: [city] }',
  ]);
});

interface BriefJson {
  questions: { window: { from: string; to: string } | null; compareWindow: { from: string; to: string } | null }[];
  saidBack: string[];
  toAsk: string[];
  anchor: { today: string };
}

async function read(now: string, text: string): Promise<BriefJson> {
  const r = await runCli(['read', '--config', config, '--now', now, text]);
  expect(r.code, r.err).toBe(0);
  return JSON.parse(r.out) as BriefJson;
}

async function sql(query: string): Promise<number> {
  const db = await DuckDBInstance.create(':memory:');
  const c = await db.connect();
  const rows = (await c.runAndReadAll(query)).getRows();
  c.closeSync();
  return Number(rows[0]![0]);
}

// The data ends 31 December 2015; a month later relative periods count back from 1 January 2016.
const SOON_AFTER = '2016-01-20T12:00:00Z';
// Eleven years later, relative periods from today are after the data: asked, with the data-end reading said.
const YEARS_AFTER = '2026-12-05T12:00:00Z';

describe('"last X" beside "this X" is the one before it, on the anchor the brief states', () => {
  it.each([
    ['last summer vs this summer rainfall in Seattle', { from: '2014-06-01', to: '2014-08-31' }, { from: '2015-06-01', to: '2015-08-31' }],
    ['this year vs last year rainfall', { from: '2015-01-01', to: '2015-12-31' }, { from: '2014-01-01', to: '2014-12-31' }],
    ['last quarter vs this quarter rainfall', { from: '2015-07-01', to: '2015-09-30' }, { from: '2015-10-01', to: '2015-12-31' }],
    ['this March vs last March rainfall', { from: '2015-03-01', to: '2015-03-31' }, { from: '2014-03-01', to: '2014-03-31' }],
  ])('%s', async (text, window, compare) => {
    const b = await read(SOON_AFTER, text);
    expect(b.anchor.today).toBe('2016-01-01');
    expect(b.questions[0]!.window).toEqual(window);
    expect(b.questions[0]!.compareWindow).toEqual(compare);
  });

  it('"this month" and "year to date" hold the data\'s last day, not the empty period starting at the anchor', async () => {
    expect((await read(SOON_AFTER, 'rainfall this month')).questions[0]!.window).toEqual({ from: '2015-12-01', to: '2015-12-31' });
    expect((await read(SOON_AFTER, 'rainfall year to date')).questions[0]!.window).toEqual({ from: '2015-01-01', to: '2015-12-31' });
  });
});

describe('data that ended years ago: the say-back gives both readings apart, and the data-end one is offered', () => {
  it('"last summer vs this summer": summers 2025 and 2026 from today; 2014 and 2015 from the data\'s end', async () => {
    const b = await read(YEARS_AFTER, 'last summer vs this summer rainfall in Seattle');
    expect(b.toAsk).toContain('window');
    const line = b.saidBack.find((l) => /nothing to answer/.test(l))!;
    expect(line).toMatch(/last summer \(1 June 2025 to 31 August 2025\) and this summer \(1 June 2026 to 31 August 2026\) are after it/);
    expect(line).toMatch(/counted back from the data's end, last summer is 1 June to 31 August 2014 and this summer 1 June to 31 August 2015\./);
  });

  // ask runs on the real today, years after 2015 as well.
  it('accepting the offer answers summer 2015 against summer 2014 with the figures SQL gives', async () => {
    const out = mkdtempSync(join(dir, 'ask-'));
    const posts = await askPostTexts(config, 'last summer vs this summer rainfall in Seattle', out);
    expect(posts[1]).toMatch(/Recommended: \*Summer 2015 against summer 2014/);
    const summer = (y: number) => sql(`SELECT sum(precipitation) FROM read_csv('${csv}') WHERE location = 'Seattle' AND date BETWEEN '${y}-06-01' AND '${y}-08-31'`);
    const [s15, s14] = [await summer(2015), await summer(2014)];
    const said = (v: number) => `${v.toPrecision(3)}\u00a0mm`;
    expect(posts.join('\n')).toContain(`${said(s15)} in Jun\u2009–\u2009Aug 2015 against ${said(s14)} in Jun\u2009–\u2009Aug 2014`);
  });
});
