// Stamp granularity read from the data. The public series are checked against what their
// publishers say they are: vega-datasets' co2-concentration.csv is NOAA's Mauna Loa monthly mean
// (one row per month, stamped on the 1st), seattle-weather.csv is one row per day (2012–2015).
import { describe, expect, it } from 'vitest';
import { parseConfigText } from '../../config/load.js';
import { openWorkspace } from '../../analysis/workspace.js';
import { memoryWorkspace } from './templates/trend-memory-db.js';
import { vegaDataFile } from '../helpers/open-data.js';


async function stampsOfCsv(file: string, timeColumn: string): Promise<string | undefined> {
  const config = parseConfigText(
    `version: 1
datasets:
  - name: series
    label: Series
    source: { kind: csv, paths: ["${vegaDataFile(file)}"] }
    table: series
    time_column: ${timeColumn}
    timezone: UTC
    metrics:
      - { name: rows, label: Rows, definition: { type: count }, unit: count, higher_is_better: true }
`,
    '/virtual/stamps.yaml',
  );
  const ws = await openWorkspace(config);
  try {
    return ws.coverage.stamps;
  } finally {
    await ws.source.close();
  }
}

async function stampsOf(select: string): Promise<string | undefined> {
  const ws = await memoryWorkspace(
    [`CREATE TABLE t AS ${select}`],
    `version: 1
datasets:
  - name: t
    label: T
    source: { kind: duckdb, path: unused.duckdb }
    table: t
    time_column: d
    timezone: UTC
    metrics:
      - { name: rows, label: Rows, definition: { type: count }, unit: count, higher_is_better: true }
`,
  );
  try {
    return ws.coverage.stamps;
  } finally {
    await ws.source.close();
  }
}

describe('stamp granularity', () => {
  it('reads the Mauna Loa monthly means as monthly', async () => {
    expect(await stampsOfCsv('co2-concentration.csv', 'Date')).toBe('monthly');
  });
  it('reads the Seattle daily record as daily', async () => {
    expect(await stampsOfCsv('seattle-weather.csv', 'date')).toBe('daily');
  });
  it('keeps weekday-only data daily, and tells weekly, quarterly, yearly and irregular stamps apart', async () => {
    const days = (n: number, step: string, where = 'true') =>
      `SELECT CAST(DATE '2020-01-06' + CAST(${step} AS INTEGER) AS DATE) AS d FROM range(${n}) r(i) WHERE ${where}`;
    expect(await stampsOf(days(400, 'i', 'isodow(DATE \'2020-01-06\' + CAST(i AS INTEGER)) <= 5'))).toBe('daily');
    expect(await stampsOf(days(80, 'i * 7'))).toBe('weekly');
    expect(await stampsOf(`SELECT CAST(DATE '2001-01-01' + INTERVAL (3 * i) MONTH AS DATE) AS d FROM range(30) r(i)`)).toBe('quarterly');
    expect(await stampsOf(`SELECT CAST(DATE '1990-07-01' + INTERVAL (i) YEAR AS DATE) AS d FROM range(30) r(i)`)).toBe('yearly');
    expect(await stampsOf(days(40, 'i * i'))).toBe('irregular');
  });
});
