// A request that names no measure but a quality of one ("warming", "windier", "busiest") gets that
// measure recommended, not the catalog's first. The catalog is written over vega-datasets'
// weather.csv (daily weather in Seattle and New York, 2012-2015: precipitation, temp_max,
// temp_min, wind, weather) and flights-20k.json, with plain labels of the columns; no label or
// synonym repeats the request's quality word, so only the quality words can find the measure.
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { rankMetrics } from '../../bot/reading/metric-ranking.js';
import { parseConfigText } from '../../config/load.js';
import { vegaDataFile, weatherConfigText } from '../helpers/open-data.js';

const weather = parseConfigText(weatherConfigText([
  '{ name: days, label: Days recorded, count: rows, unit: count, kind: flow }',
  '{ name: precipitation_total, label: Total precipitation, sum: precipitation, unit: number, unit_label: mm, kind: flow }',
  '{ name: temp_max, label: Daily high temperature, average: temp_max, unit: number, unit_label: "°C", kind: level }',
  '{ name: wind, label: Wind speed, average: wind, unit: number, unit_label: m/s, kind: level }',
], [
  '{ name: location, label: City, column: location }',
]), join(tmpdir(), 'weather.yaml')).datasets[0]!;

const flights = parseConfigText(`version: 1
datasets:
  - name: flights
    label: Flights
    source: { kind: json, paths: ["${vegaDataFile('flights-20k.json')}"] }
    time_column: {expr: "strptime(date, '%Y/%m/%d %H:%M')"}
    timezone: UTC
    metrics:
      - { name: flights, label: Flights, count: rows, unit: count, kind: flow }
      - { name: avg_delay, label: Average delay, average: delay, unit: number, unit_label: min, kind: ratio }
      - { name: distance, label: Distance, sum: distance, unit: number, unit_label: mi, kind: flow }
    dimensions:
      - { name: origin, label: Origin airport, column: origin }
`, join(tmpdir(), 'flights.yaml')).datasets[0]!;

const first = (ds: typeof weather, text: string) => rankMetrics(ds, text)[0]!;

describe('a quality asked about points to its measure', () => {
  it.each([
    ['Which city is warming faster?', 'temp_max', 'temperature'],
    ['was 2015 warmer than 2012 in both cities?', 'temp_max', 'temperature'],
    ['hottest month in new york?', 'temp_max', 'temperature'],
    ['Is it windier in New York than in Seattle?', 'wind', 'wind'],
    ['which city is wetter?', 'precipitation_total', 'rainfall'],
  ])('%s -> %s', (text, metric, about) => {
    const top = first(weather, text);
    expect(top.name).toBe(metric);
    expect(top.fits).toBe(true);
    expect(top.reason).toContain(`is about ${about}`);
  });

  it('volume words ("busiest", "quietest", "traffic") point to the row count', () => {
    for (const text of ['busiest day of the week', 'quietest month for traffic at ORD']) {
      const top = first(flights, text);
      expect(top.name).toBe('flights');
      expect(top.reason).toMatch(/asks how many/);
    }
  });

  it('without such a word the first measure after the row count is still the default, and says so', () => {
    const top = first(weather, 'how did things go by city?');
    expect(top.name).toBe('precipitation_total');
    expect(top.fits).toBe(false);
    expect(first(flights, 'how far did we fly by origin?').name).toBe('distance');
  });
});
