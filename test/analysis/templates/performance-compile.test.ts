// Performance templates: pure SQL compilation (DuckDB and a PostgreSQL-style dialect), pure
// reading of hand-built result tables (including the edge cases), and the family's own statistics
// checked against published values and independent plain computations.
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import type { CompileContext } from '../../../analysis/compile-context.js';
import type { Coverage } from '../../../analysis/coverage.js';
import { duckdbDialect, type Dialect, quoteIdentifier } from '../../../analysis/sql/dialect.js';
import { performanceBeforeAfterTemplate, equalWindows } from '../../../analysis/templates/performance-before-after.js';
import { performanceBySegmentTemplate } from '../../../analysis/templates/performance-by-segment.js';
import { performanceCompareTemplate } from '../../../analysis/templates/performance-compare.js';
import { performanceFrequencyTemplate } from '../../../analysis/templates/performance-frequency.js';
import {
  type Cell,
  cellVariance,
  compareCells,
  contrast,
  poolCells,
  ratioOfMeansInterval,
  type RatioCell,
  verdictOf,
  wilsonInterval,
} from '../../../analysis/templates/performance-stats.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { CellValue, Finding, ResultTable, SubQuestion } from '../../../analysis/types.js';
import { exampleDataset } from '../../helpers/example-config.js';

// The query shapes without small-group suppression (the example config turns it on; its SQL is
// tested in small-groups.test.ts).
const ctx: CompileContext = { dataset: { ...exampleDataset, min_group_size: 0 }, dialect: duckdbDialect, timeColumnType: 'date' };

// A PostgreSQL-flavoured dialect written here, so compilation is checked against a second engine's conventions.
const postgresLike: Dialect = {
  name: 'postgres',
  quoteIdent: quoteIdentifier,
  placeholder: (i) => `$${i}`,
  periodStart: (grain, e) => `CAST(date_trunc('${grain}', ${e}) AS DATE)`,
  localDate: (e, type, tz, bind) => (type === 'date' ? e : `CAST((${e} AT TIME ZONE ${bind(tz)}) AS DATE)`),
  toDouble: (e) => `CAST(${e} AS DOUBLE PRECISION)`,
  dateParam: (p) => `CAST(${p} AS DATE)`,
  timeParam: (p, t) => `CAST(${p} AS ${t.toUpperCase()})`,
};

const base: SubQuestion = {
  id: 'p1',
  kind: 'performance',
  lens: 'summary',
  template: 'performance_compare',
  metrics: ['average_fare'],
  grain: 'month',
  window: { start: '2022-01-01', end: '2025-06-19' },
  filters: [],
  comparisonGroup: 'skerrypass',
};
const coverage: Coverage = { firstDate: '2022-01-01', lastDate: '2025-06-18', rows: 200_000 };
const readCtx = { dataset: exampleDataset, coverage };

const ALL = [
  { t: performanceCompareTemplate, sq: base },
  { t: performanceFrequencyTemplate, sq: { ...base, lens: 'distribution' as const, template: 'performance_frequency' as const, metrics: ['bookings'] } },
  { t: performanceBeforeAfterTemplate, sq: { ...base, lens: 'time_pattern' as const, template: 'performance_before_after' as const, grain: 'quarter' as const } },
  { t: performanceBySegmentTemplate, sq: { ...base, lens: 'breakdown' as const, template: 'performance_by_segment' as const, dimension: 'route' } },
];

/** Every number anywhere in the value is finite (no NaN, no Infinity). */
function allFinite(value: unknown): boolean {
  if (typeof value === 'number') return Number.isFinite(value);
  if (Array.isArray(value)) return value.every(allFinite);
  if (value && typeof value === 'object') return Object.values(value).every(allFinite);
  return true;
}

function table(rows: Record<string, CellValue>[]): ResultTable {
  return { columns: [], rows, truncated: false };
}

function find<T extends Finding['type']>(findings: Finding[], type: T, pred: (f: Extract<Finding, { type: T }>) => boolean = () => true) {
  return findings.find((f): f is Extract<Finding, { type: T }> => f.type === type && pred(f as Extract<Finding, { type: T }>));
}

describe('performance templates are registered', () => {
  it('under their names', () => {
    for (const name of ['performance_compare', 'performance_frequency', 'performance_before_after', 'performance_by_segment'] as const) {
      expect(SUB_QUESTIONS[name]).toMatchObject({ name, kind: 'performance' });
    }
  });
});

describe('performance SQL', () => {
  it('compare: moments per group from the launch date, values bound, var_samp for the spread', () => {
    const [groups, sample] = performanceCompareTemplate.compile(base, ctx);
    expect(groups!.sql).toContain('var_samp("fare_total")');
    expect(groups!.sql).toContain('"pass_holder" AS tc_member');
    expect(groups!.sql).toContain('percentile_cont(0.5) WITHIN GROUP (ORDER BY "fare_total")');
    // The window is moved to the launch date because the asked window starts before it.
    expect(groups!.params).toEqual(['2023-04-01', '2025-06-19']);
    expect(groups!.sql).not.toContain('2023-04-01');
    expect(sample!.name).toBe('sample');
    expect(sample!.sql).toContain('md5(CAST("booking_id" AS VARCHAR) || CAST($1 AS VARCHAR))');
    expect(sample!.sql).toContain('ROW_NUMBER() OVER (PARTITION BY "pass_holder"');
    expect(sample!.params).toEqual(['4021', '2023-04-01', '2025-06-19', 4000]);
  });

  it('compare: a window after the launch is kept as asked', () => {
    const [groups] = performanceCompareTemplate.compile({ ...base, window: { start: '2024-01-01', end: '2025-01-01' } }, ctx);
    expect(groups!.params).toEqual(['2024-01-01', '2025-01-01']);
  });

  it('compare: shares count hits with FILTER, ratios carry covariance, non-money metrics draw no sample', () => {
    const rate = performanceCompareTemplate.compile({ ...base, metrics: ['refund_rate'] }, ctx);
    expect(rate).toHaveLength(1);
    expect(rate[0]!.sql).toContain('COUNT(*) FILTER (WHERE "refunded")');
    const ratio = performanceCompareTemplate.compile({ ...base, metrics: ['fare_per_passenger'] }, ctx);
    expect(ratio[0]!.sql).toContain('covar_samp(COALESCE("fare_total", 0), COALESCE("passengers", 0))');
    expect(ratio).toHaveLength(1);
  });

  it('binds filter values, whatever they contain, and refuses personal data', () => {
    const hostile = "web'); DROP TABLE bookings; --";
    for (const { t, sq } of ALL) {
      for (const q of t.compile({ ...sq, filters: [{ dimension: 'channel', values: [hostile] }] }, ctx)) {
        expect(q.sql).not.toContain('DROP');
        expect(q.params).toContain(hostile);
      }
      expect(() => t.compile({ ...sq, filters: [{ dimension: 'customer_email', values: ['x'] }] }, ctx)).toThrow(/personal data/);
    }
    expect(() => performanceBySegmentTemplate.compile({ ...ALL[3]!.sq, dimension: 'customer_email' }, ctx)).toThrow(/personal data/);
  });

  it('compiles for a PostgreSQL-style dialect with no DuckDB-only functions and consistent placeholders', () => {
    for (const { t, sq } of ALL) {
      for (const q of t.compile(sq, { ...ctx, dialect: postgresLike, timeColumnType: 'timestamptz' })) {
        expect(q.sql).not.toMatch(/\bhash\(|\bmedian\(|\bquantile\(|\blist\(|::|date_diff|\bQUALIFY\b/i);
        const used = [...q.sql.matchAll(/\$(\d+)/g)].map((m) => Number(m[1]));
        expect(Math.max(...used)).toBe(q.params.length);
        expect(new Set(used).size).toBe(q.params.length);
        expect(q.sql).toContain('DOUBLE PRECISION');
      }
    }
  });

  it('frequency: aggregates per unit then per group, bucket bounds bound; needs a unit column', () => {
    const [q] = performanceFrequencyTemplate.compile(ALL[1]!.sq, ctx);
    expect(q!.sql).toContain('GROUP BY "customer_id"');
    expect(q!.sql).toContain('MAX(CASE WHEN "pass_holder" THEN 1 ELSE 0 END) AS tc_flag');
    // Bookings per customer are whole numbers: summarised from a tally of the counts, ranks read cumulatively.
    expect(q!.sql).toContain('GROUP BY 1, 2');
    expect(q!.sql).toContain('SUM(tc_k) OVER (PARTITION BY tc_flag ORDER BY tc_value ROWS BETWEEN UNBOUNDED PRECEDING AND CURRENT ROW) AS tc_cum');
    expect(q!.sql).toContain('(g.tc_n - 1) * 0.9');
    expect(q!.sql).not.toContain('percentile_cont');
    expect(q!.params).toEqual(['2023-04-01', '2025-06-19', 1, 1, 2, 5, 6]);
    const noUnit = { ...exampleDataset, comparison_groups: [{ ...exampleDataset.comparison_groups[0]!, unit_column: undefined }] };
    expect(() => performanceFrequencyTemplate.compile(ALL[1]!.sq, { ...ctx, dataset: noUnit })).toThrow(/unit_column/);
  });

  it('before/after: the whole window per period and group, plus monthly pieces when the grain is not a month', () => {
    const quarterly = performanceBeforeAfterTemplate.compile(ALL[2]!.sq, ctx);
    expect(quarterly.map((q) => q.name)).toEqual(['series', 'months']);
    expect(quarterly[0]!.sql).toContain(`date_trunc('quarter'`);
    expect(quarterly[1]!.sql).toContain(`date_trunc('month'`);
    expect(quarterly[0]!.params).toEqual(['2022-01-01', '2025-06-19']);
    expect(performanceBeforeAfterTemplate.compile({ ...ALL[2]!.sq, grain: 'month' }, ctx).map((q) => q.name)).toEqual(['series']);
  });

  it('by segment: ranks segments in SQL and folds past the bound top N; needs a dimension', () => {
    const [seg, groups] = performanceBySegmentTemplate.compile(ALL[3]!.sq, ctx);
    // Ranked by the metric asked (an average: its value, among segments with the rank floor's rows), never by rows alone.
    expect(seg!.sql).toContain('ROW_NUMBER() OVER (ORDER BY CASE WHEN tc_seg_rows >= tc_rank_floor THEN 0 ELSE 1 END, CASE WHEN tc_seg_value IS NULL THEN 1 ELSE 0 END, tc_seg_value DESC, tc_seg_rows DESC, tc_segment) AS tc_rank');
    expect(seg!.sql).toContain('AVG(');
    expect(seg!.sql).toContain('IS NOT DISTINCT FROM tc_base."route"');
    expect(seg!.params).toContain(8);
    expect(groups!.name).toBe('groups');
    expect(() => performanceBySegmentTemplate.compile({ ...ALL[3]!.sq, dimension: undefined }, ctx)).toThrow(/dimension/);
  });

  it('a metric is required and a named group must exist', () => {
    expect(() => performanceCompareTemplate.compile({ ...base, metrics: [] }, ctx)).toThrow(/no metric/);
    expect(() => performanceCompareTemplate.compile({ ...base, comparisonGroup: 'loyalty' }, ctx)).toThrow(/not a comparison group/);
  });
});

const meanRow = (member: boolean, n: number, mean: number, variance: number | null, median = mean): Record<string, CellValue> => ({
  tc_member: member,
  tc_n: n,
  tc_mean: mean,
  tc_var: variance,
  tc_value: mean,
  tc_rows: n,
  tc_median: median,
});

describe('reading edge cases: a clear finding or caveat, never an exception or NaN', () => {
  const read = (rows: Record<string, CellValue>[], sq = base) => performanceCompareTemplate.read(sq, { groups: table(rows) }, readCtx);

  it('a group with no rows', () => {
    const r = read([meanRow(false, 500, 39, 600)]);
    expect(find(r.findings, 'performance_no_test')).toMatchObject({ reason: 'empty_group', nFirst: 0, nSecond: 500 });
    expect(find(r.findings, 'performance_verdict')).toMatchObject({ verdict: 'no_clear_difference', basis: 'none' });
    expect(find(r.findings, 'performance_group', (f) => f.group === 'members')).toMatchObject({ n: 0, estimate: null, low: null });
    expect(r.caveats.map((c) => c.code)).toContain('observational');
    expect(allFinite(r)).toBe(true);
  });

  it('no rows at all', () => {
    const r = read([]);
    expect(r.caveats.map((c) => c.code)).toContain('no_data');
    expect(find(r.findings, 'performance_no_test')?.reason).toBe('empty_group');
    expect(allFinite(r)).toBe(true);
  });

  it('a group of size 1 (SQL var_samp is NULL there)', () => {
    const r = read([meanRow(true, 1, 30, null), meanRow(false, 500, 39, 600)]);
    expect(find(r.findings, 'performance_no_test')?.reason).toBe('too_few');
    expect(find(r.findings, 'performance_group', (f) => f.group === 'members')).toMatchObject({ n: 1, estimate: 30, sd: null, low: null, high: null });
    expect(r.caveats).toContainEqual({ code: 'small_sample', data: expect.objectContaining({ n: 1, group: 'members' }) });
    expect(allFinite(r)).toBe(true);
  });

  it('identical values in both groups (sd 0): no test, and no verdict unless the values differ', () => {
    const same = read([meanRow(true, 40, 10, 0), meanRow(false, 40, 10, 0)]);
    expect(find(same.findings, 'performance_no_test')?.reason).toBe('no_variation');
    expect(find(same.findings, 'performance_verdict')).toMatchObject({ verdict: 'no_clear_difference', direction: 'equal' });
    const apart = read([meanRow(true, 40, 10, 0), meanRow(false, 40, 12, 0)]);
    // average_fare has higher_is_better: a lower exact value is worse.
    expect(find(apart.findings, 'performance_verdict')).toMatchObject({ verdict: 'worse', basis: 'exact', pValue: null });
    expect(allFinite(same) && allFinite(apart)).toBe(true);
  });

  it('a share with no hits in either group', () => {
    const r = performanceCompareTemplate.read(
      { ...base, metrics: ['refund_rate'] },
      { groups: table([{ tc_member: true, tc_n: 50, tc_hits: 0, tc_value: 0, tc_rows: 50 }, { tc_member: false, tc_n: 80, tc_hits: 0, tc_value: 0, tc_rows: 80 }]) },
      readCtx,
    );
    expect(find(r.findings, 'performance_no_test')?.reason).toBe('no_variation');
    expect(find(r.findings, 'performance_group', (f) => f.group === 'members')).toMatchObject({ estimate: 0, low: 0 });
    expect(allFinite(r)).toBe(true);
  });

  it('a truncated result is flagged', () => {
    const r = performanceCompareTemplate.read(base, { groups: { ...table([meanRow(true, 40, 10, 1), meanRow(false, 40, 12, 1)]), truncated: true } }, readCtx);
    expect(r.caveats.map((c) => c.code)).toContain('truncated');
  });

  it('frequency, before/after and by-segment read empty tables without throwing', () => {
    for (const { t, sq } of ALL) {
      const r = t.read(sq, {}, readCtx);
      expect(allFinite(r)).toBe(true);
      expect(r.caveats.map((c) => c.code)).toContain('observational');
    }
  });

  it('before/after with a single member row before launch still gives a DiD without a spread', () => {
    const row = (period: string, member: boolean, n: number, mean: number, v: number | null): Record<string, CellValue> => ({ period, ...meanRow(member, n, mean, v) });
    const months = ['2023-01-01', '2023-02-01', '2023-03-01', '2023-04-01', '2023-05-01', '2023-06-01'];
    const rows = months.flatMap((p, i) => [row(p, true, i === 0 ? 1 : 0, 30, null), row(p, false, 100, 40 + i, 25)]).filter((r) => (r.tc_n as number) > 0);
    rows.push(row('2023-04-01', true, 50, 31, 20));
    const sq = { ...ALL[2]!.sq, grain: 'month' as const, window: { start: '2023-01-01', end: '2023-07-01' } };
    const r = performanceBeforeAfterTemplate.read(sq, { series: table(rows) }, readCtx);
    const did = find(r.findings, 'performance_did');
    expect(did).toBeDefined();
    // Members before is one row: its variance is unknown, so the contrast has no interval.
    expect(did).toMatchObject({ membersBefore: 30, membersAfter: 31, ci: null, pValue: null });
    expect(allFinite(r)).toBe(true);
  });
});

describe('equal windows either side of a launch', () => {
  it('uses whole years when a year or more is available on both sides', () => {
    expect(equalWindows('2023-04-01', '2022-01-01', '2025-06-19')).toMatchObject({
      before: { start: '2022-04-01', end: '2023-04-01' },
      after: { start: '2023-04-01', end: '2024-04-01' },
      months: 12,
    });
  });
  it('skips the month a mid-month launch falls in, and keeps fewer than 12 months as they are', () => {
    expect(equalWindows('2023-04-15', '2022-11-01', '2024-01-01')).toMatchObject({
      before: { start: '2022-11-01', end: '2023-04-01' },
      after: { start: '2023-05-01', end: '2023-10-01' },
      months: 5,
    });
  });
  it('is null when a side has no complete month', () => {
    expect(equalWindows('2023-04-01', '2023-03-10', '2024-01-01')).toBeNull();
  });
});

describe('performance statistics', () => {
  it('Wilson score interval reproduces Newcombe (1998) for 81 of 263', () => {
    // Newcombe RG (1998), Statistics in Medicine 17:857–872, Table I, method 3 (score): 0.2553 to 0.3662.
    // Values recalled from memory of the paper's worked example.
    const [lo, hi] = wilsonInterval(81, 263, 0.95)!;
    expect(lo).toBeCloseTo(0.2553, 4);
    expect(hi).toBeCloseTo(0.3662, 4);
    expect(wilsonInterval(0, 0, 0.95)).toBeNull();
    expect(wilsonInterval(0, 10, 0.95)![0]).toBe(0);
  });

  // Independent computations from raw (x, y) rows, written without the module's moment algebra.
  const xs = [12.5, 30, 7.25, 44, 18, 9.5, 26, 33.75, 15, 21];
  const ys = [1, 3, 1, 4, 2, 1, 2, 3, 2, 2];
  function ratioCellOf(x: number[], y: number[]): RatioCell {
    const n = x.length;
    const mx = x.reduce((a, b) => a + b, 0) / n;
    const my = y.reduce((a, b) => a + b, 0) / n;
    let m2x = 0;
    let m2y = 0;
    let cxy = 0;
    for (let i = 0; i < n; i++) {
      m2x += (x[i]! - mx) ** 2;
      m2y += (y[i]! - my) ** 2;
      cxy += (x[i]! - mx) * (y[i]! - my);
    }
    return { kind: 'ratio', n, mx, my, m2x, m2y, cxy };
  }

  it('delta-method variance of a ratio of sums equals the linearised residual form Σ(x − R·y)² / ((n − 1)·n·ȳ²)', () => {
    const n = xs.length;
    const r = xs.reduce((a, b) => a + b, 0) / ys.reduce((a, b) => a + b, 0);
    const ybar = ys.reduce((a, b) => a + b, 0) / n;
    const resid = xs.reduce((acc, x, i) => acc + (x - r * ys[i]!) ** 2, 0);
    expect(cellVariance(ratioCellOf(xs, ys))!.variance).toBeCloseTo(resid / (n - 1) / (n * ybar * ybar), 12);
  });

  it('pooling ratio cells over disjoint parts equals the cell of all rows', () => {
    const pooled = poolCells([ratioCellOf(xs.slice(0, 3), ys.slice(0, 3)), ratioCellOf(xs.slice(3), ys.slice(3))], 'ratio', false) as RatioCell;
    const whole = ratioCellOf(xs, ys);
    for (const k of ['n', 'mx', 'my', 'm2x', 'm2y', 'cxy'] as const) expect(pooled[k]).toBeCloseTo(whole[k], 10);
  });

  it('the difference-in-differences contrast matches a plain computation with jStat Student t', () => {
    const jStat = createRequire(import.meta.url)('jstat') as { studentt: { cdf(x: number, df: number): number; inv(p: number, df: number): number } };
    const groups = [
      [31, 35, 28, 40, 33, 29, 36],
      [30, 26, 33, 27, 29, 31],
      [38, 41, 37, 44, 39, 40, 42, 36],
      [37, 35, 39, 36, 38, 34],
    ];
    const cells: Cell[] = groups.map((g) => {
      const mean = g.reduce((a, b) => a + b, 0) / g.length;
      return { kind: 'mean', n: g.length, mean, m2: g.reduce((a, b) => a + (b - mean) ** 2, 0) };
    });
    const weights = [1, -1, -1, 1];
    const r = contrast(cells.map((cell, i) => ({ cell, weight: weights[i]! })), 0.95)!;
    const stats = groups.map((g) => {
      const m = g.reduce((a, b) => a + b, 0) / g.length;
      const v = g.reduce((a, b) => a + (b - m) ** 2, 0) / (g.length - 1) / g.length;
      return { m, v, df: g.length - 1 };
    });
    const est = stats.reduce((a, s, i) => a + weights[i]! * s.m, 0);
    const se2 = stats.reduce((a, s) => a + s.v, 0);
    const df = (se2 * se2) / stats.reduce((a, s) => a + (s.v * s.v) / s.df, 0);
    const t = est / Math.sqrt(se2);
    expect(r.estimate).toBeCloseTo(est, 12);
    expect(r.df!).toBeCloseTo(df, 9);
    expect(r.statistic!).toBeCloseTo(t, 9);
    expect(r.pValue!).toBeCloseTo(2 * jStat.studentt.cdf(-Math.abs(t), df), 7);
    const half = jStat.studentt.inv(0.975, df) * Math.sqrt(se2);
    expect(r.ci![0]).toBeCloseTo(est - half, 6);
    expect(r.test).toBe('did_t');
  });

  it('the ratio-of-means interval contains the ratio and stays positive', () => {
    const [lo, hi] = ratioOfMeansInterval(4.3, 0.02, 1.7, 0.004, 0.95)!;
    expect(lo).toBeGreaterThan(0);
    expect(lo).toBeLessThan(4.3 / 1.7);
    expect(hi).toBeGreaterThan(4.3 / 1.7);
    expect(ratioOfMeansInterval(0, 0.1, 1, 0.1, 0.95)).toBeNull();
  });

  it('verdict follows higher_is_better and alpha', () => {
    const lower = compareCells({ kind: 'proportion', n: 1000, hits: 40 }, { kind: 'proportion', n: 1000, hits: 80 }, 0.95);
    expect(verdictOf(lower, false, 0.05).verdict).toBe('better');
    expect(verdictOf(lower, true, 0.05).verdict).toBe('worse');
    const faint = compareCells({ kind: 'proportion', n: 100, hits: 5 }, { kind: 'proportion', n: 100, hits: 6 }, 0.95);
    expect(verdictOf(faint, false, 0.05)).toMatchObject({ verdict: 'no_clear_difference', basis: 'test' });
  });
});
