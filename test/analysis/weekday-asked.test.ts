// "What's the busiest day of the week?" is answered with the days of the week first: the card's
// question, the answer's headline (which is also its chart's title) and the summary's first line
// name the busiest weekday; the months follow in the caption. On vega-datasets' birdstrikes.csv
// (FAA wildlife strike reports, daily dates 1990-2002). Expected values from the test's own SQL:
// strikes per ISO weekday (DuckDB isodow) divided by how many of that weekday the data spans,
// against the mean of the seven.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { describe, expect, it } from 'vitest';
import { vegaDataFile } from '../helpers/open-data.js';

const dir = mkdtempSync(join(tmpdir(), 'tc-weekday-'));
const CONFIG = join(dir, 'birds.yaml');
writeFileSync(
  CONFIG,
  `version: 1
datasets:
  - name: birdstrikes
    label: Wildlife strikes
    source: { kind: csv, paths: [${vegaDataFile('birdstrikes.csv')}] }
    time_column: Flight Date
    timezone: UTC
    metrics:
      - { name: strikes, label: Strikes, count: rows, unit: count, higher_is_better: false, kind: flow }
    dimensions:
      - { name: phase_of_flight, label: Phase of flight, column: Phase of flight }
`,
);
const DAYS = ['Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday', 'Sunday'];

async function weekdayIndices(): Promise<{ day: string; index: number }[]> {
  const inst = await DuckDBInstance.create(':memory:');
  const con = await inst.connect();
  const r = await con.runAndReadAll(`WITH d AS (SELECT "Flight Date"::DATE AS fd FROM read_csv_auto('${vegaDataFile('birdstrikes.csv')}')),
    spanned AS (SELECT isodow(x) AS dow, count(*) AS n FROM generate_series((SELECT min(fd) FROM d), (SELECT max(fd) FROM d), INTERVAL 1 DAY) t(x) GROUP BY 1),
    strikes AS (SELECT isodow(fd) AS dow, count(*) AS c FROM d GROUP BY 1)
    SELECT dow, (c / n) / avg(c / n) OVER () AS idx FROM strikes JOIN spanned USING (dow) ORDER BY idx DESC`);
  const rows = r.getRowObjectsJson().map((row) => ({ day: DAYS[Number(row['dow']) - 1]!, index: Number(row['idx']) }));
  con.closeSync();
  return rows;
}

describe('the busiest day of the week leads its answer', () => {
  it('card, headline and summary name the weekday the SQL finds busiest, with its distance from an average day', async () => {
    const days = await weekdayIndices();
    const top = days[0]!;
    const pct = `${((top.index - 1) * 100).toFixed(1)}%`;
    const { ask } = await import('../../cli/ask.js');
    writeFileSync(join(dir, 'go.yaml'), 'plan: go\n');
    const out = await ask({ configFile: CONFIG, request: "what's the busiest day of the week for strikes?", answersFile: join(dir, 'go.yaml'), outDir: join(dir, 'out'), now: new Date('2026-12-05T09:00:00Z') });
    const texts = out.thread.thread.posts.filter((p) => p.author === 'threadcount').map((p) => p.text);
    const card = texts.find((t) => t.startsWith('*Here is what I understood.*')) ?? '';
    expect(card).toMatch(/Which days of the week strikes are highest and lowest on/);
    expect(card).toMatch(/1\. Which days of the week are busiest and quietest for strikes/);
    const first = texts.find((t) => t.startsWith('*1. '));
    expect(first).toContain(`*1. ${top.day} is the busiest day of the week (about ${pct} above an average day)*`);
    // The months still follow in the caption.
    expect(first).toMatch(/above an average month/);
    const summary = texts.find((t) => t.startsWith('*Summary*')) ?? '';
    expect(summary.split('\n')[1]).toContain(`${top.day} is the busiest day of the week`);
  }, 300_000);
});
