// Text dates read by a config expression, strptime(date, '%b %d %Y'), on both engines: vega-datasets'
// stocks.csv (symbol,date,price; dates written "Jan 1 2000"), read by DuckDB from the file and by
// PostgreSQL from a table loaded from it as text. What the data covers is checked against the file
// read in plain JavaScript: 560 rows, the 1st of each month from January 2000 to March 2010.
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openWorkspace, type Workspace } from '../../analysis/workspace.js';
import { parseConfigText, type LoadedConfig } from '../../config/load.js';
import { ExpressionError, parseExpression } from '../../config/expression.js';
import { describeWithPostgres, dropSchema, onPostgres, uniqueName, withClient } from '../helpers/postgres.js';

const csv = join(dirname(dirname(createRequire(import.meta.url).resolve('vega-datasets'))), 'data', 'stocks.csv');
const lines = readFileSync(csv, 'utf8').trim().split('\n').slice(1).map((l) => l.split(','));
const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];
const isoDates = lines.map(([, date]) => {
  const [mon, day, year] = date!.split(' ');
  return `${year}-${String(MONTHS.indexOf(mon!) + 1).padStart(2, '0')}-${day!.padStart(2, '0')}`;
}).sort();

const config: LoadedConfig = parseConfigText(
  `version: 1
datasets:
  - name: stocks
    label: Stocks
    source: { kind: csv, path: "${csv}" }
    table: stocks
    time_column: { expr: "strptime(date, '%b %d %Y')" }
    timezone: UTC
    metrics:
      - { name: price, label: Share price, average: price, unit: currency, currency: USD, higher_is_better: true, kind: level }
`,
  '/virtual/stocks.yaml',
);

function expectCoverage(ws: Workspace): void {
  expect(ws.coverage.rows).toBe(lines.length);
  expect(ws.coverage.firstDate).toBe(isoDates[0]);
  expect(ws.coverage.lastDate).toBe(isoDates[isoDates.length - 1]);
  expect(ws.coverage.stamps).toBe('monthly');
}

describe('strptime in a config expression', () => {
  it('takes a format of known codes, and refuses others and a format that is not a quoted text', () => {
    expect(parseExpression("try_strptime(date, '%d/%m/%Y')")).toMatchObject({ type: 'call', fn: 'strptime' });
    expect(() => parseExpression("strptime(date, '%b %d %Y %Z')")).toThrow(ExpressionError);
    expect(() => parseExpression("strptime(date, '%b x %Y')")).toThrow(/outside a % code/);
    expect(() => parseExpression('strptime(date, fmt)')).toThrow(/not a quoted text/);
    expect(() => parseExpression("strptime(date, '%m-%d')")).toThrow(/no year/);
  });
});

describe('text dates on DuckDB (CSV file)', () => {
  let ws: Workspace;
  beforeAll(async () => {
    ws = await openWorkspace(config);
  });
  afterAll(async () => ws?.source.close());
  it('reads the dates the file holds', () => expectCoverage(ws));
});

describeWithPostgres('text dates on PostgreSQL (table loaded from the CSV, dates as text)', (adminUrl) => {
  const schema = uniqueName('tc_textdate');
  let ws: Workspace;
  beforeAll(async () => {
    await withClient(adminUrl, async (c) => {
      await c.query(`CREATE SCHEMA "${schema}"`);
      await c.query(`CREATE TABLE "${schema}".stocks (symbol TEXT, date TEXT, price DOUBLE PRECISION)`);
      await c.query(`INSERT INTO "${schema}".stocks VALUES ${lines.map((_, j) => `($${j * 3 + 1}, $${j * 3 + 2}, $${j * 3 + 3})`).join(', ')}`, lines.flat());
    });
    ws = await openWorkspace(onPostgres(config, 'TC_TEXTDATE_URL', schema), undefined, { TC_TEXTDATE_URL: adminUrl });
  });
  afterAll(async () => {
    await ws?.source.close();
    await dropSchema(adminUrl, schema);
  });
  it('reads the same dates', () => expectCoverage(ws));
});
