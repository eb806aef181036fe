// "Which was the coldest month on record in New York?": the low end asked leads the answer, not
// the peak. On vega-datasets' weather.csv (daily readings for Seattle and New York, 2012-2015),
// with the coldest month found by the test's own SQL over the file.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { expect, it } from 'vitest';
import { ask } from '../../cli/ask.js';
import { WEATHER_CSV, writeWeatherConfig } from '../helpers/open-data.js';

it('"the coldest month on record" leads with the lowest month, then gives the highest', async () => {
  const dir = mkdtempSync(join(tmpdir(), 'tc-low-end-'));
  const config = writeWeatherConfig(dir, [
    '{ name: temp_max, label: Daily high temperature, average: temp_max, unit: number, unit_label: °C, kind: level }',
    '{ name: temp_min, label: Daily low temperature, average: temp_min, unit: number, unit_label: °C, kind: level }',
  ], [
    '{ name: location, label: City, column: location, also_called: [city] }',
  ]);
  writeFileSync(join(dir, 'answers.yaml'), 'plan: go\n');
  const r = await ask({ configFile: config, request: 'Which was the coldest month on record in New York?', answersFile: join(dir, 'answers.yaml'), outDir: join(dir, 'out'), now: new Date('2026-12-05T09:00:00Z') });
  expect(r.end).toBe('done');
  const db = await DuckDBInstance.create(':memory:');
  const c = await db.connect();
  const [low] = (await c.runAndReadAll(`SELECT strftime(date_trunc('month', date), '%B %Y') AS m, round(avg(temp_min), 2) AS v FROM read_csv_auto('${WEATHER_CSV}') WHERE location = 'New York' GROUP BY 1 ORDER BY avg(temp_min) LIMIT 1`)).getRowObjectsJson() as { m: string; v: number }[];
  c.closeSync();
  db.closeSync();
  // (Values and units are joined by a no-break space.)
  const first = r.thread.thread.posts.find((p) => /^\*1\. /.test(p.text))!.text.replace(/[\u00a0\u202f]/g, ' ');
  const v = Number(low!.v);
  expect(first).toMatch(new RegExp(`^\\*1\\. Daily low temperature was lowest in ${low!.m}, at ${v < 0 ? '−' : ''}${Math.abs(v).toFixed(2)} °C`));
  expect(first).toContain('its highest month was');
  expect(first).not.toMatch(/^\*1\. [^\n]*peaked/);
}, 300_000);
