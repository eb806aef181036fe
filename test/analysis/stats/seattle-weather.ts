// Loads the public Seattle daily weather record shipped in the vega-datasets package (2012–2015).
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { parseConfigText, type LoadedConfig } from '../../../config/load.js';

export interface WeatherDay {
  date: string;
  precipitation: number;
  tempMax: number;
  tempMin: number;
  wind: number;
  weather: string;
}

const require = createRequire(import.meta.url);

/** Every row of data/seattle-weather.csv, parsed with a plain split (the file has no quoted fields). */
export function loadSeattleWeather(): WeatherDay[] {
  // The package's export map hides data/, so locate it from the resolved entry point's folder.
  const root = dirname(dirname(require.resolve('vega-datasets')));
  const text = readFileSync(join(root, 'data', 'seattle-weather.csv'), 'utf8');
  const [header, ...lines] = text.trim().split('\n');
  if (header !== 'date,precipitation,temp_max,temp_min,wind,weather') throw new Error(`unexpected header: ${header}`);
  return lines.map((line) => {
    const [date, precipitation, tempMax, tempMin, wind, weather] = line.split(',');
    return {
      date: date!,
      precipitation: Number(precipitation),
      tempMax: Number(tempMax),
      tempMin: Number(tempMin),
      wind: Number(wind),
      weather: weather!.trim(),
    };
  });
}

/** Monthly rollup in calendar order: year-month key, month number, day count, precipitation total, mean temp_max. */
export function monthly(days: readonly WeatherDay[]): { key: string; month: number; days: number; precipitation: number; meanTempMax: number }[] {
  const groups = new Map<string, WeatherDay[]>();
  for (const d of days) {
    const key = d.date.slice(0, 7);
    const g = groups.get(key) ?? [];
    g.push(d);
    groups.set(key, g);
  }
  return [...groups.keys()].sort().map((key) => {
    const g = groups.get(key)!;
    return {
      key,
      month: Number(key.slice(5, 7)),
      days: g.length,
      precipitation: g.reduce((acc, d) => acc + d.precipitation, 0),
      meanTempMax: g.reduce((acc, d) => acc + d.tempMax, 0) / g.length,
    };
  });
}

/** The CSV's rows as a PostgreSQL table `"schema".weather` (same columns, loaded in chunks of bound values). */
export async function loadSeattleWeatherTable(client: { query(sql: string, values?: unknown[]): Promise<unknown> }, schema: string): Promise<void> {
  const root = dirname(dirname(require.resolve('vega-datasets')));
  const lines = readFileSync(join(root, 'data', 'seattle-weather.csv'), 'utf8').trim().split('\n').slice(1);
  await client.query(`CREATE SCHEMA "${schema}"`);
  await client.query(`CREATE TABLE "${schema}".weather (date DATE, precipitation DOUBLE PRECISION, temp_max DOUBLE PRECISION, temp_min DOUBLE PRECISION, wind DOUBLE PRECISION, weather TEXT)`);
  const values = lines.map((l) => l.split(','));
  for (let i = 0; i < values.length; i += 500) {
    const chunk = values.slice(i, i + 500);
    await client.query(`INSERT INTO "${schema}".weather VALUES ${chunk.map((_, j) => `(${[1, 2, 3, 4, 5, 6].map((n) => `$${j * 6 + n}`).join(', ')})`).join(', ')}`, chunk.flat());
  }
}

/** A catalog over the CSV file: a count of days, precipitation (a sum), temp_max (an average) and the weather as a dimension. */
export function seattleWeatherConfig(): LoadedConfig {
  const csv = join(dirname(dirname(require.resolve('vega-datasets'))), 'data', 'seattle-weather.csv');
  return parseConfigText(
    `version: 1
datasets:
  - name: weather
    label: Seattle weather
    source: { kind: csv, path: "${csv}" }
    table: weather
    time_column: date
    timezone: UTC
    metrics:
      - { name: days, label: Days, count: rows, unit: count, higher_is_better: true }
      - { name: precipitation, label: Precipitation, sum: precipitation, unit: number, higher_is_better: true }
      - { name: temp_max, label: Temp max, average: temp_max, unit: number, higher_is_better: true, kind: level }
    dimensions:
      - { name: weather, label: Weather, column: weather }
`,
    '/virtual/weather.yaml',
  );
}
