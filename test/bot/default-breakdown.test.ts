// The breakdown a change is explained by when the request names none: the one whose values
// persist through the data (bot/brief-defaults.ts defaultBreakdown), said on the card with why.
// Run through `threadcount ask` on vega-datasets' weather.csv (NOAA daily weather, Seattle and
// New York, 2012–2015), its catalog listing weather type before city; the persistence of each
// dimension is computed here by DuckDB SQL over the file.
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { expect, it } from 'vitest';
import { askPostTexts } from '../helpers/run-cli.js';
import { WEATHER_CSV, writeWeatherConfig } from '../helpers/open-data.js';

const csv = WEATHER_CSV;

/** The mean over a column's values of the share of the data's months each has rows in. */
async function persistence(column: string): Promise<number> {
  const db = await DuckDBInstance.create(':memory:');
  const c = await db.connect();
  const rows = (await c.runAndReadAll(`WITH m AS (SELECT count(DISTINCT date_trunc('month', date)) AS n FROM read_csv('${csv}'))
    SELECT avg(k / m.n) FROM (SELECT ${column}, count(DISTINCT date_trunc('month', date)) AS k FROM read_csv('${csv}') GROUP BY 1), m`)).getRows();
  c.closeSync();
  return Number(rows[0]![0]);
}

it('weather.csv: city, whose values are there every month, is chosen over weather type, listed first', async () => {
  const dir = mkdtempSync(join(tmpdir(), 'tc-breakdown-'));
  const config = writeWeatherConfig(dir, [
    '{ name: precipitation, label: Precipitation, sum: precipitation, unit: number, unit_label: mm, kind: flow, also_called: [rain, rainfall] }',
  ], [
    '{ name: weather, label: Weather type, column: weather }',
    '{ name: location, label: City, column: location }',
  ]);
  const out = join(dir, 'out');
  const posts = (await askPostTexts(config, 'how did rainfall grow in 2015?', out)).join('\n');
  const [city, type] = [await persistence('location'), await persistence('weather')];
  expect(city - type).toBeGreaterThan(0.1);
  const pct = (x: number) => `${Math.round(x * 100)}%`;
  expect(posts).toContain(`*Breakdowns:* City (assumed) _(assumed: a change is easier to act on with what drove it; city, whose values persist through the data (each is in ${pct(city)} of its months on average, against ${pct(type)} for weather type); name another breakdown to change it)_`);
  expect(posts).toMatch(/Which cities drove the change in precipitation/);
});
