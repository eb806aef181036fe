// Reading gaps found on the trial configs (issue 16), checked with wording the reader was not
// written around. Data: vega-datasets' weather.csv (NOAA daily weather for Seattle and New York,
// 2012–2015) and flights-3m.parquet (US flights, January–June 2001), each under the catalog of the
// trial configs weather-fixed.yaml and flights-fixed.yaml. Briefs are read through `threadcount
// read`'s own path (real DuckDB).
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { readBrief } from '../../cli/read.js';
import { vegaDataFile, weatherConfigText } from '../helpers/open-data.js';

const dir = mkdtempSync(join(tmpdir(), 'tc-material-gaps-'));
export const WEATHER_CONFIG = join(dir, 'weather.yaml');
export const FLIGHTS_CONFIG = join(dir, 'flights.yaml');
writeFileSync(
  WEATHER_CONFIG,
  weatherConfigText(
    [
      '{ name: days, label: Days recorded, count: rows, unit: count, kind: flow, also_called: [days] }',
      '{ name: precipitation, label: Precipitation, sum: precipitation, unit: number, unit_label: mm, kind: flow, also_called: [rain, rainfall] }',
      '{ name: temp_max, label: Daily high temperature, average: temp_max, unit: number, unit_label: °C, kind: level, also_called: [high temperature, max temperature, temperature] }',
      '{ name: temp_min, label: Daily low temperature, average: temp_min, unit: number, unit_label: °C, kind: level, also_called: [low temperature, min temperature] }',
      '{ name: wind, label: Wind speed, average: wind, unit: number, unit_label: m/s, kind: level, also_called: [wind] }',
    ],
    [
      '{ name: location, label: City, column: location, also_called: [city, location] }',
      '{ name: weather, label: Weather type, column: weather, also_called: [weather type, conditions] }',
    ],
  ),
);
writeFileSync(
  FLIGHTS_CONFIG,
  `version: 1
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
`,
);

const NOW = new Date('2026-12-05T01:00:00Z');
export const readWeather = (text: string) => readBrief({ configFile: WEATHER_CONFIG, text, now: NOW });
export const readFlights = (text: string) => readBrief({ configFile: FLIGHTS_CONFIG, text, now: NOW });

describe('"typical", "normal", "usual" before a measure ask for its median, said back', () => {
  it.each([
    ['what is the typical delay?', readFlights, 'delay'],
    ["what's a normal delay out of ORD", readFlights, 'delay'],
    ['the usual lateness in March', readFlights, 'delay'],
    ['usual high temperature in Seattle', readWeather, 'temp_max'],
    ['whats the typical wind speed in New York', readWeather, 'wind'],
  ] as const)('%s', async (text, read, metric) => {
    const b = await read(text);
    expect(b.questions.map((q) => q.metrics)).toEqual([[metric]]);
    // The median: quantile 0.5 (the robust centre; common practice for "typical").
    expect(b.questions[0]!.statistic?.quantile).toBe(0.5);
    expect(b.saidBack.join(' ')).toMatch(/read as the median/);
    expect(b.unknownTerms).toEqual([]);
  });

  it("the typical day's rainfall is a total: no median, and said so (the day is no count of days)", async () => {
    const b = await readWeather("what was the typical day's rainfall?");
    expect(b.questions.map((q) => q.metrics)).toEqual([['precipitation']]);
    expect(b.saidBack.join(' ')).toMatch(/total, so it has no median/);
  });

  it.each([
    ['were delays worse than usual in June', readFlights],
    ['is a 20 minute delay normal?', readFlights],
    ['was 2014 a normal year for rain', readWeather],
  ] as const)('no measure after the word, no statistic: %s', async (text, read) => {
    const b = await read(text);
    expect(b.questions.every((q) => !q.statistic)).toBe(true);
    expect(b.saidBack.join(' ')).not.toMatch(/median/);
  });
});

describe('"day of the week" is a breakdown phrase, never the count of days', () => {
  it.each([
    ['which day of the week is windiest', 'wind'],
    ['wettest days of the week in Seattle', 'precipitation'],
    ['which weekday is wettest?', 'precipitation'],
    ['what day of week gets the most rain', 'precipitation'],
  ])('%s', async (text, metric) => {
    const b = await readWeather(text);
    // The weather catalog counts its rows as "Days recorded" (also called "days"): not asked for here.
    expect(b.questions.map((q) => q.metrics)).toEqual([[metric]]);
    expect(b.unknownTerms).toEqual([]);
    expect(b.toAsk).not.toContain('metrics');
  });

  it('"busiest day of the week" ranks by the row count the quality word points to, said as inferred from "busiest"', async () => {
    const b = await readWeather('busiest day of the week');
    expect(b.evidence.metrics).toEqual({ words: 'busiest', how: 'inferred' });
  });

  it('"which month is wettest" reads rainfall at a monthly grain', async () => {
    const b = await readWeather('which month is wettest');
    expect(b.questions.map((q) => q.metrics)).toEqual([['precipitation']]);
    expect(b.grain).toBe('month');
  });
});

describe('a range of days of the week is a day filter; "X than Y" sets two day sets against each other', () => {
  const days = (b: Awaited<ReturnType<typeof readFlights>>) => b.questions.map((q) => q.filters.filter((f) => f.dimension === '@day_of_week').flatMap((f) => f.values.map(Number)));
  // ISO 8601 day numbers: 1 = Monday ... 7 = Sunday.
  it.each([
    ['flights from Tuesday to Thursday', [2, 3, 4]],
    ['average delay Mon–Wed', [1, 2, 3]],
    ['how many flights Monday through Friday', [1, 2, 3, 4, 5]],
    ['delays between Tuesday and Thursday', [2, 3, 4]],
    ['flights thurs thru sat in May', [4, 5, 6]],
  ])('%s', async (text, want) => {
    const b = await readFlights(text);
    expect(days(b)).toEqual([want]);
    expect(b.unknownTerms).toEqual([]);
  });

  it.each(['do we fly more at weekends than on weekdays', 'are delays worse on weekends than weekdays'])('%s: one contrast, not one filter of every day', async (text) => {
    const b = await readFlights(text);
    expect(days(b).flat()).toEqual([]);
    expect(b.questions[0]!.contrast).toEqual({ dimension: '@day_of_week', values: ['6,7', '1,2,3,4,5'] });
  });
});

describe('a measure named by a quality noun is asked by its adjective ("lateness": "how late")', () => {
  it.each([
    ['how late are flights out of ORD?', ['delay']],
    ['how late were flights in March?', ['delay']],
    // The count still reads where the rows are counted.
    ['how many flights left, and how late were they?', ['flights', 'delay']],
  ] as const)('%s', async (text, metrics) => {
    const b = await readFlights(text);
    expect(b.questions.flatMap((q) => q.metrics)).toEqual(metrics);
    expect(b.unknownTerms).toEqual([]);
  });
});
