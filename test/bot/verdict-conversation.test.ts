// The verdict first (issue 17 item 7), as a whole conversation on the demo data (invented
// Skerrywake bookings, ending 18 June 2025): a yes-or-no request about the year so far gets its
// answer as the summary's first line, and the figure agrees with a plain reduction of the raw rows.
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { beforeAll, describe, expect, it } from 'vitest';
import type { RecordedThread } from '../../adapters/file-thread/FileThread.js';
import { ask } from '../../cli/ask.js';
import { demoFixture } from '../helpers/demo-fixture.js';

let dir: string;
let thread: RecordedThread;
let databasePath: string;

beforeAll(async () => {
  const demo = await demoFixture();
  databasePath = demo.databasePath;
  dir = mkdtempSync(join(tmpdir(), 'tc-verdict-'));
  writeFileSync(join(dir, 'answers.yaml'), 'audience: managers\ngrain: month\nwindow: all\nplan: go\n');
  const r = await ask({
    configFile: demo.configPath,
    request: 'Is revenue growing on last year so far this year?',
    answersFile: join(dir, 'answers.yaml'),
    outDir: join(dir, 'out'),
    now: new Date('2025-06-19T09:00:00Z'),
  });
  expect(r.end).toBe('done');
  thread = r.thread.thread;
}, 300_000);

/** Revenue from 1 January to 18 June of a year, summed from the raw rows in plain JavaScript. */
async function revenueToJune18(year: number): Promise<number> {
  const db = await DuckDBInstance.create(databasePath, { access_mode: 'READ_ONLY' });
  const con = await db.connect();
  const reader = await con.runAndReadAll('SELECT CAST(sail_date AS VARCHAR) AS d, CAST(fare_total AS VARCHAR) AS f FROM bookings');
  let total = 0;
  for (const [d, f] of reader.getRows() as [string, string][]) {
    if (d >= `${year}-01-01` && d <= `${year}-06-18`) total += Number(f);
  }
  con.closeSync();
  db.closeSync();
  return total;
}

describe('"Is revenue growing on last year so far this year?"', () => {
  it('answers first, with the year so far against the same dates a year earlier', async () => {
    const summary = thread.posts.find((p) => p.author === 'threadcount' && p.text.startsWith('*Summary*'))!;
    const first = summary.text.split('\n')[1]!;
    const change = (await revenueToJune18(2025)) / (await revenueToJune18(2024)) - 1;
    // The demo's 2025 runs below 2024 so far, so the answer to "growing?" is no.
    expect(change).toBeLessThan(-0.01);
    const pct = (Math.abs(change) * 100).toFixed(1);
    expect(first).toMatch(new RegExp(`^- No: revenue is ${pct.replace('.', '\\.')}% below last year so far \\(January to 18 June\\)\\. \\(see \\d+\\)$`));
    // The answer it points to is the growth answer, which states the same figure.
    const see = Number(/\(see (\d+)\)$/.exec(first)![1]);
    const answer = thread.posts.find((p) => p.text.startsWith(`*${see}. `))!;
    expect(answer.text).toContain(`2025 so far: −${pct}%`);
  });

  it('still lists the other takeaways after the verdict, and sends the digest', () => {
    const summary = thread.posts.find((p) => p.author === 'threadcount' && p.text.startsWith('*Summary*'))!;
    const lines = summary.text.split('\n').filter((l) => l.startsWith('- ') && /\(see \d+\)$/.test(l));
    expect(lines.length).toBeGreaterThan(2);
    expect(summary.files.map((f) => f.kind)).toEqual(['digest']);
    const png = readFileSync(join(dir, 'out', summary.files[0]!.path));
    expect(png.readUInt32BE(16)).toBe(1600);
  });
});
