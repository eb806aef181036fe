// The growth family without a database: compiled SQL (pure), and reading hand-built result
// tables, checked against worked examples and hand arithmetic.
import { describe, expect, it } from 'vitest';
import type { CompileContext } from '../../../analysis/compile-context.js';
import type { Coverage } from '../../../analysis/coverage.js';
import type {
  GrowthCagrFinding,
  GrowthDriversFinding,
  GrowthRateSummaryFinding,
  GrowthSeriesFinding,
  GrowthShareShiftFinding,
  GrowthYearsFinding,
  GrowthYtdFinding,
} from '../../../analysis/findings/growth.js';
import { duckdbDialect } from '../../../analysis/sql/dialect.js';
import { compileWindowComparison, priorWindow, shiftDayByYears } from '../../../analysis/templates/growth-compare.js';
import { DRIVERS_TOP_N, growthDriversTemplate } from '../../../analysis/templates/growth-drivers.js';
import { compileGrowthSeries, growthSeriesTemplate } from '../../../analysis/templates/growth-series.js';
import { caveatNote } from '../../../analysis/captions/caveat-text.js';
import { growthShareShiftTemplate } from '../../../analysis/templates/growth-share-shift.js';
import { growthSummaryTemplate } from '../../../analysis/templates/growth-summary.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { Finding, ResultTable, SubQuestion } from '../../../analysis/types.js';
import { exampleDataset } from '../../helpers/example-config.js';

// The query shapes without small-group suppression (the example config turns it on; its SQL is
// tested in small-groups.test.ts).
const ctx: CompileContext = { dataset: { ...exampleDataset, min_group_size: 0 }, dialect: duckdbDialect, timeColumnType: 'date' };
const readCtx = (coverage: Coverage) => ({ dataset: exampleDataset, coverage });
const series: SubQuestion = {
  id: 'g1',
  kind: 'growth',
  lens: 'time_pattern',
  template: 'growth_series',
  metrics: ['revenue'],
  grain: 'month',
  window: { start: '2022-01-01', end: '2025-07-01' },
  filters: [],
};
const drivers: SubQuestion = {
  ...series,
  id: 'g2',
  lens: 'breakdown',
  template: 'growth_drivers',
  dimension: 'channel',
  window: { start: '2024-06-01', end: '2024-09-01' },
};

const find = <T extends Finding['type']>(fs: Finding[], type: T, metric = 'revenue') =>
  fs.find((f) => f.type === type && 'metric' in f && f.metric === metric) as Extract<Finding, { type: T }> | undefined;

describe('growth templates are registered', () => {
  it('under their own names', () => {
    for (const name of ['growth_series', 'growth_drivers', 'growth_summary', 'growth_share_shift'] as const) {
      expect(SUB_QUESTIONS[name]).toMatchObject({ name, kind: 'growth' });
    }
  });
});

describe('growth_series SQL', () => {
  it('is one grouped query by period, by year and by year-to-date, with every value bound', () => {
    const [q, ...rest] = growthSeriesTemplate.compile(series, ctx);
    expect(rest).toHaveLength(0);
    expect(q!.name).toBe('growth');
    expect(q!.sql).toContain('GROUP BY GROUPING SETS (("__tc_period"), ("__tc_year"), ("__tc_year", "__tc_ytd"))');
    expect(q!.sql).toContain(`CAST(date_trunc('month', "__tc_day") AS DATE) AS "__tc_period"`);
    expect(q!.sql).toContain('CAST(SUM("fare_total") AS DOUBLE) AS "revenue"');
    expect(q!.params).toEqual(['2022-01-01', '2025-07-01']);
    expect(q!.sql).not.toContain('2022-01-01');
  });

  it('keeps a ratio metric a ratio of sums at every grouping', () => {
    const q = compileGrowthSeries({ ...series, metrics: ['fare_per_passenger'] }, ctx);
    expect(q.sql).toContain('(CAST(SUM("fare_total") AS DOUBLE) / NULLIF(CAST(SUM("passengers") AS DOUBLE), 0))');
    expect(q.sql).not.toMatch(/AVG\(/);
  });

  it('binds filter values and refuses personal data', () => {
    const hostile = "web'); DROP TABLE bookings; --";
    const q = compileGrowthSeries({ ...series, filters: [{ dimension: 'channel', values: [hostile] }] }, ctx);
    expect(q.sql).not.toContain('DROP');
    expect(q.params).toContain(hostile);
    expect(() => compileGrowthSeries({ ...series, filters: [{ dimension: 'customer_email', values: ['a@b'] }] }, ctx)).toThrow(/personal data/);
  });

  it('binds the time zone for a timestamp-with-zone column', () => {
    const q = compileGrowthSeries(series, { ...ctx, timeColumnType: 'timestamptz' });
    expect(q.sql).toContain('timezone($1, "sail_date")');
    expect(q.params[0]).toBe('Europe/Dublin');
  });
});

describe('two-window SQL (drivers and share shift)', () => {
  it('binds the window and the same dates a year earlier, and groups by the catalog column', () => {
    const q = compileWindowComparison(drivers, ctx);
    // The last parameter: the days a segment may start late or end early and still be like for like (92 days / 12).
    expect(q.params).toEqual(['2024-06-01', '2024-09-01', '2023-06-01', '2023-09-01', 7]);
    expect(q.sql).toContain('GROUP BY GROUPING SETS (("__tc_window", "channel", "__tc_lfl"), ("__tc_window"), ("__tc_window", "__tc_lfl"))');
    expect(q.sql).toContain('UNION ALL');
    expect(q.sql).not.toMatch(/'20\d\d-/);
  });

  it('needs a dimension, never a personal one', () => {
    expect(() => compileWindowComparison({ ...drivers, dimension: undefined }, ctx)).toThrow(/needs a dimension/);
    expect(() => compileWindowComparison({ ...drivers, dimension: 'customer_email' }, ctx)).toThrow(/personal data/);
    expect(() => growthShareShiftTemplate.compile({ ...drivers, dimension: 'nope' }, ctx)).toThrow(/not a dimension/);
  });

  it('moves window edges back a year the way a half-open window needs, and days the way SQL does', () => {
    // Worked by hand: [.., 29 Feb 2024) ends after 28 Feb 2024, so a year earlier it ends after 28 Feb 2023.
    expect(priorWindow({ start: '2024-02-29', end: '2024-03-01' })).toEqual({ start: '2023-03-01', end: '2023-03-01' });
    expect(priorWindow({ start: '2024-06-01', end: '2024-09-01' })).toEqual({ start: '2023-06-01', end: '2023-09-01' });
    expect(shiftDayByYears('2024-02-29', -1)).toBe('2023-02-28');
    expect(shiftDayByYears('2024-02-29', 1)).toBe('2025-02-28');
    expect(shiftDayByYears('2025-06-18', -1)).toBe('2024-06-18');
  });
});

// ---- reading hand-built tables --------------------------------------------------------------

type Row = Record<string, string | number | boolean | null>;
const table = (rows: Row[]): ResultTable => ({ columns: [], rows, truncated: false });
const periodRow = (period: string, revenue: number | null): Row => ({ g_period: 0, g_ytd: 1, period, year: null, ytd: null, through: null, revenue, row_count: 1 });
const yearRow = (year: string, revenue: number | null): Row => ({ g_period: 1, g_ytd: 1, period: null, year, ytd: null, through: null, revenue, row_count: 1 });
const ytdRow = (year: string, revenue: number | null, through: string): Row => ({ g_period: 1, g_ytd: 0, period: null, year, ytd: true, through, revenue, row_count: 1 });

describe('growth_series read: worked examples', () => {
  it('gives 10% CAGR for 100 → 121 over two years (common practice worked example)', () => {
    const sq: SubQuestion = { ...series, grain: 'year', window: { start: '2020-01-01', end: '2023-01-01' } };
    const rows = [
      periodRow('2020-01-01', 100),
      periodRow('2021-01-01', 110),
      periodRow('2022-01-01', 121),
      yearRow('2020-01-01', 100),
      yearRow('2021-01-01', 110),
      yearRow('2022-01-01', 121),
      ytdRow('2022-01-01', 121, '2022-12-31'),
    ];
    const r = growthSeriesTemplate.read(sq, { growth: table(rows) }, readCtx({ firstDate: '2020-01-01', lastDate: '2022-12-31', rows: 3 }));
    const cagr = find(r.findings, 'growth_cagr') as GrowthCagrFinding;
    expect(cagr.years).toBe(2);
    expect(cagr.rate).toBeCloseTo(0.1, 12);
    const years = find(r.findings, 'growth_years') as GrowthYearsFinding;
    expect(years.years.map((y) => y.yoy)).toEqual([null, expect.closeTo(0.1, 12), expect.closeTo(0.1, 12)]);
    // A year ending on 31 December is a whole year: no separate year-to-date.
    expect(find(r.findings, 'growth_ytd')).toBeUndefined();
    expect(r.caveats).toEqual([]);
  });

  it('computes month-on-month, year-on-year and trailing-12 growth by hand arithmetic', () => {
    // 24 months: 100 each month in year one, 110 in year two except December at 132.
    const months = Array.from({ length: 24 }, (_, i) => `${2022 + Math.floor(i / 12)}-${String((i % 12) + 1).padStart(2, '0')}-01`);
    const value = (i: number) => (i < 12 ? 100 : i === 23 ? 132 : 110);
    const rows = months.map((m, i) => periodRow(m, value(i)));
    const sq: SubQuestion = { ...series, window: { start: '2022-01-01', end: '2024-01-01' } };
    const r = growthSeriesTemplate.read(sq, { growth: table(rows) }, readCtx({ firstDate: '2022-01-01', lastDate: '2023-12-31', rows: 24 }));
    const s = find(r.findings, 'growth_series') as GrowthSeriesFinding;
    expect(s.yoyLag).toBe(12);
    expect(s.trailingWindow).toBe(12);
    const dec = s.points[23]!;
    expect(dec.yoy).toBeCloseTo(0.32, 12); // 132 / 100 − 1
    expect(dec.pop).toBeCloseTo(0.2, 12); // 132 / 110 − 1
    expect(dec.trailing).toBeCloseTo((11 * 110 + 132) / 1200 - 1, 12);
    expect(s.points[22]!.trailing).toBeNull(); // the prior trailing-12 sum does not exist yet
    expect(s.points.slice(0, 12).every((p) => p.yoy === null)).toBe(true);
  });

  it('leaves a partial last month out of every rate and says so', () => {
    const rows = [
      periodRow('2025-04-01', 100),
      periodRow('2025-05-01', 120),
      periodRow('2025-06-01', 50),
    ];
    const sq: SubQuestion = { ...series, window: { start: '2025-04-01', end: '2025-07-01' } };
    const r = growthSeriesTemplate.read(sq, { growth: table(rows) }, readCtx({ firstDate: '2022-01-01', lastDate: '2025-06-18', rows: 3 }));
    const s = find(r.findings, 'growth_series') as GrowthSeriesFinding;
    const june = s.points.find((p) => p.period === '2025-06-01')!;
    expect(june).toMatchObject({ value: 50, partial: true, pop: null, yoy: null, trailing: null });
    expect(s.points[1]!.pop).toBeCloseTo(0.2, 12);
    expect(r.caveats).toContainEqual({
      code: 'partial_period_excluded',
      data: { period: '2025-06-01', grain: 'month', coveredFrom: '2025-06-01', coveredTo: '2025-06-18' },
    });
  });

  it('gives the year to date against the same dates a year earlier', () => {
    const rows = [
      periodRow('2024-01-01', 10),
      periodRow('2025-01-01', 9),
      yearRow('2024-01-01', 200),
      yearRow('2025-01-01', 90),
      ytdRow('2024-01-01', 100, '2025-06-18'),
      ytdRow('2025-01-01', 95, '2025-06-18'),
    ];
    const sq: SubQuestion = { ...series, window: { start: '2024-01-01', end: '2025-06-19' } };
    const r = growthSeriesTemplate.read(sq, { growth: table(rows) }, readCtx({ firstDate: '2024-01-01', lastDate: '2025-06-18', rows: 2 }));
    const ytd = find(r.findings, 'growth_ytd') as GrowthYtdFinding;
    expect(ytd).toMatchObject({ through: '2025-06-18', current: { year: '2025-01-01', value: 95 }, prior: { year: '2024-01-01', value: 100 }, absolute: -5 });
    expect(ytd.relative).toBeCloseTo(-0.05, 12);
    const years = find(r.findings, 'growth_years') as GrowthYearsFinding;
    expect(years.years.map((y) => y.complete)).toEqual([true, false]);
    expect(years.years[1]!.yoy).toBeNull(); // half a year against a whole one is never a rate
    expect(find(r.findings, 'growth_cagr')).toBeUndefined(); // one complete year only
  });
});

describe('growth_series read: a whole year is not a year so far', () => {
  it('gives no year to date when the last year is covered in full, even if its last day has no rows', () => {
    const rows = [periodRow('2024-01-01', 1), yearRow('2023-01-01', 10), yearRow('2024-01-01', 12), ytdRow('2023-01-01', 10, '2024-12-30'), ytdRow('2024-01-01', 12, '2024-12-30')];
    const sq: SubQuestion = { ...series, window: { start: '2023-01-01', end: '2025-01-01' } };
    const r = growthSeriesTemplate.read(sq, { growth: table(rows) }, readCtx({ firstDate: '2023-01-01', lastDate: '2024-12-31', rows: 2 }));
    expect(find(r.findings, 'growth_ytd')).toBeUndefined();
    expect((find(r.findings, 'growth_years') as GrowthYearsFinding).years[1]!.yoy).toBeCloseTo(0.2, 12);
  });
});

describe('growth_series read: robustness', () => {
  const cov = { firstDate: '2022-01-01', lastDate: '2025-06-18', rows: 10 };

  it('a window with no data gives a no_data caveat and no findings', () => {
    const sq: SubQuestion = { ...series, window: { start: '2030-01-01', end: '2031-01-01' } };
    const r = growthSeriesTemplate.read(sq, { growth: table([]) }, readCtx(cov));
    expect(r.findings).toEqual([]);
    expect(r.caveats.map((c) => c.code)).toEqual(['no_data']);
    const empty = growthSeriesTemplate.read(series, {}, readCtx({ firstDate: null, lastDate: null, rows: 0 }));
    expect(empty.caveats.map((c) => c.code)).toEqual(['no_data']);
  });

  it('a single period gives a single_period caveat and null rates', () => {
    const sq: SubQuestion = { ...series, window: { start: '2024-03-01', end: '2024-04-01' } };
    const r = growthSeriesTemplate.read(sq, { growth: table([periodRow('2024-03-01', 5)]) }, readCtx(cov));
    const s = find(r.findings, 'growth_series') as GrowthSeriesFinding;
    expect(s.points).toHaveLength(1);
    expect(s.points[0]).toMatchObject({ value: 5, pop: null, yoy: null, trailing: null });
    expect(r.caveats.map((c) => c.code)).toContain('single_period');
  });

  it('a metric that is all null gives an all_null caveat', () => {
    const sq: SubQuestion = { ...series, window: { start: '2024-01-01', end: '2024-04-01' } };
    const rows = ['2024-01-01', '2024-02-01', '2024-03-01'].map((p) => periodRow(p, null));
    const r = growthSeriesTemplate.read(sq, { growth: table(rows) }, readCtx(cov));
    expect(r.findings).toEqual([]);
    expect(r.caveats).toContainEqual({ code: 'all_null', data: { metric: 'revenue' } });
  });

  it('a zero base gives null growth and a base_zero caveat, never Infinity or NaN', () => {
    const sq: SubQuestion = { ...series, grain: 'year', window: { start: '2022-01-01', end: '2025-01-01' } };
    const rows = [
      periodRow('2022-01-01', 0),
      periodRow('2023-01-01', 50),
      periodRow('2024-01-01', 60),
      yearRow('2022-01-01', 0),
      yearRow('2023-01-01', 50),
      yearRow('2024-01-01', 60),
    ];
    const r = growthSeriesTemplate.read(sq, { growth: table(rows) }, readCtx(cov));
    const s = find(r.findings, 'growth_series') as GrowthSeriesFinding;
    expect(s.points[1]!.pop).toBeNull();
    expect(s.points[2]!.pop).toBeCloseTo(0.2, 12);
    expect((find(r.findings, 'growth_cagr') as GrowthCagrFinding).rate).toBeNull();
    expect(r.caveats.map((c) => c.code)).toContain('base_zero');
    expect(JSON.stringify(r)).not.toMatch(/NaN|Infinity/);
  });

  it('says when the database cut the result', () => {
    const t = { ...table([periodRow('2024-01-01', 1)]), truncated: true };
    const r = growthSeriesTemplate.read({ ...series, window: { start: '2024-01-01', end: '2024-02-01' } }, { growth: t }, readCtx(cov));
    expect(r.caveats.map((c) => c.code)).toContain('truncated');
  });
});

describe('growth_summary read', () => {
  it('summarises year-over-year rates with the periods of the extremes (hand arithmetic)', () => {
    // Quarters: 100, 100, 100, 100 then 110, 90, 120, 100 → year-over-year 10%, −10%, 20%, 0%.
    const qs = ['2023-01-01', '2023-04-01', '2023-07-01', '2023-10-01', '2024-01-01', '2024-04-01', '2024-07-01', '2024-10-01'];
    const vals = [100, 100, 100, 100, 110, 90, 120, 100];
    const sq: SubQuestion = { ...series, template: 'growth_summary', grain: 'quarter', window: { start: '2023-01-01', end: '2025-01-01' } };
    const r = growthSummaryTemplate.read(sq, { growth: table(qs.map((q, i) => periodRow(q, vals[i]!))) }, readCtx({ firstDate: '2023-01-01', lastDate: '2024-12-31', rows: 8 }));
    const f = find(r.findings, 'growth_rate_summary') as GrowthRateSummaryFinding;
    expect(f.basis).toBe('yoy');
    expect(f.n).toBe(4);
    expect(f.min).toEqual({ period: '2024-04-01', value: expect.closeTo(-0.1, 12) });
    expect(f.max).toEqual({ period: '2024-07-01', value: expect.closeTo(0.2, 12) });
    expect(f.mean).toBeCloseTo(0.05, 12);
    expect(f.median).toBeCloseTo(0.05, 12);
    // Sample SD of 0.1, −0.1, 0.2, 0: deviations 0.05, −0.15, 0.15, −0.05 → Σd² = 0.05, /3, √.
    expect(f.sd).toBeCloseTo(Math.sqrt(0.05 / 3), 12);
  });

  it('falls back to period-over-period rates, and gives a clear caveat when there is no rate at all', () => {
    const sq: SubQuestion = { ...series, template: 'growth_summary', window: { start: '2024-01-01', end: '2024-04-01' } };
    const cov = { firstDate: '2024-01-01', lastDate: '2024-03-31', rows: 3 };
    const r = growthSummaryTemplate.read(sq, { growth: table([periodRow('2024-01-01', 100), periodRow('2024-02-01', 150), periodRow('2024-03-01', 120)]) }, readCtx(cov));
    const f = find(r.findings, 'growth_rate_summary') as GrowthRateSummaryFinding;
    expect(f.basis).toBe('pop');
    expect(f.rates.map((x) => x.value)).toEqual([expect.closeTo(0.5, 12), expect.closeTo(-0.2, 12)]);
    expect(r.caveats.map((c) => c.code)).toContain('small_sample');
    const one = growthSummaryTemplate.read({ ...sq, window: { start: '2024-01-01', end: '2024-02-01' } }, { growth: table([periodRow('2024-01-01', 100)]) }, readCtx(cov));
    expect((find(one.findings, 'growth_rate_summary') as GrowthRateSummaryFinding).n).toBe(0);
    expect(one.caveats.map((c) => c.code)).toContain('single_period');
  });
});

// ---- two-window reads ---------------------------------------------------------------------

const sideRow = (window: 'current' | 'prior', segment: string | null, revenue: number | null, rows = 10, firstDay = '2024-06-01', total = false): Row => ({
  window_name: window,
  g_segment: total ? 1 : 0,
  segment,
  revenue,
  fare_per_passenger: revenue === null ? null : revenue / 100,
  row_count: rows,
  first_day: firstDay,
  last_day: firstDay,
});
const fullCoverage = { firstDate: '2022-01-01', lastDate: '2025-06-18', rows: 100 };

describe('growth_drivers read', () => {
  it('gives changes, contributions and shares of the change that add up (hand arithmetic)', () => {
    // Before: a 100, b 50, c 50 (200). After: a 130, b 40, c 60, d 20 (250). Change +50.
    const rows = [
      sideRow('prior', 'a', 100), sideRow('prior', 'b', 50), sideRow('prior', 'c', 50), sideRow('prior', null, 200, 30, '2023-06-01', true),
      sideRow('current', 'a', 130), sideRow('current', 'b', 40), sideRow('current', 'c', 60), // d's first record in the whole table is 15 July 2024: it opened (the SQL's presence columns).
      { ...sideRow('current', 'd', 20, 2, '2024-07-15'), like_for_like: false, opened: true, closed: false, life_first: '2024-07-15' },
      sideRow('current', null, 250, 32, '2024-06-01', true),
    ];
    const r = growthDriversTemplate.read(drivers, { drivers: table(rows) }, readCtx(fullCoverage));
    const f = find(r.findings, 'growth_drivers') as GrowthDriversFinding;
    expect(f.total).toEqual({ before: 200, after: 250, change: 50, relative: 0.25 });
    expect(f.segments.map((s) => s.segment)).toEqual(['a', 'd', 'b', 'c']); // |30| > |20| > |−10| = |10|, ties by name
    const a = f.segments[0]!;
    expect(a).toMatchObject({ before: 100, after: 130, change: 30 });
    expect(a.shareOfChange).toBeCloseTo(0.6, 12);
    expect(a.contribution).toBeCloseTo(0.15, 12);
    const d = f.segments[1]!;
    expect(d).toMatchObject({ before: 0, after: 20, change: 20, relative: null });
    expect(f.segments.reduce((acc, s) => acc + s.contribution!, 0)).toBeCloseTo(0.25, 12);
    expect(f.segments.reduce((acc, s) => acc + s.shareOfChange!, 0)).toBeCloseTo(1, 12);
    // The note names the earlier span compared, here the same dates a year earlier.
    expect(r.caveats).toContainEqual({ code: 'late_segment', data: { segment: 'd', firstPeriod: '2024-07-15', grain: 'day', earlierStart: '2023-06-01', earlierEnd: '2023-09-01', yearEarlier: true } });
    expect(r.caveats.map((c) => c.code)).toContain('base_zero');
  });

  it('folds segments past the top N into All others, keeping the sums', () => {
    const n = DRIVERS_TOP_N + 3;
    const rows: Row[] = [];
    for (let i = 0; i < n; i++) {
      rows.push(sideRow('prior', `s${String(i).padStart(2, '0')}`, 100), sideRow('current', `s${String(i).padStart(2, '0')}`, 100 + i));
    }
    rows.push(sideRow('prior', null, 100 * n, 99, '2023-06-01', true), sideRow('current', null, 100 * n + (n * (n - 1)) / 2, 99, '2024-06-01', true));
    const r = growthDriversTemplate.read(drivers, { drivers: table(rows) }, readCtx(fullCoverage));
    const f = find(r.findings, 'growth_drivers') as GrowthDriversFinding;
    expect(f.segments).toHaveLength(DRIVERS_TOP_N);
    expect(f.others).toMatchObject({ count: 3, change: 0 + 1 + 2 });
    expect(r.caveats).toContainEqual({ code: 'segments_folded', data: { count: 3, metric: 'revenue', folded: 'change' } });
  });

  it('gives changes only, no contributions, for a ratio metric', () => {
    const rows = [
      sideRow('prior', 'a', 100), sideRow('prior', null, 200, 30, '2023-06-01', true),
      sideRow('current', 'a', 150), sideRow('current', null, 250, 30, '2024-06-01', true),
    ];
    const r = growthDriversTemplate.read({ ...drivers, metrics: ['fare_per_passenger'] }, { drivers: table(rows) }, readCtx(fullCoverage));
    const f = find(r.findings, 'growth_drivers', 'fare_per_passenger') as GrowthDriversFinding;
    expect(f.additive).toBe(false);
    expect(f.segments[0]).toMatchObject({ segment: 'a', change: 0.5, contribution: null, shareOfChange: null });
  });

  it('cuts the current window to the data and says so; an empty result is a no_data caveat', () => {
    const sq = { ...drivers, window: { start: '2025-06-01', end: '2025-09-01' } };
    const rows = [sideRow('prior', 'a', 10, 1, '2024-06-01', true), sideRow('current', 'a', 9, 1, '2025-06-01', true)];
    const r = growthDriversTemplate.read(sq, { drivers: table(rows) }, readCtx(fullCoverage));
    const f = find(r.findings, 'growth_drivers') as GrowthDriversFinding;
    expect(f.current).toEqual({ start: '2025-06-01', end: '2025-06-19' });
    expect(f.prior).toEqual({ start: '2024-06-01', end: '2024-06-19' });
    expect(r.caveats).toContainEqual({
      code: 'partial_period',
      data: { period: '2025-06-01', grain: 'day', coveredFrom: '2025-06-01', coveredTo: '2025-06-18', window: 'current' },
    });
    const none = growthDriversTemplate.read({ ...drivers, window: { start: '2030-01-01', end: '2030-02-01' } }, { drivers: table([]) }, readCtx(fullCoverage));
    expect(none.findings).toEqual([]);
    expect(none.caveats.map((c) => c.code)).toContain('no_data');
  });

  it('a window whose year-earlier dates precede the data says the earlier year is missing', () => {
    const r = growthDriversTemplate.read({ ...drivers, window: { start: '2022-06-01', end: '2022-09-01' } }, { drivers: table([]) }, readCtx(fullCoverage));
    expect(r.findings).toEqual([]);
    expect(r.caveats).toEqual([{ code: 'no_data', data: { start: '2021-06-01', end: '2021-09-01', window: 'prior', yearEarlier: true } }]);
  });

  it('an all-null metric is an all_null caveat, not an exception', () => {
    const rows = [sideRow('prior', 'a', null, 5, '2023-06-01'), sideRow('prior', null, null, 5, '2023-06-01', true), sideRow('current', 'a', null), sideRow('current', null, null, 10, '2024-06-01', true)];
    const r = growthDriversTemplate.read(drivers, { drivers: table(rows) }, readCtx(fullCoverage));
    expect(r.findings).toEqual([]);
    expect(r.caveats).toContainEqual({ code: 'all_null', data: { metric: 'revenue' } });
  });
});

describe('growth_share_shift read', () => {
  it('gives shares, point changes, the HHI and the count to 80% (DoJ worked example)', () => {
    // U.S. DoJ, "Herfindahl-Hirschman Index" page (recalled from memory): shares of 30, 30, 20 and 20
    // percent give an HHI of 2,600. After: 50, 30, 20 (d gone) gives 2,500 + 900 + 400 = 3,800.
    const rows = [
      sideRow('prior', 'a', 30), sideRow('prior', 'b', 30), sideRow('prior', 'c', 20), { ...sideRow('prior', 'd', 20), like_for_like: false, opened: false, closed: true }, sideRow('prior', null, 100, 40, '2023-06-01', true),
      sideRow('current', 'a', 50), sideRow('current', 'b', 30), sideRow('current', 'c', 20), sideRow('current', null, 100, 30, '2024-06-01', true),
    ];
    const r = growthShareShiftTemplate.read({ ...drivers, template: 'growth_share_shift' }, { shares: table(rows) }, readCtx(fullCoverage));
    const f = find(r.findings, 'growth_share_shift') as GrowthShareShiftFinding;
    expect(f.before.hhi).toBeCloseTo(2600, 9);
    expect(f.after.hhi).toBeCloseTo(3800, 9);
    expect(f.before.countToThreshold).toBe(3); // 30 + 30 + 20 = 80%
    expect(f.after.countToThreshold).toBe(2); // 50 + 30 = 80%
    expect(f.segments.map((s) => s.segment)).toEqual(['a', 'b', 'c', 'd']);
    expect(f.segments[0]).toMatchObject({ shareBefore: 0.3, shareAfter: 0.5 });
    expect(f.segments[0]!.shareChange).toBeCloseTo(0.2, 12);
    expect(f.segments[3]!.shareChange).toBeCloseTo(-0.2, 12);
    expect(r.caveats).toContainEqual(expect.objectContaining({ code: 'segment_gap', data: expect.objectContaining({ segment: 'd' }) }));
  });

  it('folds the segments past the top 10 by their later share, and says that rule, not "smaller"', () => {
    // Twelve segments; "k" and "l" have the smallest later shares, though "k" was the largest before.
    const keys = 'abcdefghijkl'.split('');
    const before = (k: string) => (k === 'k' ? 200 : 10);
    const after = (k: string) => (k === 'k' || k === 'l' ? 5 : 20);
    const rows = [
      ...keys.map((k) => sideRow('prior', k, before(k))),
      sideRow('prior', null, keys.reduce((a, k) => a + before(k), 0), 120, '2023-06-01', true),
      ...keys.map((k) => sideRow('current', k, after(k))),
      sideRow('current', null, keys.reduce((a, k) => a + after(k), 0), 120, '2024-06-01', true),
    ];
    const r = growthShareShiftTemplate.read({ ...drivers, template: 'growth_share_shift' }, { shares: table(rows) }, readCtx(fullCoverage));
    const f = find(r.findings, 'growth_share_shift') as GrowthShareShiftFinding;
    expect(f.segments.map((s) => s.segment)).not.toContain('k');
    expect(f.others?.count).toBe(2);
    const fold = r.caveats.find((c) => c.code === 'segments_folded')!;
    expect(fold.data).toMatchObject({ count: 2, folded: 'later_share' });
    expect(caveatNote(fold, 'en')).toBe('2 more segments with smaller shares in the later period than those named are combined as "All others".');
  });

  it('gives no shares for a metric that does not add up', () => {
    const rows = [sideRow('prior', 'a', 30), sideRow('prior', null, 30, 1, '2023-06-01', true), sideRow('current', 'a', 50), sideRow('current', null, 50, 1, '2024-06-01', true)];
    const r = growthShareShiftTemplate.read({ ...drivers, metrics: ['fare_per_passenger'] }, { shares: table(rows) }, readCtx(fullCoverage));
    expect(r.findings).toEqual([]);
  });
});
