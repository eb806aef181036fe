// Two open datasets of vega-datasets loaded as DuckDB tables, with one config each, for template
// tests that check answers against their own SQL or JavaScript on the raw files: US domestic
// flights of Q1 2001 (flights-20k.json, 20,000 flights with their delay in minutes) and FAA wildlife
// strike reports 1990–2002 (birdstrikes.csv, 10,000 reports).
import { vegaDataFile } from '../../helpers/open-data.js';
import { memoryWorkspace } from './trend-memory-db.js';

export const FLIGHTS_JSON = vegaDataFile('flights-20k.json');
export const STRIKES_CSV = vegaDataFile('birdstrikes.csv');

const quoted = (path: string) => `'${path.replaceAll("'", "''")}'`;
/** The flights as a table `flights`: departure time parsed from the file's "2001/01/01 00:47" text. */
export const FLIGHTS_TABLE = `CREATE TABLE flights AS SELECT strptime(date, '%Y/%m/%d %H:%M') AS departed, delay, distance, origin, destination FROM read_json(${quoted(FLIGHTS_JSON)})`;
/** The strike reports as a table `strikes`, every column as DuckDB reads the CSV. */
export const STRIKES_TABLE = `CREATE TABLE strikes AS SELECT * FROM read_csv(${quoted(STRIKES_CSV)}, header = true)`;

export const FLIGHTS_CONFIG = `
version: 1
datasets:
  - name: flights
    label: Flights (vega-datasets)
    source: { kind: duckdb, path: unused.duckdb }
    table: flights
    time_column: departed
    timezone: UTC
    metrics:
      - name: flights
        label: Flights
        count: rows
        unit: count
        kind: flow
      - name: avg_delay
        label: Average delay
        average: delay
        unit: number
        unit_label: min
        decimals: 1
        higher_is_better: false
        kind: ratio
    dimensions:
      - name: origin
        label: Origin airport
        column: origin
`;

export const STRIKES_CONFIG = `
version: 1
datasets:
  - name: strikes
    label: Wildlife strikes (vega-datasets)
    source: { kind: duckdb, path: unused.duckdb }
    table: strikes
    time_column: Flight Date
    timezone: UTC
    metrics:
      - name: strikes
        label: Strikes
        count: rows
        unit: count
        higher_is_better: false
        kind: flow
      - name: cost_total
        label: Total cost
        sum: '"Cost Total $"'
        unit: currency
        currency: USD
        higher_is_better: false
        kind: flow
      - name: speed
        label: Speed
        average: '"Speed IAS in knots"'
        unit: number
        unit_label: kt
        kind: level
    dimensions:
      - name: airport
        label: Airport
        column: Airport Name
`;

export const flightsWorkspace = () => memoryWorkspace([FLIGHTS_TABLE], FLIGHTS_CONFIG);
export const strikesWorkspace = () => memoryWorkspace([STRIKES_TABLE], STRIKES_CONFIG);
