// "Has X gone up since March?", "is it lower than it was in January?": a change from a named
// period to the latest complete one of the same unit (issue 16), never a trend read over the
// stretch. Wordings written first, from how managers talk, before the reader was changed; the
// reader had read "gone up since March" as a trend and "higher than in March" as no period at all.
// Data: vega-datasets' flights-3m.parquet (US flights, January to June 2001) and weather.csv (NOAA
// daily weather, Seattle and New York, 2012–2015), as the trial configs describe them.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../helpers/run-cli.js';
import { vegaDataFile, writeWeatherConfig } from '../helpers/open-data.js';

let flights = '';
let weather = '';

beforeAll(() => {
  const dir = mkdtempSync(join(tmpdir(), 'tc-change-since-'));
  flights = join(dir, 'flights.yaml');
  // As a manager's config over the file reads (the trial's flights config, pointed at vega-datasets).
  writeFileSync(flights, `version: 1
datasets:
  - name: flights
    label: Flights
    source: { kind: parquet, paths: ["${vegaDataFile('flights-3m.parquet')}"] }
    time_column: date
    timezone: UTC
    metrics:
      - { name: flights, label: Flights, count: rows, unit: count, kind: flow, also_called: [flights, departures] }
      - { name: delay, label: Average delay, average: delay, unit: number, unit_label: min, higher_is_better: false, kind: ratio, also_called: [delay, lateness] }
      - { name: distance, label: Distance flown, sum: distance, unit: number, unit_label: miles, kind: flow, also_called: [miles, distance] }
    dimensions:
      - { name: origin, label: Origin airport, column: origin, also_called: [origin, airport, departure airport] }
      - { name: destination, label: Destination airport, column: destination, also_called: [destination, arrival airport] }
`);
  weather = writeWeatherConfig(dir, ['{ name: precipitation, label: Precipitation, sum: precipitation, unit: number, unit_label: mm, kind: flow, also_called: [rain, rainfall] }'], ['{ name: location, label: City, column: location, also_called: [city] }']);
});

interface Window { from: string; to: string }
interface BriefJson {
  questions: { kind: string; window: Window | null; compareWindow: Window | null; spanEnds: string | null; perDay: boolean }[];
  toAsk: string[];
}

async function read(config: string, text: string): Promise<BriefJson> {
  const r = await runCli(['read', '--config', config, '--now', '2026-12-05T12:00:00Z', text]);
  expect(r.code, r.err).toBe(0);
  return JSON.parse(r.out) as BriefJson;
}

describe('"gone up / come down since <period>": the change from that period to the latest', () => {
  // flights-3m ends on 30 June 2001 (its 1 July rows are a stray tail): June is the latest complete month.
  it.each([
    ['has the daily average number of flights gone up since March?', '2001-03-01', true],
    ['Have departures come down since February?', '2001-02-01', false],
    ['did average delay go down since April', '2001-04-01', false],
    ['have we gone up since March in flights per day?', '2001-03-01', true],
    ['Flights have crept up since April, right?', '2001-04-01', false],
  ])('%s', async (text, from, perDay) => {
    const q = (await read(flights, text)).questions[0]!;
    expect(q.kind).toBe('growth');
    // The stretch from the named month to the data's end, measured from its first whole month to its last.
    expect(q.window).toEqual({ from, to: '2001-06-30' });
    expect(q.spanEnds).toBe('month');
    expect(q.perDay).toBe(perDay);
  });
});

describe('"higher / lower than in <period>": the latest complete period of that unit against it', () => {
  it.each([
    ['are delays higher than in March?', { from: '2001-06-01', to: '2001-06-30' }, { from: '2001-03-01', to: '2001-03-31' }],
    ['is the average delay lower than it was in January?', { from: '2001-06-01', to: '2001-06-30' }, { from: '2001-01-01', to: '2001-01-31' }],
    ['Are we running more flights a day than we were in March?', { from: '2001-06-01', to: '2001-06-30' }, { from: '2001-03-01', to: '2001-03-31' }],
    ['are we flying more miles than in Q1 2001?', { from: '2001-04-01', to: '2001-06-30' }, { from: '2001-01-01', to: '2001-03-31' }],
    ['is lateness worse than in January?', { from: '2001-06-01', to: '2001-06-30' }, { from: '2001-01-01', to: '2001-01-31' }],
  ])('%s', async (text, window, compareWindow) => {
    const b = await read(flights, text);
    const q = b.questions[0]!;
    expect(q.kind).toBe('growth');
    expect(q.window).toEqual(window);
    expect(q.compareWindow).toEqual(compareWindow);
    expect(b.toAsk).not.toContain('window');
  });

  it('the latest month named itself compares with nothing later: asked, not guessed', async () => {
    // June is the latest complete month: "higher than in June" has no later month to set against it.
    const b = await read(flights, 'are delays higher than in June?');
    expect(b.questions[0]!.compareWindow).toBeNull();
  });
});

describe('weather.csv: "since March 2014" as a growth question', () => {
  it.each(['has rainfall in Seattle gone down since March 2014?', 'Seattle rain: has it gone up since March 2014?'])('%s', async (text) => {
    const q = (await read(weather, text)).questions[0]!;
    expect(q.kind).toBe('growth');
    // weather.csv ends on 31 December 2015.
    expect(q.window).toEqual({ from: '2014-03-01', to: '2015-12-31' });
    expect(q.spanEnds).toBe('month');
  });
});
