// Reading result tables into findings is pure: checked here on tables built by hand, against
// values worked out by hand or by an outside library (jStat).
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { SegmentSharesFinding, SegmentTrendFinding, TrendOutlierFinding, TrendTestFinding } from '../../../analysis/findings/segments.js';
import { addMonths } from '../../../analysis/periods.js';
import { readSegmentShares } from '../../../analysis/templates/segments-shares.js';
import { readSegmentTrend } from '../../../analysis/templates/segments-trend.js';
import type { ReadContext } from '../../../analysis/templates/template.js';
import { weekdayCounts } from '../../../analysis/templates/trend-seasonality.js';
import { readTrendSummary } from '../../../analysis/templates/trend-summary.js';
import { readTrendTest } from '../../../analysis/templates/trend-test.js';
import type { CellValue, ResultTable, SubQuestion } from '../../../analysis/types.js';
import { exampleDataset } from '../../helpers/example-config.js';
import { jStat } from '../stats/jstat.js';

const table = (rows: Record<string, CellValue>[]): ResultTable => ({ columns: [], rows, truncated: false });
const months = (from: string, n: number) => Array.from({ length: n }, (_, i) => addMonths(from, i));
const ctxFor = (first: string, last: string): ReadContext => ({ dataset: exampleDataset, coverage: { firstDate: first, lastDate: last, rows: 1000 } });
const sq = (over: Partial<SubQuestion> = {}): SubQuestion => ({
  id: 'p',
  kind: 'trend',
  lens: 'time_pattern',
  template: 'trend_test',
  metrics: ['bookings'],
  grain: 'month',
  window: { start: '2020-01-01', end: '2030-01-01' },
  filters: [],
  ...over,
});

describe('trend_test reading', () => {
  it('a strictly rising series of 20 months: S = 190, Var(S) = 950, Sen slope 1 (by hand); p as jStat gives it', () => {
    const ps = months('2022-01-01', 20);
    const r = readTrendTest(sq(), table(ps.map((p, i) => ({ period: p, bookings: i + 1 }))), ctxFor('2022-01-01', '2023-08-31'));
    const t = r.findings.find((f): f is TrendTestFinding => f.type === 'trend_test')!;
    // 20 months is under two cycles, so no seasonal adjustment.
    expect(t.seasonallyAdjusted).toBe(false);
    expect(t.s).toBe(190);
    // z = (S − 1)/√Var(S), Var(S) = n(n−1)(2n+5)/18 = 20·19·45/18 = 950.
    expect(t.z).toBeCloseTo(189 / Math.sqrt(950), 12);
    expect(t.pValue).toBeCloseTo(jStat.ztest(189 / Math.sqrt(950), 2), 12);
    expect(t.direction).toBe('up');
    expect(t.tau).toBe(1);
    expect(t.slopePerPeriod).toBe(1);
    expect(t.slopePerYear).toBe(12);
    // Conover's intercept: median(x) − slope·median(t) = 10.5 − 9.5.
    expect(t.intercept).toBe(1);
    // Peak is the last month, so the change since the peak is zero.
    expect(r.findings.find((f) => f.type === 'change')).toMatchObject({ from: { period: '2023-08-01', value: 20 }, to: { period: '2023-08-01', value: 20 }, relative: 0 });
  });

  it('a seasonal series with a modest trend: testing the adjusted values finds what the raw test misses', () => {
    const factor = [0.55, 0.6, 0.75, 0.9, 1.0, 1.25, 1.6, 1.55, 1.1, 0.85, 0.7, 0.72];
    const ps = months('2022-01-01', 36);
    // Level rises 0.5% a month; a fixed ±2% wobble keeps it from being perfectly smooth.
    const rows = ps.map((p, i) => ({ period: p, bookings: 1000 * (1 + 0.005 * i) * factor[i % 12]! * (1 + 0.02 * Math.sin(i * 2.3)) }));
    const r = readTrendTest(sq(), table(rows), ctxFor('2022-01-01', '2024-12-31'));
    const t = r.findings.find((f): f is TrendTestFinding => f.type === 'trend_test')!;
    expect(t.seasonallyAdjusted).toBe(true);
    expect(t.direction).toBe('up');
    expect(t.pValue).toBeLessThan(0.001);
    expect(t.rawPValue).toBeGreaterThan(0.05);
    // Sen's slope of the adjusted level: about 0.5% of 1000-ish a month.
    expect(t.slopePerPeriod).toBeGreaterThan(3);
    expect(t.slopePerPeriod).toBeLessThan(8);
  });

  it('two complete months: no test, a small_sample caveat', () => {
    const r = readTrendTest(sq(), table([{ period: '2022-01-01', bookings: 5 }, { period: '2022-02-01', bookings: 6 }]), ctxFor('2022-01-01', '2022-02-28'));
    expect(r.findings.some((f) => f.type === 'trend_test')).toBe(false);
    expect(r.caveats).toContainEqual({ code: 'small_sample', data: { n: 2, metric: 'bookings' } });
  });
});

describe('trend_summary reading', () => {
  it('one spike among twelve months is the outlier (modified z by hand: 0.6745 · 39 / 1)', () => {
    const values = [10, 11, 10, 12, 11, 10, 11, 12, 10, 11, 50, 11];
    const ps = months('2023-01-01', 12);
    const r = readTrendSummary(sq({ template: 'trend_summary' }), table(ps.map((p, i) => ({ period: p, bookings: values[i]! }))), ctxFor('2023-01-01', '2023-12-31'));
    const s = r.findings.find((f) => f.type === 'trend_summary')!;
    expect(s).toMatchObject({ n: 12, min: 10, max: 50, median: 11, minPeriod: '2023-01-01', maxPeriod: '2023-11-01', mode: 11, modeCount: 5 });
    expect((s as { mean: number }).mean).toBeCloseTo(169 / 12, 12);
    const o = r.findings.filter((f): f is TrendOutlierFinding => f.type === 'trend_outlier');
    expect(o).toHaveLength(1);
    expect(o[0]!.period).toBe('2023-11-01');
    expect(o[0]!.score).toBeCloseTo(0.6745 * 39, 12);
    // One year is no cycle to measure a season from: the values themselves are screened.
    expect(o[0]!.rule).toBe('values');
    // The answer names its unusual periods in its caption: no note under it says them again.
    expect(r.caveats.filter((c) => c.code === 'outlier')).toEqual([]);
  });
});

describe('weekdayCounts', () => {
  it('counts each ISO weekday in [start, end) as a day-by-day walk does', () => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 20000 }), fc.integer({ min: 0, max: 900 }), (offset, length) => {
        const start = new Date(Date.UTC(1990, 0, 1 + offset));
        const end = new Date(start.getTime() + length * 86_400_000);
        const walk = new Array<number>(7).fill(0);
        for (let d = new Date(start); d < end; d.setUTCDate(d.getUTCDate() + 1)) walk[(d.getUTCDay() + 6) % 7]!++;
        expect(weekdayCounts(start.toISOString().slice(0, 10), end.toISOString().slice(0, 10))).toEqual(walk);
      }),
    );
  });
});

describe('segment readings', () => {
  const seg = (segment: string | null, rank: number, value: number | null, extra: Record<string, CellValue> = {}) => ({
    segment,
    other: false,
    seg_rank: rank,
    members: 1,
    value,
    row_count: 10,
    ...extra,
  });

  it('gaps and late starts per segment; a partial last period is not a gap', () => {
    const ps = months('2023-01-01', 6);
    const series = [
      ...ps.map((p) => ({ period: p, ...seg('A', 1, 10) })),
      // B starts in March and misses May; June (partial) is missing too, which is not a gap.
      ...['2023-03-01', '2023-04-01'].map((p) => ({ period: p, ...seg('B', 2, 5) })),
    ];
    const r = readSegmentTrend(
      sq({ template: 'segment_trend', dimension: 'route' }),
      table([seg('A', 1, 60, { seg_count: 2 }), seg('B', 2, 10, { seg_count: 2 })]),
      table(series),
      table([]),
      ctxFor('2023-01-01', '2023-06-15'),
    );
    expect(r.caveats).toContainEqual({ code: 'late_segment', data: { segment: 'B', dimension: 'route', firstPeriod: '2023-03-01', grain: 'month' } });
    expect(r.caveats).toContainEqual({ code: 'segment_gap', data: { segment: 'B', dimension: 'route', periods: 1, firstGap: '2023-05-01', lastGap: '2023-05-01', grain: 'month' } });
    expect(r.caveats.filter((c) => c.data.segment === 'A')).toEqual([]);
    const b = r.findings.find((f): f is SegmentTrendFinding => f.type === 'segment_trend' && f.segment === 'B')!;
    expect(b.firstPeriod).toBe('2023-03-01');
    expect(b.points.at(-1)).toEqual({ period: '2023-06-01', value: null, partial: true });
  });

  it('a segment that starts in the first complete period of data that opens part-way through a month is not late', () => {
    const ps = months('2023-01-01', 6);
    const series = [
      ...ps.map((p) => ({ period: p, ...seg('A', 1, 10) })),
      // The data opens on 20 January (a partial month); B's first rows are in February, the first complete month.
      ...ps.slice(1).map((p) => ({ period: p, ...seg('B', 2, 5) })),
    ];
    const r = readSegmentTrend(
      sq({ template: 'segment_trend', dimension: 'route' }),
      table([seg('A', 1, 60, { seg_count: 2 }), seg('B', 2, 25, { seg_count: 2 })]),
      table(series),
      table([]),
      ctxFor('2023-01-20', '2023-06-30'),
    );
    expect(r.caveats.filter((c) => c.code === 'late_segment')).toEqual([]);
  });

  it('folded shares: the count to 80% when the named segments reach it, and the HHI from the database sums', () => {
    // Eight named segments and a fold of five; values chosen so the top three reach 80%.
    const named = [500, 200, 120, 50, 40, 30, 20, 15];
    const tail = [10, 6, 4, 3, 2];
    const total = [...named, ...tail].reduce((a, b) => a + b, 0);
    const sumSquares = [...named, ...tail].reduce((a, b) => a + b * b, 0);
    const totals = { seg_count: 13, grand_total: total, sum_squares: sumSquares, min_segment_value: 2 };
    const rows = [
      ...named.map((v, i) => seg(`s${i + 1}`, i + 1, v, totals)),
      { ...seg(null, 9, tail.reduce((a, b) => a + b, 0), totals), other: true, members: 5 },
    ];
    const r = readSegmentShares(sq({ template: 'segment_shares', dimension: 'route', metrics: ['revenue'] }), table(rows), ctxFor('2023-01-01', '2023-12-31'));
    const f = r.findings[0] as SegmentSharesFinding;
    expect(f.folded).toBe(5);
    expect(f.countToThreshold).toBe(3);
    expect(f.rows[2]!.cumulativeShare).toBeCloseTo(820 / 1000, 12);
    expect(f.topNShare).toBeCloseTo(820 / 1000, 12);
    // HHI = Σ (100 · v / total)², over all 13 segments.
    expect(f.hhi).toBeCloseTo([...named, ...tail].reduce((a, v) => a + (100 * v / total) ** 2, 0), 9);
    expect(f.hhiBand).toBe('highly_concentrated');
    expect(f.rows.at(-1)).toMatchObject({ other: true, members: 5, cumulativeShare: 1 });
    expect(r.caveats).toContainEqual({ code: 'segments_folded', data: { count: 5, dimension: 'route', folded: 'smaller' } });
  });

  it('negative segment totals: no shares, a negative_amounts caveat', () => {
    const r = readSegmentShares(
      sq({ template: 'segment_shares', dimension: 'route', metrics: ['revenue'] }),
      table([seg('a', 1, 100, { seg_count: 2 }), seg('b', 2, -5, { seg_count: 2 })]),
      ctxFor('2023-01-01', '2023-12-31'),
    );
    const f = r.findings[0] as SegmentSharesFinding;
    expect(f.rows.every((x) => x.share === null)).toBe(true);
    expect(r.caveats).toContainEqual({ code: 'negative_amounts', data: { column: 'revenue', count: 1, segments: true } });
  });
});
