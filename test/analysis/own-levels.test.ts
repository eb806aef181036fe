// A level asked across entities (catalog.ts ownLevelDimension, bot/brief-defaults.ts, the
// mixed_levels caution): checked on vega-datasets' stocks.csv (monthly prices of five symbols,
// 2000–2010, one row a symbol a month), weather.csv (NOAA daily weather, Seattle and New York,
// one row a city a day) and flights-3m.parquet (US flights, January–June 2001). Every figure is
// set against the test's own DuckDB SQL over the file.
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { ownLevelDimension, OWN_READING_SHARE, metricByName } from '../../analysis/catalog.js';
import { parseConfigText } from '../../config/load.js';
import { useFileWorkspace } from '../helpers/workspace-checks.js';
import { askPostTexts } from '../helpers/run-cli.js';
import { flightsParquetConfigText, vegaDataFile, weatherConfigText, WEATHER_CSV } from '../helpers/open-data.js';

const STOCKS_CSV = vegaDataFile('stocks.csv');
const STOCKS_DATE = `strptime(date, '%b %d %Y')`;

function stocksConfigText(): string {
  return `version: 1
datasets:
  - name: stocks
    label: Stocks
    source: { kind: csv, paths: ["${STOCKS_CSV}"] }
    time_column: { expr: "${STOCKS_DATE}" }
    timezone: UTC
    metrics:
      - { name: price, label: Price, average: price, unit: currency, currency: USD, kind: level }
    dimensions:
      - { name: symbol, label: Symbol, column: symbol }
`;
}

describe('stocks.csv: price across symbols', () => {
  const { ws, own } = useFileWorkspace(parseConfigText(stocksConfigText(), join(tmpdir(), 'stocks.yaml')), 'stocks');

  it('symbols carry their own price level: medians, factor and GOOG entering agree with the own SQL', async () => {
    const e = ownLevelDimension(ws().dataset, metricByName(ws().dataset, 'price'));
    const rows = await own(`SELECT symbol, median(price) AS med, CAST(min(${STOCKS_DATE}) AS DATE)::VARCHAR AS first_day, count(*) AS n
      FROM read_csv('${STOCKS_CSV}') GROUP BY 1 ORDER BY med`);
    expect(e).not.toBeNull();
    expect(e!.dimension).toBe('symbol');
    expect(e!.members).toBe(rows.length);
    const low = rows[0]!;
    const high = rows[rows.length - 1]!;
    expect(e!.lowest.value).toBe(low.symbol);
    expect(e!.lowest.median).toBeCloseTo(Number(low.med), 6);
    expect(e!.highest.value).toBe(high.symbol);
    expect(e!.highest.median).toBeCloseTo(Number(high.med), 6);
    expect(e!.factor).toBeCloseTo(Number(high.med) / Number(low.med), 6);
    // The first month of the data is the earliest symbol's; later starters are those entering.
    const first = rows.map((r) => String(r.first_day)).sort()[0]!;
    const late = rows.filter((r) => String(r.first_day) > first).map((r) => ({ value: String(r.symbol), first: String(r.first_day) }));
    expect(late.length).toBeGreaterThan(0);
    expect(e!.entering.map((m) => ({ value: m.value, first: m.first.slice(0, 10) }))).toEqual(late);
    expect(e!.leaving).toEqual([]);
  });

  it('one symbol named leaves nothing to average across', () => {
    const price = metricByName(ws().dataset, 'price');
    expect(ownLevelDimension(ws().dataset, price, [{ dimension: 'symbol', values: ['MSFT'] }])).toBeNull();
    // Two kept: still two entities, the medians read among those two only.
    const two = ownLevelDimension(ws().dataset, price, [{ dimension: 'symbol', values: ['AAPL', 'IBM'] }]);
    expect(two?.members).toBe(2);
    expect([two?.lowest.value, two?.highest.value].sort()).toEqual(['AAPL', 'IBM']);
  });
});

describe('weather.csv: temperature across cities, not across weather types', () => {
  const config = parseConfigText(
    weatherConfigText(
      [
        '{ name: temp_max, label: Daily high temperature, average: temp_max, unit: number, unit_label: °C, kind: level }',
        '{ name: precipitation, label: Precipitation, sum: precipitation, unit: number, unit_label: mm, kind: flow }',
      ],
      ['{ name: weather, label: Weather type, column: weather }', '{ name: location, label: City, column: location }'],
    ),
    join(tmpdir(), 'weather.yaml'),
  );
  const { ws, own } = useFileWorkspace(config, 'weather');

  it('city is the entity (one reading a day), weather type is not (two cities share a type on a day); a flow is never read', async () => {
    const shares = await own(`WITH c AS (SELECT 'location' AS d, location AS v, date, count(*) AS n FROM read_csv('${WEATHER_CSV}') GROUP BY ALL
        UNION ALL SELECT 'weather', weather, date, count(*) FROM read_csv('${WEATHER_CSV}') GROUP BY ALL)
      SELECT d, avg(CASE WHEN n = 1 THEN 1.0 ELSE 0.0 END) AS single FROM c GROUP BY d ORDER BY d`);
    const single = Object.fromEntries(shares.map((r) => [String(r.d), Number(r.single)]));
    expect(single.location).toBe(1);
    expect(single.weather).toBeLessThan(OWN_READING_SHARE);
    const e = ownLevelDimension(ws().dataset, metricByName(ws().dataset, 'temp_max'));
    expect(e?.dimension).toBe('location');
    const meds = await own(`SELECT location, median(temp_max) AS med FROM read_csv('${WEATHER_CSV}') GROUP BY 1 ORDER BY med`);
    expect(e!.lowest).toEqual({ value: String(meds[0]!.location), median: Number(meds[0]!.med) });
    // °C has no true zero: no "times as high".
    expect(e!.factor).toBeNull();
    expect(metricByName(ws().dataset, 'precipitation').ownLevels).toBeUndefined();
    expect(ownLevelDimension(ws().dataset, metricByName(ws().dataset, 'precipitation'))).toBeNull();
  });
});

describe('flights-3m.parquet: a per-flight average is no level across airports', () => {
  const text = `${flightsParquetConfigText(['{ name: delay, label: Average delay, average: delay, unit: number, unit_label: min, kind: ratio }', '{ name: delay_level, label: Delay level, average: delay, unit: number, unit_label: min, kind: level }'])}    dimensions:
      - { name: origin, label: Origin airport, column: origin }
`;
  const { ws, own } = useFileWorkspace(parseConfigText(text, join(tmpdir(), 'flights.yaml')), 'flights');

  it('delay (a ratio) is not read; even declared a level, airports hold many flights a stamp, so no entities', async () => {
    expect(metricByName(ws().dataset, 'delay').ownLevels).toBeUndefined();
    expect(ownLevelDimension(ws().dataset, metricByName(ws().dataset, 'delay'))).toBeNull();
    const [r] = await own(`SELECT avg(CASE WHEN n = 1 THEN 1.0 ELSE 0.0 END) AS single FROM (SELECT origin, date, count(*) AS n FROM read_parquet('${vegaDataFile('flights-3m.parquet')}') GROUP BY ALL)`);
    expect(Number(r!.single)).toBeLessThan(OWN_READING_SHARE);
    expect(ownLevelDimension(ws().dataset, metricByName(ws().dataset, 'delay_level'))).toBeNull();
  }, 120_000);
});

describe('threadcount ask on stocks.csv', () => {
  it('"how has the price moved?" answers per symbol first, says why on the card, and cautions the combined line', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'tc-own-levels-'));
    const config = join(dir, 'stocks.yaml');
    writeFileSync(config, stocksConfigText());
    const out = join(dir, 'out');
    const posts = await askPostTexts(config, 'how has the price moved?', out);
    const card = posts[1]!;
    expect(card).toMatch(/\*Breakdowns:\* Symbol \(assumed\) _\(assumed: price is a level each symbol holds of its own \(medians run from \S+ \(MSFT\) to \S+ \(GOOG\), 17 times as high; GOOG enters only in August 2004\)/);
    expect(card).toMatch(/1\. Price by symbol over time/);
    const answers = posts.filter((p) => /^\*\d+\. /.test(p));
    expect(answers[0]).toMatch(/Among symbols/);
    const combined = answers.slice(1);
    expect(combined.length).toBeGreaterThan(0);
    // The caution is said once, in the summary's notes about the data, not under each combined answer.
    const summary = posts.find((p) => p.startsWith('*Summary*'))!;
    expect(summary).toContain('A figure of price across all symbols averages 5 symbols');
    expect(posts.join('\n').split('averages 5 symbols').length - 1).toBe(1);
    expect(answers[0]).not.toContain('averages 5 symbols');
    // The per-symbol means of the first answer's table against the test's own SQL.
    const csv = readFileSync(join(out, 'tables', '01-segment_trend-price-segment_totals.csv'), 'utf8').trim().split('\n');
    const head = csv[0]!.split(',');
    const table = new Map(csv.slice(1).map((l) => l.split(',')).map((c) => [c[head.indexOf('segment')]!, Number(c[head.indexOf('value')])]));
    const { DuckDBInstance } = await import('@duckdb/node-api');
    const db = await DuckDBInstance.create(':memory:');
    const conn = await db.connect();
    const rows = (await conn.runAndReadAll(`SELECT symbol, avg(price) FROM read_csv('${STOCKS_CSV}') GROUP BY 1`)).getRows();
    conn.closeSync();
    expect(table.size).toBe(rows.length);
    for (const [symbol, mean] of rows) expect(table.get(String(symbol))).toBeCloseTo(Number(mean), 6);
  }, 180_000);

  it('a symbol named ("how has MSFT\'s price moved?") keeps to it: no breakdown assumed, no caution', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'tc-own-levels-'));
    const config = join(dir, 'stocks.yaml');
    writeFileSync(config, stocksConfigText());
    const posts = await askPostTexts(config, "how has MSFT's price moved?", join(dir, 'out'));
    expect(posts[1]).toContain('*Breakdowns:* none');
    expect(posts.join('\n')).not.toContain('averages 5 symbols');
  }, 180_000);
});
