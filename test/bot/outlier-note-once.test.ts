// Unusual periods are said once in a thread: under the answer that draws the periods, and in the
// summary statistics' own caption; not again under the seasonality and the trend test (issue 16:
// "under an answer goes only a note that changes that answer"). On vega-datasets' birdstrikes.csv
// (FAA wildlife strikes 1990-2002), whose monthly total cost has a few huge months (the test's own
// SQL finds the largest), with the config a newcomer wrote (test/reading/open-data-configs.ts).
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { expect, it } from 'vitest';
import { ask } from '../../cli/ask.js';
import { vegaDataFile } from '../helpers/open-data.js';
import { BIRDSTRIKES_CONFIG } from '../reading/open-data-configs.js';

it('a monthly cost thread names its unusual months under one answer only, and calls its days highest, not busiest', async () => {
  const out = mkdtempSync(join(tmpdir(), 'tc-outlier-once-'));
  writeFileSync(join(out, 'answers.yaml'), 'plan: go\n');
  const r = await ask({ configFile: BIRDSTRIKES_CONFIG, request: 'How has the total cost of strikes moved month by month?', answersFile: join(out, 'answers.yaml'), outDir: join(out, 'out'), now: new Date('2026-12-05T09:00:00Z') });
  expect(r.end).toBe('done');
  const answers = r.thread.thread.posts.filter((p) => p.author === 'threadcount' && /^\*\d+\. /.test(p.text));
  expect(answers.length).toBeGreaterThanOrEqual(3);
  // The largest month, by our own SQL over the file.
  const db = await DuckDBInstance.create(':memory:');
  const c = await db.connect();
  const top = (await c.runAndReadAll(`SELECT strftime(date_trunc('month', "Flight Date"), '%B %Y') AS m FROM read_csv_auto('${vegaDataFile('birdstrikes.csv')}') GROUP BY 1 ORDER BY SUM("Cost Total $") DESC LIMIT 1`)).getRowObjectsJson()[0]!.m as string;
  c.closeSync();
  db.closeSync();
  const notes = answers.filter((p) => /_Note: [^_]*unusual/.test(p.text));
  expect(notes).toHaveLength(1);
  expect(notes[0]!.text).toContain(top);
  // A cost has highs and lows, not busy and quiet days (Total cost is higher_is_better: false).
  const season = answers.find((p) => /day of week/i.test(p.text))!;
  expect(season.text).toMatch(/By day of week, \w+ is the highest/);
  expect(answers.map((p) => p.text).join('\n')).not.toMatch(/busiest|quietest/);
  // The notes that are there are each said once per answer.
  for (const p of answers) {
    const lines = p.text.split('\n').filter((l) => l.startsWith('_Note:'));
    expect(new Set(lines).size).toBe(lines.length);
  }
}, 300_000);
