// A whole thread asked per day ("which routes have the highest bookings per day") answers every
// item per day: the ranking, the monthly series, the trend test, each route's course and the
// summary. Each answer's table (CSV) is held against the test's own SQL over the demo's DuckDB file
// (the Skerrywake demo: invented data, built by the demo generator): a route's bookings over the
// 1,265 days the data covers, and each month's bookings over the days of it the data covers. No
// answer's words state a total (the routes' totals, like 70.4K, never appear).
import { readFileSync, readdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { beforeAll, describe, expect, it } from 'vitest';
import { demoFixture } from '../helpers/demo-fixture.js';

const dir = mkdtempSync(join(tmpdir(), 'tc-perday-thread-'));
writeFileSync(join(dir, 'go.yaml'), 'plan: go\n');
const NOW = new Date('2026-12-05T09:00:00Z');

async function sql(file: string, text: string): Promise<Record<string, unknown>[]> {
  const inst = await DuckDBInstance.create(file, { access_mode: 'READ_ONLY' });
  const con = await inst.connect();
  const rows = (await con.runAndReadAll(text)).getRowObjectsJson();
  con.closeSync();
  return rows;
}

function csv(tables: string, pattern: RegExp): Record<string, string>[] {
  const file = readdirSync(tables).find((f) => pattern.test(f));
  if (!file) throw new Error(`no table like ${pattern} in ${readdirSync(tables).join(', ')}`);
  const [header, ...lines] = readFileSync(join(tables, file), 'utf8').trim().split('\n');
  const cols = header!.split(',');
  return lines.map((l) => Object.fromEntries(l.split(',').map((v, i) => [cols[i]!, v])));
}

const close = (a: number, b: number) => Math.abs(a - b) <= 1e-9 * Math.max(1, Math.abs(b));

describe('a thread asked per day answers per day throughout (demo data)', () => {
  let texts: string[];
  let tables: string;
  let db: string;
  let routes: { route: string; n: number; perDay: number }[];
  let months: Map<string, number>;
  let routeMonths: Map<string, number>;
  beforeAll(async () => {
    const demo = await demoFixture();
    db = demo.databasePath;
    const { ask } = await import('../../cli/ask.js');
    const r = await ask({ configFile: demo.configPath, request: 'which routes have the highest bookings per day', answersFile: join(dir, 'go.yaml'), outDir: join(dir, 'out'), now: NOW });
    texts = r.thread.thread.posts.filter((p) => p.author === 'threadcount').map((p) => p.text);
    tables = join(dir, 'out', 'tables');
    // The data's days: from its first sailing to its last, each day counted whether or not a route sailed.
    const span = `(SELECT MIN(sail_date) AS a, MAX(sail_date) AS b, CAST(MAX(sail_date) - MIN(sail_date) + 1 AS DOUBLE) AS days FROM bookings)`;
    routes = (await sql(db, `SELECT route, CAST(COUNT(*) AS DOUBLE) AS n, COUNT(*) / MIN(s.days) AS pd FROM bookings, ${span} s GROUP BY route ORDER BY pd DESC`)).map((x) => ({ route: String(x.route), n: Number(x.n), perDay: Number(x.pd) }));
    // A month's days: those of it between the data's first and last day.
    const monthDays = `CAST(LEAST(CAST(t.m + INTERVAL 1 MONTH AS DATE), s.b + 1) - GREATEST(t.m, s.a) AS DOUBLE)`;
    const byMonth = `(SELECT CAST(date_trunc('month', sail_date) AS DATE) AS m, route FROM bookings) t, ${span} s`;
    months = new Map((await sql(db, `SELECT strftime(t.m, '%Y-%m-%d') AS m, COUNT(*) / ${monthDays} AS pd FROM ${byMonth} GROUP BY t.m, s.a, s.b`)).map((x) => [String(x.m), Number(x.pd)]));
    routeMonths = new Map((await sql(db, `SELECT t.route, strftime(t.m, '%Y-%m-%d') AS m, COUNT(*) / ${monthDays} AS pd FROM ${byMonth} GROUP BY t.route, t.m, s.a, s.b`)).map((x) => [`${x.route}|${x.m}`, Number(x.pd)]));
  }, 600_000);

  it('the ranking: each route per day over the days the data covers, in that order', () => {
    const rows = csv(tables, /^01-segment_shares-bookings\.csv$/).filter((r) => r.other === 'false');
    expect(rows.map((r) => r.segment)).toEqual(routes.map((r) => r.route));
    for (const r of rows) expect(close(Number(r.value), routes.find((x) => x.route === r.segment)!.perDay)).toBe(true);
    expect(rows.every((r) => r.days === '1265')).toBe(true);
    const first = texts.find((t) => t.startsWith('*1. '))!;
    expect(first).toContain(`${routes[0]!.route} has the highest bookings per day: ${routes[0]!.perDay.toFixed(1)} a day`);
  });

  it('the series, the trend test and the summary: each month over its days', () => {
    for (const pattern of [/^02-series-bookings\.csv$/, /^\d\d-trend_test-bookings\.csv$/, /^\d\d-trend_summary-bookings\.csv$/]) {
      const rows = csv(tables, pattern);
      expect(Object.keys(rows[0]!)).toEqual(['period', 'bookings_per_day', 'partial']);
      expect(rows.length).toBe(months.size);
      for (const r of rows) expect(close(Number(r.bookings_per_day), months.get(r.period!)!)).toBe(true);
    }
    expect(texts.find((t) => /^\*\d\. Bookings per day show/.test(t))).toBeDefined();
    expect(texts.find((t) => /^\*\d\. Bookings per day averaged/.test(t))).toBeDefined();
  });

  it("each route's course: per day over the whole period and month by month", () => {
    const rows = csv(tables, /^\d\d-segment_trend-bookings\.csv$/).filter((r) => r.other === 'false');
    expect(rows.length).toBeGreaterThan(0);
    for (const r of rows) {
      const want = r.period === 'whole period' ? routes.find((x) => x.route === r.segment)!.perDay : routeMonths.get(`${r.segment}|${r.period}`);
      // A month a route has no booking in is a zero day count, not a missing figure.
      if (want === undefined) expect(r.bookings_per_day === '' || Number(r.bookings_per_day) === 0).toBe(true);
      else expect(close(Number(r.bookings_per_day), want)).toBe(true);
    }
    const largest = routes[0]!;
    expect(texts.some((t) => t.includes(`${largest.route} is the largest, at ${largest.perDay.toFixed(1)} a day`))).toBe(true);
  });

  it('no answer states a route total', () => {
    for (const r of routes) {
      const total = `${(r.n / 1000).toFixed(1)}K`;
      expect(texts.filter((t) => t.includes(total))).toEqual([]);
    }
  });
});
