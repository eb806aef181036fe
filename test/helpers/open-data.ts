// Files of the vega-datasets package (public datasets: NOAA, FAA, Seattle weather and others), a dev
// dependency the tests read as data the project was never built around.
import { writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';

// The package's export map hides data/, so it is located from the resolved entry point's folder.
const dataFolder = join(dirname(dirname(createRequire(import.meta.url).resolve('vega-datasets'))), 'data');

/** The absolute path of one file in vega-datasets' data/ folder, e.g. `vegaDataFile('seattle-weather.csv')`. */
export function vegaDataFile(name: string): string {
  return join(dataFolder, name);
}

/**
 * Writes `iowa.yaml` into `dir` over vega-datasets' iowa-electricity.csv (US EIA net generation in
 * Iowa by source, one row per source per year, 2001–2017) with the catalog `threadcount init` first
 * drafted for it: a row count, then net generation as a level (init now drafts it as a sum; the
 * tests using this one check reading and the page, where either does). Returns the file's path.
 */
export function writeIowaConfig(dir: string): string {
  const file = join(dir, 'iowa.yaml');
  writeFileSync(file, `version: 1
datasets:
  - name: iowa_electricity
    label: Iowa electricity
    source: { kind: csv, paths: [${vegaDataFile('iowa-electricity.csv')}] }
    time_column: year
    timezone: UTC
    metrics:
      - { name: rows, label: Rows, count: rows, unit: count, kind: flow }
      - { name: net_generation, label: Net generation, average: net_generation, unit: number, kind: level }
    dimensions:
      - { name: source, label: Source, column: source }
`);
  return file;
}

/**
 * Writes `name` into `dir`: a config over vega-datasets' seattle-weather.csv (NOAA daily weather in
 * Seattle, 2012–2015) with precipitation as a summed flow by weather type, plus any more metric
 * lines (YAML flow mappings). Returns the file's path.
 */
export function writeSeattleConfig(dir: string, name = 'weather.yaml', moreMetrics: readonly string[] = []): string {
  const file = join(dir, name);
  writeFileSync(file, `version: 1
datasets:
  - name: seattle_weather
    label: Seattle weather
    source: { kind: csv, paths: [${vegaDataFile('seattle-weather.csv')}] }
    time_column: date
    timezone: UTC
    metrics:
      - { name: precipitation, label: Precipitation, sum: precipitation, unit: number, higher_is_better: true, kind: flow }
${moreMetrics.map((m) => `      - ${m}
`).join('')}    dimensions:
      - { name: weather, label: Weather, column: weather }
`);
  return file;
}

/** vega-datasets' weather.csv: NOAA daily weather in Seattle and New York, 2012–2015 (one row a city a day). */
export const WEATHER_CSV = vegaDataFile('weather.csv');

/**
 * A config text over weather.csv (dataset `weather`, stamped by `date`, UTC) with the given metric
 * and dimension lines (YAML flow mappings), as a newcomer to the file would write it.
 */
export function weatherConfigText(metrics: readonly string[], dimensions: readonly string[]): string {
  const lines = (xs: readonly string[]) => xs.map((x) => `      - ${x}\n`).join('');
  return `version: 1
datasets:
  - name: weather
    label: Weather
    source: { kind: csv, paths: ["${WEATHER_CSV}"] }
    time_column: date
    timezone: UTC
    metrics:
${lines(metrics)}    dimensions:
${lines(dimensions)}`;
}

/** Writes weatherConfigText into `dir` as `weather.yaml`. Returns the file's path. */
export function writeWeatherConfig(dir: string, metrics: readonly string[], dimensions: readonly string[]): string {
  const file = join(dir, 'weather.yaml');
  writeFileSync(file, weatherConfigText(metrics, dimensions));
  return file;
}

/**
 * A config text over vega-datasets' flights-3m.parquet (US domestic flights, January to June 2001,
 * plus six stamped 1 July) counting flights, with any more metric lines (YAML flow mappings).
 */
export function flightsParquetConfigText(moreMetrics: readonly string[] = []): string {
  return `version: 1
datasets:
  - name: flights
    label: Flights
    source: { kind: parquet, paths: ["${vegaDataFile('flights-3m.parquet')}"] }
    time_column: date
    timezone: UTC
    metrics:
      - { name: flights, label: Flights, count: rows, unit: count, kind: flow }
${moreMetrics.map((m) => `      - ${m}\n`).join('')}`;
}

/** vega-datasets' movies.json (films with their grosses and release dates, "Jun 12 1998") and its release date as a DuckDB expression. */
export const MOVIES_FILE = vegaDataFile('movies.json');
export const MOVIES_RELEASE = `strptime("Release Date", '%b %d %Y')`;

/** A config text over movies.json dated by release, with the given metric and dimension lines (YAML flow mappings). */
export function moviesConfigText(metrics: readonly string[], dimensions: readonly string[] = []): string {
  return `version: 1
datasets:
  - name: movies
    label: Movies
    source: { kind: json, paths: ["${MOVIES_FILE}"] }
    time_column: { expr: '${MOVIES_RELEASE.replace(/'/g, "''")}' }
    timezone: UTC
    metrics:
${metrics.map((m) => `      - ${m}`).join('\n')}
    dimensions:${dimensions.length ? `\n${dimensions.map((d) => `      - ${d}`).join('\n')}` : ' []'}
`;
}

/** vega-datasets' unemployment-across-industries.json (US BLS unemployed persons in thousands by industry, monthly, 2000–2010). */
export const UNEMPLOYMENT_JSON = vegaDataFile('unemployment-across-industries.json');

/**
 * A config text over unemployment-across-industries.json: unemployed persons as a level (a count
 * held at each month, summed across industries on a date), in the given unit, by industry.
 */
export function unemploymentConfigText(unit: 'count' | 'number'): string {
  return `version: 1
datasets:
  - name: unemployment
    label: Unemployment by industry
    source: { kind: json, paths: ["${UNEMPLOYMENT_JSON}"] }
    time_column: date
    timezone: UTC
    metrics:
      - { name: unemployed, label: Unemployed, also_called: [unemployment], sum: count, unit: ${unit}, unit_label: thousand, kind: level, higher_is_better: false }
    dimensions:
      - { name: industry, label: Industry, also_called: [industries], column: series }
`;
}

/** vega-datasets' football.json: European league matches, 20 July 2013 to 28 May 2017, one row per match. */
export const FOOTBALL_JSON = vegaDataFile('football.json');

/**
 * A config text over football.json (dataset `football`, stamped by `date`, UTC) with the given
 * metric and dimension lines (YAML flow mappings), as a newcomer to the file would write it.
 */
export function footballConfigText(metrics: readonly string[], dimensions: readonly string[]): string {
  const lines = (xs: readonly string[]) => xs.map((x) => `      - ${x}\n`).join('');
  return `version: 1
datasets:
  - name: football
    label: Football matches
    source: { kind: json, paths: ["${FOOTBALL_JSON}"] }
    time_column: date
    timezone: UTC
    metrics:
${lines(metrics)}    dimensions:
${lines(dimensions)}`;
}
