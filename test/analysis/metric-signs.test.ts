// Whether a metric's days reach or cross zero is read once per dataset, beside its coverage, kept
// with it, and consulted by the catalog's one rule for percentages (catalog.ts changeBasisOf) in
// every answer. Data: vega-datasets' flights-3m.parquet (US flights, January to June 2001; delay in
// minutes, negative for early flights) and weather.csv (NOAA daily weather, Seattle and New York,
// 2012-2015). What the fact should say comes from the test's own SQL over the files (DuckDB's node
// client, not the project's queries).
import { existsSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../analysis/answer-sub-question.js';
import { changeBasisOf, metricByName } from '../../analysis/catalog.js';
import type { GrowthPeriodsFinding } from '../../analysis/findings/growth.js';
import { SUB_QUESTIONS } from '../../analysis/sub-questions/registry.js';
import { openWorkspace, type Workspace } from '../../analysis/workspace.js';
import { presentContext } from '../../bot/present-answer.js';
import { loadConfig } from '../../config/load.js';
import { percentMoveIn } from '../helpers/caption-checks.js';
import { flightsParquetConfigText, vegaDataFile } from '../helpers/open-data.js';
import { referenceRows } from '../helpers/reference-sql.js';

const FLIGHTS = vegaDataFile('flights-3m.parquet');
const WEATHER = vegaDataFile('weather.csv');


const flightsConfig = `${flightsParquetConfigText([
  '{ name: delay, label: Average delay, average: delay, unit: number, unit_label: min, higher_is_better: false, kind: ratio }',
  '{ name: distance, label: Distance flown, sum: distance, unit: number, unit_label: miles, kind: flow }',
])}    dimensions:
      - { name: origin, label: Origin airport, column: origin }
      - { name: destination, label: Destination airport, column: destination }
`;

const weatherConfig = `version: 1
datasets:
  - name: weather
    label: Weather
    source: { kind: csv, paths: ["${WEATHER}"] }
    time_column: date
    timezone: UTC
    metrics:
      - { name: precipitation, label: Precipitation, sum: precipitation, unit: number, unit_label: mm, kind: flow }
      - { name: temp_min, label: Daily low temperature, average: temp_min, unit: number, unit_label: °C, kind: level }
      - { name: wind, label: Wind speed, average: wind, unit: number, unit_label: m/s, kind: level }
    dimensions:
      - { name: location, label: City, column: location }
`;

let dir: string;
let flights: Workspace;
let weather: Workspace;
beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'tc-signs-'));
  writeFileSync(join(dir, 'flights.yaml'), flightsConfig);
  writeFileSync(join(dir, 'weather.yaml'), weatherConfig);
  flights = await openWorkspace(loadConfig(join(dir, 'flights.yaml')));
  weather = await openWorkspace(loadConfig(join(dir, 'weather.yaml')));
}, 120_000);
afterAll(async () => {
  await flights?.source.close();
  await weather?.source.close();
});

describe('the signs of a metric\'s days, read once per dataset', () => {
  it('flights-3m: the average delay over all flights goes below zero on some days; sums are not read (own SQL)', async () => {
    // Own SQL: the share of days whose average delay over all flights is below zero (one airport's odd day does not decide).
    const [r] = await referenceRows(`SELECT COUNT(*) FILTER (WHERE v < 0) / COUNT(*) AS overall FROM (SELECT CAST(date AS DATE) d, AVG(delay) v FROM read_parquet('${FLIGHTS}') GROUP BY 1)`);
    // At the time of writing: −5.06 min at lowest, below zero on 20 of 182 days (SIGNED_DAY_SHARE: 1%).
    const expected = Number(r!.overall) >= 0.01;
    expect(expected).toBe(true);
    expect(flights.coverage.reachZero).toEqual(expected ? ['delay'] : []);
    expect(metricByName(flights.dataset, 'delay').reachesZero).toBe(true);
    expect(metricByName(flights.dataset, 'distance').reachesZero).toBeUndefined();
  });

  it('weather.csv: the daily low goes below 0 °C, the wind never reaches zero (own SQL)', async () => {
    const [r] = await referenceRows(`SELECT
      (SELECT COUNT(*) FILTER (WHERE v < 0) / COUNT(*) FROM (SELECT date, AVG(temp_min) v FROM read_csv('${WEATHER}') GROUP BY 1)) AS low,
      (SELECT COUNT(*) FILTER (WHERE v < 0) / COUNT(*) FROM (SELECT date, AVG(wind) v FROM read_csv('${WEATHER}') GROUP BY 1)) AS wind`);
    const expected = [['temp_min', Number(r!.low)], ['wind', Number(r!.wind)]].filter(([, v]) => (v as number) >= 0.01).map(([m]) => m);
    expect(expected).toContain('temp_min');
    expect(weather.coverage.reachZero).toEqual(expected);
  });

  it('is kept with the coverage: a second opening reads it from the cache file', async () => {
    const files = readdirSync(join(dir, 'threadcount-cache', 'quality')).filter((f) => f.endsWith('.coverage.json'));
    const kept = files.map((f) => JSON.parse(readFileSync(join(dir, 'threadcount-cache', 'quality', f), 'utf8')) as { reachZero?: string[] });
    expect(kept.some((k) => k.reachZero?.includes('delay'))).toBe(true);
    const again = await openWorkspace(loadConfig(join(dir, 'flights.yaml')));
    try {
      expect(again.coverage.reachZero).toEqual(['delay']);
    } finally {
      await again.source.close();
    }
    expect(existsSync(join(dir, 'threadcount-cache'))).toBe(true);
  });

  it('decides the basis where the compared values alone would not: two positive months of delay change in minutes', async () => {
    const plain = loadConfig(join(dir, 'flights.yaml')).datasets[0]!;
    // Without the dataset's reading, two positive figures would allow a percentage.
    expect(changeBasisOf(metricByName(plain, 'delay'), [5.99, 14.4])).toBe('percent');
    expect(changeBasisOf(metricByName(flights.dataset, 'delay'), [5.99, 14.4])).toBe('units');
    // A flow's zero is none: distance keeps its percentages.
    expect(changeBasisOf(metricByName(flights.dataset, 'distance'), [1, 2])).toBe('percent');

    // ATL, June against January: own SQL for both months' average delay, then the answer in minutes.
    const rows = await referenceRows(`SELECT month(date) AS m, AVG(delay) AS v FROM read_parquet('${FLIGHTS}') WHERE origin = 'ATL' AND month(date) IN (1, 6) AND CAST(date AS DATE) < DATE '2001-07-01' GROUP BY 1 ORDER BY 1`);
    expect(Number(rows[0]!.v)).toBeGreaterThan(0);
    expect(Number(rows[1]!.v)).toBeGreaterThan(0);
    const answer = await answerSubQuestion({
      id: 'gp', kind: 'growth', lens: 'summary', template: 'growth_periods', metrics: ['delay'], grain: 'month',
      window: { start: '2001-06-01', end: '2001-07-01' }, compareWindow: { start: '2001-01-01', end: '2001-02-01' },
      filters: [{ dimension: 'origin', values: ['ATL'] }],
    }, flights);
    const f = answer.findings.find((x): x is GrowthPeriodsFinding => x.type === 'growth_periods')!;
    expect(f.total.before).toBeCloseTo(Number(rows[0]!.v), 6);
    expect(f.total.after).toBeCloseTo(Number(rows[1]!.v), 6);
    expect(f.total.relative).toBeNull();
    expect(f.total.change).toBeCloseTo(Number(rows[1]!.v) - Number(rows[0]!.v), 6);
    const p = SUB_QUESTIONS.growth_periods.present(answer, presentContext(flights, 'managers'));
    expect(`${p.title} ${p.caption}`).toMatch(/min/);
    expect(percentMoveIn(`${p.title}\n${p.caption}`)).toBeNull();
  });
});
