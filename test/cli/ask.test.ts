// The first path end to end through the real parts: demo DuckDB file -> scripted conversation
// -> SQL -> chart PNG + caption + CSV in a thread folder. The expected numbers are recomputed
// independently from the raw rows (a plain reduction in JS, not the same SQL).
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { loadImage, createCanvas } from '@napi-rs/canvas';
import { beforeAll, describe, expect, it } from 'vitest';
import { formatPeriod, formatValue } from '../../analysis/format.js';
import type { RecordedThread } from '../../adapters/file-thread/FileThread.js';
import { ask } from '../../cli/ask.js';
import { demoFixture } from '../helpers/demo-fixture.js';

const now = new Date('2026-12-01T09:00:00Z');
let configPath: string;
let databasePath: string;

beforeAll(async () => {
  const demo = await demoFixture();
  configPath = demo.configPath;
  databasePath = demo.databasePath;
});

function tmp(name: string): string {
  return mkdtempSync(join(tmpdir(), `threadcount-${name}-`));
}

function parseCsv(text: string): Record<string, string>[] {
  // The series CSV has no quoted fields (dates and numbers only).
  const [head, ...rows] = text.trim().split('\n');
  const cols = head!.split(',');
  return rows.map((r) => Object.fromEntries(r.split(',').map((v, i) => [cols[i]!, v])));
}

/** Monthly revenue by a plain reduction over every raw row of the file. */
async function monthlyRevenueFromRawRows(): Promise<Map<string, number>> {
  const db = await DuckDBInstance.create(databasePath, { access_mode: 'READ_ONLY' });
  const con = await db.connect();
  const reader = await con.runAndReadAll('SELECT CAST(sail_date AS VARCHAR) AS d, CAST(fare_total AS VARCHAR) AS f FROM bookings');
  const totals = new Map<string, number>();
  for (const [d, f] of reader.getRows() as [string, string][]) {
    const month = `${d.slice(0, 7)}-01`;
    totals.set(month, (totals.get(month) ?? 0) + Number(f));
  }
  con.closeSync();
  db.closeSync();
  return totals;
}

describe('threadcount ask on the demo data', () => {
  let out: string;
  let thread: RecordedThread;

  beforeAll(async () => {
    out = tmp('ask');
    const answers = join(out, 'answers.yaml');
    writeFileSync(answers, 'audience: leadership\ndeadline: "2026-12-15"\ngrain: month\nwindow: all\nplan: go\n');
    const result = await ask({
      configFile: configPath,
      request: 'How has our revenue moved over time?',
      answersFile: answers,
      outDir: join(out, 'thread'),
      now,
    });
    expect(result.end).toBe('done');
    thread = JSON.parse(readFileSync(result.threadFile, 'utf8')) as RecordedThread;
  });

  it('asks only what the request did not say, then proposes a plan', () => {
    const topics = thread.posts.map((p) => p.promptTopic).filter(Boolean);
    // The request names the metric: nothing is asked; audience, deadline, grain and period are defaulted on the card.
    expect(topics).toEqual([]);
    expect(thread.posts.some((p) => p.author === 'threadcount' && p.text.startsWith('*Here is what I understood.*'))).toBe(true);
    expect(thread.posts[0]).toMatchObject({ author: 'requester', text: 'How has our revenue moved over time?' });
  });

  it('posts a chart of the stated size that is not blank', async () => {
    const chart = thread.posts.flatMap((p) => p.files).find((f) => f.kind === 'chart');
    expect(chart).toBeDefined();
    const img = await loadImage(readFileSync(join(out, 'thread', chart!.path)));
    expect([img.width, img.height]).toEqual([1200, 675]);
    const canvas = createCanvas(img.width, img.height);
    const ctx = canvas.getContext('2d');
    ctx.drawImage(img, 0, 0);
    const { data } = ctx.getImageData(0, 0, img.width, img.height);
    const colours = new Set<number>();
    let nonWhite = 0;
    for (let i = 0; i < data.length; i += 4 * 7) {
      colours.add((data[i]! << 16) | (data[i + 1]! << 8) | data[i + 2]!);
      if (data[i]! < 240 || data[i + 1]! < 240 || data[i + 2]! < 240) nonWhite++;
    }
    expect(colours.size).toBeGreaterThan(20);
    expect(nonWhite).toBeGreaterThan(2000);
  });

  it('states the peak and low in the caption with the same numbers as the CSV', () => {
    const answer = thread.posts.find((p) => p.files.some((f) => f.kind === 'table'))!;
    const csv = parseCsv(readFileSync(join(out, 'thread', answer.files.find((f) => f.kind === 'table')!.path), 'utf8'));
    // June 2025 is partial in the demo (data ends 18 June) and must not be the low.
    const complete = csv.filter((r) => r.period !== '2025-06-01');
    const max = complete.reduce((a, b) => (Number(b.revenue) > Number(a.revenue) ? b : a));
    const min = complete.reduce((a, b) => (Number(b.revenue) < Number(a.revenue) ? b : a));
    const fmt = { unit: 'currency' as const, currency: 'EUR', locale: 'en-IE' };
    expect(answer.text).toContain(`peaked in ${formatPeriod(max.period!, 'month', 'en-IE', 'long')} at ${formatValue(Number(max.revenue), fmt, { compact: true })}`);
    expect(answer.text).toContain(`${formatPeriod(min.period!, 'month', 'en-IE', 'long')} at ${formatValue(Number(min.revenue), fmt, { compact: true })}`);
    // The partial last month is about the data, not this answer: said once, in the summary.
    expect(answer.text).not.toMatch(/June 2025 is partial/);
    const summary = thread.posts.find((p) => p.text.startsWith('*Summary*'))!;
    expect(summary.text).toMatch(/The data ends on 18 June 2025, so June 2025 is partial/);
  });

  it('says thread-wide data notes once, in the summary, never under each answer', () => {
    const summary = thread.posts.find((p) => p.text.startsWith('*Summary*'))!;
    // Planted warts of the demo: repeated booking ids and negative fares.
    expect(summary.text).toMatch(/repeat a booking_id that should be unique/);
    for (const post of thread.posts.filter((p) => p !== summary)) {
      expect(post.text).not.toMatch(/repeat a booking_id|The data ends on|days ago/);
    }
  });

  it('matches monthly totals recomputed from the raw rows, and finds July/August busiest', async () => {
    const answer = thread.posts.find((p) => p.files.some((f) => f.kind === 'table'))!;
    const csv = parseCsv(readFileSync(join(out, 'thread', answer.files.find((f) => f.kind === 'table')!.path), 'utf8'));
    const raw = await monthlyRevenueFromRawRows();
    expect(csv.length).toBe(raw.size);
    for (const row of csv) {
      const expected = raw.get(row.period!);
      expect(expected, row.period).toBeDefined();
      expect(Math.abs(Number(row.revenue) - expected!)).toBeLessThan(1e-6 * Math.abs(expected!) + 0.01);
    }
    // Planted seasonality: in every full year the top month is July or August.
    for (const year of ['2022', '2023', '2024']) {
      const months = csv.filter((r) => r.period!.startsWith(year));
      const top = months.reduce((a, b) => (Number(b.revenue) > Number(a.revenue) ? b : a));
      expect(['07', '08']).toContain(top.period!.slice(5, 7));
    }
  });

  it('attaches the SQL that ran, with its parameters', () => {
    const sqlFile = thread.posts.flatMap((p) => p.files).find((f) => f.kind === 'sql')!;
    const sql = readFileSync(join(out, 'thread', sqlFile.path), 'utf8');
    expect(sql).toMatch(/SELECT CAST\(date_trunc\('month', "sail_date"\) AS DATE\) AS period/);
    expect(sql).toContain('$1 = "2022-01-01"');
  });
});

describe('threadcount ask with bad input', () => {
  it('asks about a metric that does not exist, naming the closest ones', async () => {
    const out = tmp('unknown');
    const result = await ask({ configFile: configPath, request: 'Show me the trend of churn over time', outDir: out, now });
    const prompt = result.thread.thread.posts.find((p) => p.promptTopic === 'metrics')!;
    expect(prompt.text).toMatch(/I don't have a metric called "churn"/);
    expect(prompt.text).toMatch(/closest I can measure/);
    // With no answer scripted the recommendation is taken: stopping, not a stand-in for churn.
    expect(result.end).toBe('cancelled');
  });

  it('re-asks with a clear message when a typed answer is an impossible date', async () => {
    const out = tmp('baddate');
    const answers = join(out, 'answers.yaml');
    writeFileSync(answers, 'window: "2024-02-30 to 2024-06-01"\n');
    const result = await ask({ configFile: configPath, request: 'revenue trend', answersFile: answers, outDir: join(out, 't'), now });
    // Typed on the card as a correction: refused with the reason, the period left as it was.
    expect(result.thread.thread.posts.some((p) => p.text.startsWith('2024-02-30 is not a real date'))).toBe(true);
    expect(result.thread.thread.posts.some((p) => p.text.startsWith('Updated the brief above'))).toBe(false);
    expect(result.end).toBe('done');
  });

  it('rejects an unknown answers key with the file and line', async () => {
    const out = tmp('badkey');
    const answers = join(out, 'answers.yaml');
    writeFileSync(answers, 'audience: leadership\ngrian: month\n');
    await expect(ask({ configFile: configPath, request: 'revenue trend', answersFile: answers, outDir: out, now })).rejects.toThrow(
      /answers\.yaml:2: grian: Unrecognized key/,
    );
  });
});
