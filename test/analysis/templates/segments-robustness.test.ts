// Robustness of the trend and segment templates on in-memory DuckDB tables built here: a
// dimension with a thousand values (folded in SQL), an empty table, a metric that is all null,
// a single period and a window with no data. Each gives a clear finding or caveat, never an exception.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { SegmentSharesFinding, SegmentTrendFinding } from '../../../analysis/findings/segments.js';
import { definitionOf } from '../../../analysis/sub-questions/registry.js';
import { SEGMENT_TOP_N } from '../../../analysis/templates/segments-fold-sql.js';
import type { Answer, SubQuestion } from '../../../analysis/types.js';
import { memoryWorkspace } from './trend-memory-db.js';

const CONFIG = `
version: 1
datasets:
  - name: shops
    label: Test shops
    source: { kind: duckdb, path: unused.duckdb }
    table: sales
    time_column: day
    timezone: Europe/Dublin
    metrics:
      - { name: amount, label: Sales, definition: { type: sum, column: amount }, unit: currency, currency: EUR, higher_is_better: true }
      - { name: orders, label: Orders, definition: { type: count }, unit: count, higher_is_better: true }
      - { name: empty_amount, label: Empty amount, definition: { type: sum, column: empty_amount }, unit: number, higher_is_better: true }
      - { name: avg_amount, label: Average sale, definition: { type: average, column: amount }, unit: currency, currency: EUR, higher_is_better: true }
    dimensions:
      - { name: shop, column: shop, label: Shop }
      - { name: email, column: email, label: Email, personal_data: true }
engine:
  max_result_rows: 10000
`;

// 100,000 rows over 2023–2024; shop numbers skewed by a cube so a few shops are large and the tail is long.
const BIG = [
  `CREATE TABLE sales AS
   SELECT DATE '2023-01-01' + CAST(i % 731 AS INTEGER) AS day,
          'shop ' || LPAD(CAST(CAST(FLOOR(POWER(((i * 7919) % 100000) / 100000.0, 3) * 1000) AS INTEGER) AS VARCHAR), 3, '0') AS shop,
          CAST(10 + (i % 13) AS DOUBLE) AS amount,
          CAST(NULL AS DOUBLE) AS empty_amount,
          'x' || i || '@example.com' AS email
   FROM range(0, 100000) t(i)`,
];
const EMPTY = [`CREATE TABLE sales (day DATE, shop VARCHAR, amount DOUBLE, empty_amount DOUBLE, email VARCHAR)`];

const base: SubQuestion = {
  id: 'r',
  kind: 'trend',
  lens: 'breakdown',
  template: 'segment_shares',
  metrics: ['amount'],
  dimension: 'shop',
  grain: 'month',
  window: { start: '2023-01-01', end: '2025-01-01' },
  filters: [],
};
const ALL = ['trend_test', 'trend_seasonality', 'trend_summary', 'segment_trend', 'segment_shares'] as const;
const BAD_TEXT = /NaN|Infinity|undefined|\d{4}-\d{2}-\d{2}/;

let big: Awaited<ReturnType<typeof memoryWorkspace>>;
let empty: Awaited<ReturnType<typeof memoryWorkspace>>;
let raw: { day: string; shop: string; amount: number }[];

beforeAll(async () => {
  big = await memoryWorkspace(BIG, CONFIG);
  empty = await memoryWorkspace(EMPTY, CONFIG);
  const t = await big.source.run({ sql: 'SELECT day, shop, amount FROM sales', params: [] }, { maxRows: 200_000, timeoutMs: 60_000 });
  raw = t.rows.map((r) => ({ day: String(r.day), shop: String(r.shop), amount: Number(r.amount) }));
});
afterAll(async () => {
  await big?.source.close();
  await empty?.source.close();
});

function presentAll(a: Answer, ws: typeof big) {
  for (const audience of ['leadership', 'managers', 'analysts'] as const) {
    const p = definitionOf(a.subQuestion).present(a, { dataset: ws.dataset, locale: 'en-IE', audience, chart: { width: 1200, height: 675, scale: 1 }, dataAsOf: ws.coverage.lastDate });
    for (const text of [p.title, p.caption, ...p.notes]) expect(text).not.toMatch(BAD_TEXT);
    expect(p.title.length).toBeGreaterThan(0);
  }
}

describe('a dimension with a thousand values', () => {
  it('segment_shares folds the tail in SQL: only top N + 1 rows reach Node, and the numbers match a reduction', async () => {
    const a = await answerSubQuestion(base, big);
    expect(a.tables.segment_totals!.rows.length).toBe(SEGMENT_TOP_N + 1);
    const f = a.findings.find((x): x is SegmentSharesFinding => x.type === 'segment_shares')!;
    const byShop = new Map<string, number>();
    for (const r of raw) byShop.set(r.shop, (byShop.get(r.shop) ?? 0) + r.amount);
    const sorted = [...byShop.entries()].sort((x, y) => y[1] - x[1] || (x[0] < y[0] ? -1 : 1));
    const total = sorted.reduce((acc, e) => acc + e[1], 0);
    expect(byShop.size).toBeGreaterThan(900);
    expect(f.segmentCount).toBe(byShop.size);
    expect(f.folded).toBe(byShop.size - SEGMENT_TOP_N);
    expect(a.caveats).toContainEqual({ code: 'segments_folded', data: { count: byShop.size - SEGMENT_TOP_N, dimension: 'shop', folded: 'smaller' } });
    expect(f.rows.slice(0, SEGMENT_TOP_N).map((r) => r.segment)).toEqual(sorted.slice(0, SEGMENT_TOP_N).map((e) => e[0]));
    f.rows.slice(0, SEGMENT_TOP_N).forEach((r, i) => expect(r.share).toBeCloseTo(sorted[i]![1] / total, 12));
    const fold = f.rows[SEGMENT_TOP_N]!;
    expect(fold.other).toBe(true);
    expect(fold.value).toBeCloseTo(sorted.slice(SEGMENT_TOP_N).reduce((acc, e) => acc + e[1], 0), 6);
    expect(fold.cumulativeShare).toBeCloseTo(1, 12);
    // The HHI over all thousand segments, not over the folded rows.
    const hhi = sorted.reduce((acc, e) => acc + (100 * e[1] / total) ** 2, 0);
    expect(f.hhi).toBeCloseTo(hhi, 6);
    // How many shops reach 80%, by the reduction: over every shop, inside the fold or not (segment_reach).
    let run = 0;
    const reach = sorted.findIndex((e) => (run += e[1]) / total >= 0.8) + 1;
    expect(f.countToThreshold).toBe(reach);
    presentAll(a, big);
  });

  it('segment_trend returns N + 1 series and marks the fold', async () => {
    const a = await answerSubQuestion({ ...base, template: 'segment_trend' }, big);
    const trends = a.findings.filter((x): x is SegmentTrendFinding => x.type === 'segment_trend');
    expect(trends).toHaveLength(SEGMENT_TOP_N + 1);
    expect(trends[SEGMENT_TOP_N]!.other).toBe(true);
    expect(a.tables.segment_series!.rows.length).toBeLessThanOrEqual((SEGMENT_TOP_N + 1) * 24);
    // The fold's monthly values add up with the named shops to the reduction's monthly totals.
    const monthly = new Map<string, number>();
    for (const r of raw) monthly.set(r.day.slice(0, 7), (monthly.get(r.day.slice(0, 7)) ?? 0) + r.amount);
    trends[0]!.points.forEach((p, i) => {
      const sum = trends.reduce((acc, t) => acc + (t.points[i]!.value ?? 0), 0);
      expect(sum).toBeCloseTo(monthly.get(p.period.slice(0, 7))!, 6);
    });
    presentAll(a, big);
  });

  it('still refuses the personal-data dimension', async () => {
    await expect(answerSubQuestion({ ...base, dimension: 'email' }, big)).rejects.toThrow(/personal data/);
  });
});

describe('edge cases never throw', () => {
  it('an empty table gives no_data for every template', async () => {
    for (const template of ALL) {
      const a = await answerSubQuestion({ ...base, template }, empty);
      expect(a.caveats.map((c) => c.code)).toContain('no_data');
      presentAll(a, empty);
    }
  });

  it('a window with no data gives no_data', async () => {
    for (const template of ALL) {
      const a = await answerSubQuestion({ ...base, template, window: { start: '2030-01-01', end: '2031-01-01' } }, big);
      expect(a.caveats.map((c) => c.code)).toContain('no_data');
      presentAll(a, big);
    }
  });

  it('a metric that is all null gives all_null, and no statistics', async () => {
    for (const template of ALL) {
      const a = await answerSubQuestion({ ...base, template, metrics: ['empty_amount'] }, big);
      expect(a.caveats.map((c) => c.code)).toContain('all_null');
      expect(a.findings.some((f) => ['trend_test', 'trend_summary', 'trend_seasonality'].includes(f.type))).toBe(false);
      const shares = a.findings.find((f): f is SegmentSharesFinding => f.type === 'segment_shares');
      if (shares) expect(shares.rows.every((r) => r.share === null)).toBe(true);
      presentAll(a, big);
    }
  });

  it('a single period gives single_period, no trend test and too_few_cycles for seasonality', async () => {
    const one = { ...base, window: { start: '2023-03-01', end: '2023-04-01' } };
    const t = await answerSubQuestion({ ...one, template: 'trend_test' }, big);
    expect(t.caveats.map((c) => c.code)).toContain('single_period');
    expect(t.findings.some((f) => f.type === 'trend_test')).toBe(false);
    const s = await answerSubQuestion({ ...one, template: 'trend_seasonality' }, big);
    expect(s.caveats.map((c) => c.code)).toContain('too_few_cycles');
    expect(s.findings.some((f) => f.type === 'trend_seasonality')).toBe(false);
    // The weekday pattern still stands on a month of days.
    expect(s.findings.some((f) => f.type === 'trend_weekday')).toBe(true);
    for (const template of ALL) presentAll(await answerSubQuestion({ ...one, template }, big), big);
  });

  it('under two full years: too_few_cycles and no indices (no guessing)', async () => {
    const a = await answerSubQuestion({ ...base, template: 'trend_seasonality', window: { start: '2023-01-01', end: '2024-07-01' } }, big);
    expect(a.caveats).toContainEqual({ code: 'too_few_cycles', data: { metric: 'amount', fullCycles: 1, required: 2, months: 18 } });
    expect(a.findings.some((f) => f.type === 'trend_seasonality')).toBe(false);
    presentAll(a, big);
  });
});
