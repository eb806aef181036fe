// Loads the public Seattle daily weather record shipped in the vega-datasets package (2012–2015).
import { readFileSync } from 'node:fs';
import { afterAll, describe } from 'vitest';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { parseConfigText, type LoadedConfig } from '../../../config/load.js';
import { vegaDataFile } from '../../helpers/open-data.js';
import { describeWithPostgres, dropSchema, onPostgres, uniqueName, withClient } from '../../helpers/postgres.js';
import { useWorkspace } from '../../helpers/workspace-checks.js';

export interface WeatherDay {
  date: string;
  precipitation: number;
  tempMax: number;
  tempMin: number;
  wind: number;
  weather: string;
}

export const SEATTLE_WEATHER_CSV = vegaDataFile('seattle-weather.csv');

/** Every row of data/seattle-weather.csv, parsed with a plain split (the file has no quoted fields). */
export function loadSeattleWeather(): WeatherDay[] {
  const text = readFileSync(SEATTLE_WEATHER_CSV, 'utf8');
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
  const lines = readFileSync(SEATTLE_WEATHER_CSV, 'utf8').trim().split('\n').slice(1);
  await client.query(`CREATE SCHEMA "${schema}"`);
  await client.query(`CREATE TABLE "${schema}".weather (date DATE, precipitation DOUBLE PRECISION, temp_max DOUBLE PRECISION, temp_min DOUBLE PRECISION, wind DOUBLE PRECISION, weather TEXT)`);
  const values = lines.map((l) => l.split(','));
  for (let i = 0; i < values.length; i += 500) {
    const chunk = values.slice(i, i + 500);
    await client.query(`INSERT INTO "${schema}".weather VALUES ${chunk.map((_, j) => `(${[1, 2, 3, 4, 5, 6].map((n) => `$${j * 6 + n}`).join(', ')})`).join(', ')}`, chunk.flat());
  }
}

/** The default catalog: a count of days, precipitation (a sum), temp_max (an average) and the weather as a dimension. */
const DEFAULT_CATALOG = `metrics:
  - { name: days, label: Days, count: rows, unit: count, higher_is_better: true }
  - { name: precipitation, label: Precipitation, sum: precipitation, unit: number, higher_is_better: true }
  - { name: temp_max, label: Temp max, average: temp_max, unit: number, higher_is_better: true, kind: level }
dimensions:
  - { name: weather, label: Weather, column: weather }`;

/**
 * A config over the CSV file (dataset `weather`, stamped by `date`, UTC). `catalog` is the dataset's
 * own YAML (metrics:, dimensions:, comparison_groups:) written at the left margin; each test declares
 * the metrics it checks.
 */
export function seattleWeatherConfig(catalog: string = DEFAULT_CATALOG): LoadedConfig {
  const indented = catalog.trim().split('\n').map((line) => `    ${line}`).join('\n');
  return parseConfigText(
    `version: 1
datasets:
  - name: weather
    label: Seattle weather
    source: { kind: csv, path: "${SEATTLE_WEATHER_CSV}" }
    table: weather
    time_column: date
    timezone: UTC
${indented}
`,
    '/virtual/weather.yaml',
  );
}

/**
 * The same checks on DuckDB over the CSV (describe block `names.duckdb`) and on PostgreSQL over a
 * table loaded from it (`names.postgres`, in a schema named from `schemaPrefix`, dropped after; a
 * failure under CI=true without a server). Each block opens the workspace of `seattleWeatherConfig()`
 * before its checks and closes it after; the checks read it through `ws()` inside a test.
 */
export function describeOnSeattleWeather(names: { duckdb: string; postgres: string }, schemaPrefix: string, checks: (ws: () => Workspace) => void): void {
  describe(names.duckdb, () => {
    checks(useWorkspace(() => openWorkspace(seattleWeatherConfig())));
  });
  describeWithPostgres(names.postgres, (adminUrl) => {
    const schema = uniqueName(schemaPrefix);
    const urlEnv = `${schemaPrefix.toUpperCase()}_URL`;
    checks(
      useWorkspace(async () => {
        await withClient(adminUrl, (c) => loadSeattleWeatherTable(c, schema));
        return openWorkspace(onPostgres(seattleWeatherConfig(), urlEnv, schema), undefined, { [urlEnv]: adminUrl });
      }),
    );
    afterAll(async () => dropSchema(adminUrl, schema));
  });
}
