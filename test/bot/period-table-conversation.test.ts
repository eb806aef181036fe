// The monthly table a manager asks for, as a whole conversation through the CLI path on the demo
// data (invented Skerrywake bookings): one table image per page, its CSV, and the takeaway across
// the three metrics leading the summary. The window is typed in the prompt until the request
// reader takes it from the request itself.
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import * as aq from 'arquero';
import { beforeAll, describe, expect, it } from 'vitest';
import type { RecordedThread } from '../../adapters/file-thread/FileThread.js';
import { ask } from '../../cli/ask.js';
import { demoFixture } from '../helpers/demo-fixture.js';

const REQUEST =
  'revenue, bookings and average fare per booking month by month for 2023 and 2024, with the growth on the year before, and the best and worst months called out';

let dir: string;
let thread: RecordedThread;
let end: string;

beforeAll(async () => {
  const demo = await demoFixture();
  dir = mkdtempSync(join(tmpdir(), 'tc-table-'));
  writeFileSync(join(dir, 'answers.yaml'), 'window: "2023 to 2024"\naudience: managers\n');
  const r = await ask({ configFile: demo.configPath, request: REQUEST, answersFile: join(dir, 'answers.yaml'), outDir: join(dir, 'out'), now: new Date('2026-12-01T09:00:00Z') });
  end = r.end;
  thread = r.thread.thread;
}, 300_000);

const bot = () => thread.posts.filter((p) => p.author === 'threadcount');

describe('"revenue, bookings and average fare per booking month by month for 2023 and 2024…"', () => {
  it('plans the table first and answers it with one image per page, the table as CSV and its SQL', () => {
    expect(end).toBe('done');
    const plan = bot().find((p) => p.text.startsWith('*Here is what I understood.*'))!;
    expect(plan.text).toMatch(/^1\. A table of revenue, bookings and average fare per booking month by month \(January 2023 to December 2024\)/m);
    const table = bot().find((p) => p.text.startsWith('*1. '))!;
    const names = table.files.map((f) => f.path);
    expect(names).toEqual([
      'charts/01-period_table-revenue-bookings-average_fare-p1.png',
      'charts/01-period_table-revenue-bookings-average_fare-p2.png',
      'tables/01-period_table-revenue-bookings-average_fare.csv',
      'tables/01-period_table-revenue-bookings-average_fare-by_period.csv',
      'sql/01-period_table-revenue-bookings-average_fare.sql',
    ]);
    // 24 months as two pages of twelve: every page is a PNG of the same size.
    const sizes = names.filter((n) => n.endsWith('.png')).map((n) => readFileSync(join(dir, 'out', n))).map((b) => [b.readUInt32BE(16), b.readUInt32BE(20)]);
    expect(sizes[0]).toEqual(sizes[1]);
    const csv = aq.fromCSV(readFileSync(join(dir, 'out', names[2]!), 'utf8'), { parse: { period: String } }).objects() as Record<string, unknown>[];
    expect(csv.map((r) => r.period)).toEqual([...Array.from({ length: 24 }, (_, i) => `${2023 + Math.floor(i / 12)}-${String((i % 12) + 1).padStart(2, '0')}-01`), 'total']);
    expect(csv.filter((r) => r.revenue_mark === 'best').map((r) => r.period)).toEqual(['2024-07-01']);
  });

  it('leads the summary with one takeaway across the three metrics', () => {
    const summary = bot().find((p) => p.text.startsWith('*Summary*'))!;
    const first = summary.text.split('\n')[1]!;
    expect(first).toBe(
      '- Revenue peaked in July 2024 at €318K on 8.31K bookings; in December 2024, against a year earlier, bookings fell faster than revenue (−0.9% against −0.2%), so the average fare per booking rose 0.8%. (see 1)',
    );
  });
});
