// One representative sub-question per template on the demo data, and a comparison of two
// answers to the same sub-question (numbers within a stated tolerance, everything else exact).
// Used to check two engines against each other, and an answer over the run's rollup against the
// same answer read from the table.
import type { Answer, CellValue, ResultTable, SubQuestion } from '../../analysis/types.js';

/**
 * Relative tolerance for numbers. Both engines compute in IEEE doubles, but they add up rows in
 * different orders (parallel partial sums, different hash-aggregate layouts), and floating-point
 * addition is not associative: a sum of 10^5 values agrees to roughly 1e-12 relative, not exactly.
 * 1e-9 leaves room for that and for what the statistics do with it (variances, t and p values),
 * while any real disagreement (a different row counted, a different period) is far larger.
 * An absolute floor of 1e-12 covers quantities that are zero up to rounding in one engine.
 */
export const REL_TOL = 1e-9;
export const ABS_FLOOR = 1e-12;

export const FULL = { start: '2022-01-01', end: '2025-07-01' };
export const SINCE_LAUNCH = { start: '2023-04-01', end: '2025-07-01' };
export const SUMMER_2024 = { start: '2024-06-01', end: '2024-09-01' };

const base = (over: Partial<SubQuestion> & Pick<SubQuestion, 'template' | 'kind' | 'lens'>): SubQuestion => ({
  id: over.template,
  metrics: ['revenue'],
  grain: 'month',
  window: FULL,
  filters: [],
  ...over,
});

/**
 * One sub-question per template, with the dimension or comparison group it needs. Metrics are
 * varied so every metric type (sum, count, distinct count, average, ratio, rate) and a segment
 * filter with a bound value go through both engines.
 */
export const CASES: SubQuestion[] = [
  base({ template: 'series', kind: 'trend', lens: 'time_pattern', metrics: ['revenue', 'customers', 'fare_per_passenger', 'refund_rate'] }),
  base({ template: 'trend_test', kind: 'trend', lens: 'time_pattern', metrics: ['bookings'] }),
  base({ template: 'trend_seasonality', kind: 'trend', lens: 'time_pattern', metrics: ['passengers'] }),
  base({ template: 'trend_summary', kind: 'trend', lens: 'summary', metrics: ['average_fare'], grain: 'week' }),
  base({ template: 'segment_trend', kind: 'trend', lens: 'breakdown', metrics: ['bookings'], dimension: 'channel', grain: 'quarter' }),
  base({ template: 'segment_shares', kind: 'trend', lens: 'distribution', metrics: ['revenue'], dimension: 'route' }),
  // "What share of revenue does Mainland–Saltreach have": one named route's share, rank and monthly share (a bound value, RANK over every route) beside a filter that stays.
  base({ template: 'segment_shares', kind: 'trend', lens: 'distribution', metrics: ['bookings'], dimension: 'route', focus: { dimension: 'route', value: 'Mainland–Saltreach' }, filters: [{ dimension: 'channel', values: ['app'] }] }),
  // Asked per day: each segment's total over its own days (its first and last day read from the whole table).
  base({ template: 'segment_shares', kind: 'trend', lens: 'distribution', metrics: ['bookings'], dimension: 'channel', perDay: true, window: SUMMER_2024, filters: [{ dimension: 'route', values: ['Mainland–Saltreach'] }] }),
  base({ template: 'growth_series', kind: 'growth', lens: 'time_pattern', metrics: ['bookings', 'revenue'] }),
  base({ template: 'growth_drivers', kind: 'growth', lens: 'breakdown', dimension: 'channel', window: SUMMER_2024 }),
  base({ template: 'growth_summary', kind: 'growth', lens: 'summary', metrics: ['passengers'] }),
  base({ template: 'growth_share_shift', kind: 'growth', lens: 'distribution', dimension: 'route', window: SUMMER_2024 }),
  base({ template: 'value_compare', kind: 'performance', lens: 'summary', dimension: 'channel', contrast: { dimension: 'channel', values: ['app', 'web'] }, window: SUMMER_2024 }),
  base({ template: 'value_compare', kind: 'performance', lens: 'summary', dimension: 'channel', metrics: ['refund_rate'], contrast: { dimension: 'channel', values: ['phone', 'kiosk'] }, window: SINCE_LAUNCH }),
  base({ template: 'growth_periods', kind: 'growth', lens: 'summary', metrics: ['revenue', 'refund_rate'], window: SUMMER_2024, compareWindow: { start: '2023-06-01', end: '2023-09-01' } }),
  base({ template: 'growth_periods', kind: 'growth', lens: 'summary', metrics: ['bookings'], window: { start: '2024-04-01', end: '2024-06-01' }, compareWindow: { start: '2024-02-01', end: '2024-04-01' }, beforeAfter: true }),
  base({ template: 'performance_growth', kind: 'performance', lens: 'summary', comparisonGroup: 'skerrypass', metrics: ['bookings'], window: { start: '2024-01-01', end: '2025-01-01' } }),
  base({ template: 'kpi_snapshot', kind: 'kpi', lens: 'time_pattern', metrics: ['fare_per_passenger'] }),
  base({ template: 'kpi_context', kind: 'kpi', lens: 'summary', metrics: ['refund_rate'] }),
  base({ template: 'kpi_by_segment', kind: 'kpi', lens: 'breakdown', dimension: 'route', metrics: ['revenue'] }),
  base({ template: 'kpi_mix', kind: 'kpi', lens: 'distribution', dimension: 'fare_class', metrics: ['passengers'] }),
  // A window starting mid-month (its first month partial), distinct customers (read from the table).
  base({ template: 'period_table', kind: 'growth', lens: 'time_pattern', metrics: ['revenue', 'customers', 'average_fare', 'refund_rate'], window: { start: '2023-03-15', end: '2025-07-01' } }),
  base({ template: 'period_table', kind: 'trend', lens: 'time_pattern', metrics: ['bookings', 'fare_per_passenger', 'refunded_revenue_share'], grain: 'week', window: SUMMER_2024 }),
  base({ template: 'performance_compare', kind: 'performance', lens: 'summary', comparisonGroup: 'skerrypass', window: SINCE_LAUNCH }),
  base({
    template: 'performance_compare',
    kind: 'performance',
    lens: 'summary',
    comparisonGroup: 'skerrypass',
    metrics: ['refund_rate'],
    window: SINCE_LAUNCH,
    filters: [{ dimension: 'channel', values: ['phone', 'web'] }],
  }),
  base({ template: 'performance_frequency', kind: 'performance', lens: 'distribution', comparisonGroup: 'skerrypass', metrics: ['bookings'], window: SINCE_LAUNCH }),
  base({ template: 'performance_before_after', kind: 'performance', lens: 'time_pattern', comparisonGroup: 'skerrypass', metrics: ['average_fare'] }),
  base({
    template: 'performance_by_segment',
    kind: 'performance',
    lens: 'breakdown',
    comparisonGroup: 'skerrypass',
    dimension: 'route',
    metrics: ['fare_per_passenger'],
    window: SINCE_LAUNCH,
  }),
];

function close(a: number, b: number): boolean {
  return Math.abs(a - b) <= Math.max(ABS_FLOOR, REL_TOL * Math.max(Math.abs(a), Math.abs(b)));
}

/** Differences between two values of the same shape: numbers within tolerance, everything else exact. */
export function differences(a: unknown, b: unknown, path: string, out: string[]): void {
  if (typeof a === 'number' && typeof b === 'number') {
    if (Number.isNaN(a) && Number.isNaN(b)) return;
    if (!close(a, b)) out.push(`${path}: ${a} vs ${b}`);
    return;
  }
  if (Array.isArray(a) && Array.isArray(b)) {
    if (a.length !== b.length) out.push(`${path}: ${a.length} items vs ${b.length}`);
    for (let i = 0; i < Math.min(a.length, b.length); i++) differences(a[i], b[i], `${path}[${i}]`, out);
    return;
  }
  if (a && b && typeof a === 'object' && typeof b === 'object') {
    const ka = Object.keys(a).sort();
    const kb = Object.keys(b).sort();
    if (ka.join() !== kb.join()) out.push(`${path}: keys ${ka.join(',')} vs ${kb.join(',')}`);
    for (const k of ka) if (k in b) differences((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${path}.${k}`, out);
    return;
  }
  if (a !== b) out.push(`${path}: ${JSON.stringify(a)} vs ${JSON.stringify(b)}`);
}

/** Rows in a canonical order: by every cell, numbers rounded well above the tolerance so both engines sort alike. */
function sortedRows(t: ResultTable): Record<string, CellValue>[] {
  const key = (r: Record<string, CellValue>) =>
    JSON.stringify(t.columns.map((c) => {
      const v = r[c.name];
      return typeof v === 'number' ? Number(v.toPrecision(7)) : v;
    }));
  return [...t.rows].sort((x, y) => (key(x) < key(y) ? -1 : key(x) > key(y) ? 1 : 0));
}

export function compareAnswers(duck: Answer, post: Answer): string[] {
  const out: string[] = [];
  const names = Object.keys(duck.tables).sort();
  if (names.join() !== Object.keys(post.tables).sort().join()) out.push(`tables: ${names.join()} vs ${Object.keys(post.tables).sort().join()}`);
  for (const name of names) {
    const d = duck.tables[name]!;
    const p = post.tables[name];
    if (!p) continue;
    differences(d.columns, p.columns, `${name}.columns`, out);
    differences(d.truncated, p.truncated, `${name}.truncated`, out);
    differences(sortedRows(d), sortedRows(p), `${name}.rows`, out);
  }
  differences(duck.findings, post.findings, 'findings', out);
  differences(duck.caveats, post.caveats, 'caveats', out);
  return out;
}

