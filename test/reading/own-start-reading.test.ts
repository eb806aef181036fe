// Issue 16: a named segment measured from its own start. Wordings written from how managers talk,
// on vega-datasets' flights-3m.parquet (LWB's first row as an origin is 4 May 2001, the test's own
// SQL in test/bot/own-start-thread.test.ts checks it) and weather.csv (both cities from its first day).
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../helpers/run-cli.js';
import { vegaDataFile, writeWeatherConfig } from '../helpers/open-data.js';

let flights = '';
let weather = '';

beforeAll(() => {
  const dir = mkdtempSync(join(tmpdir(), 'tc-own-start-read-'));
  flights = join(dir, 'flights.yaml');
  writeFileSync(flights, `version: 1
datasets:
  - name: flights
    label: Flights
    source: { kind: parquet, paths: ["${vegaDataFile('flights-3m.parquet')}"] }
    time_column: date
    timezone: UTC
    metrics:
      - { name: flights, label: Flights, count: rows, unit: count, kind: flow, also_called: [flights, departures] }
    dimensions:
      - { name: origin, label: Origin airport, column: origin, also_called: [origin, airport, departure airport] }
      - { name: destination, label: Destination airport, column: destination, also_called: [destination, arrival airport] }
`);
  weather = writeWeatherConfig(dir, ['{ name: precipitation, label: Precipitation, sum: precipitation, unit: number, unit_label: mm, kind: flow, also_called: [rain, rainfall] }'], ['{ name: location, label: City, column: location, also_called: [city] }']);
});

interface BriefJson {
  questions: { kind: string; window: { from: string; to: string } | null }[];
  toAsk: string[];
  saidBack: string[];
}

async function read(config: string, text: string): Promise<BriefJson> {
  const r = await runCli(['read', '--config', config, '--now', '2026-12-05T12:00:00Z', text]);
  expect(r.code, r.err).toBe(0);
  return JSON.parse(r.out) as BriefJson;
}

describe('since the named value started: from its first day in the data', () => {
  it.each([
    'How has departure airport LWB performed since we opened it?',
    'flights out of LWB since it started',
    "how's origin airport LWB been doing since its first flight?",
    'Flights from LWB since launch — how are they going?',
  ])('%s', async (text) => {
    const b = await read(flights, text);
    expect(b.questions[0]!.window).toEqual({ from: '2001-05-04', to: '2001-06-30' });
    expect(b.saidBack.join(' ')).toContain("LWB's first flight in the data is 4 May 2001; reading from there");
    // A before/after of a segment with no rows before it is not the question.
    expect(b.questions[0]!.kind).not.toBe('performance');
  });

  it('a name in two breakdowns is asked first, never anchored by a guess', async () => {
    const b = await read(flights, 'Since we launched LWB, how many flights has it had?');
    expect(b.toAsk).toContain('values');
    expect(b.questions[0]!.window).toBeNull();
  });

  it('weather.csv: a city there from the data\'s first day has no start in it, said back', async () => {
    const b = await read(weather, "How has Seattle's rainfall done since Seattle first appeared?");
    expect(b.questions[0]!.window).toBeNull();
    expect(b.saidBack.join(' ')).toContain('Seattle (city) is in the data from its first day (1 January 2012)');
  });
});
