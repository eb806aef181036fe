// Template "value_compare": two values of one dimension set against each other ("did phone grow
// faster than kiosk", "app vs web"). Each value's metric over the span asked about and the span
// it is compared with (the one the request named, else the same dates a year earlier), their
// growth and the gap; a test of the gap in growth over per-period log ratios of the two values
// (whatever moves both alike in a period cancels), and, for a mean, share or ratio, a test of the
// two values' levels in the span asked about (Welch, two-proportion z, delta method).
import type { Metric } from '../../config/schema.js';
import { changeBasisOf, groupableDimension, isAdditive, metricByName, metricKind } from '../catalog.js';
import { type CompileContext, dateRanges, datesCondition, localDateExpr, type PeriodScope, periodScope, rowCountSql, segmentConditions, tableRef } from '../compile-context.js';
import type { Coverage } from '../coverage.js';
import type { ContrastSide, PerDaySide, ValueCompareFinding } from '../findings/contrast.js';
import { addDays, nextPeriod, periodStart, parseIsoDate } from '../periods.js';
import { QueryBuilder } from '../sql/query-builder.js';
import { differenceShift, logRatio, logShift } from '../stats/log-shift.js';
import type { Caveat, CellValue, DateWindow, Finding, Grain, NamedQuery, PeriodPoint, ResultTable, SpanEndsUnit, SubQuestion } from '../types.js';
import { spanEnds } from './span-ends.js';
import { askedPrior, comparisonWindow as nonOverlapping, earlierSpanData, priorWindow } from './growth-compare.js';
import { CONFIDENCE, EMPTY_TABLE } from './performance-common.js';
import { cellFromRow, measureColumns, measureShape, planMeasure, type MeasurePlan } from './performance-measure.js';
import { type Cell, cellEstimate, compareCells, poolCells } from './performance-stats.js';
import { minGroupSize } from './small-groups.js';
import type { Reading, Template } from './template.js';
import { coveredWindow, windowPeriods } from './trend-points.js';

export interface ContrastSpans {
  current: DateWindow;
  prior: DateWindow;
  /** `span_ends`: a stretch's first whole period against its last ("since 2001": 2001 against 2017). */
  basis: 'asked' | 'year_earlier' | 'span_ends';
  /** With `span_ends`: the unit of the two periods. */
  unit?: SpanEndsUnit;
}

function daysBetween(a: string, b: string): number {
  return Math.round((parseIsoDate(b).getTime() - parseIsoDate(a).getTime()) / 86_400_000);
}

/**
 * The span asked about, cut to the data (never one overlapping its own year-earlier base), and the
 * span it is compared with: the one the request named, cut to the same length (like for like),
 * else the same dates a year earlier.
 */
export function contrastSpans(sq: SubQuestion, coverage: Coverage | undefined): ContrastSpans {
  const ends = sq.spanEnds && !sq.compareWindow ? spanEnds(sq.window, sq.spanEnds, coverage) : null;
  if (ends) return { current: ends.last, prior: ends.first, basis: 'span_ends', unit: ends.unit };
  const asked = sq.compareWindow ? sq.window : nonOverlapping(sq.window, coverage);
  const current = (coverage && coveredWindow(asked, coverage)) || asked;
  if (sq.compareWindow) {
    return { current, prior: askedPrior(current, sq.compareWindow, sq.window), basis: 'asked' };
  }
  return { current, prior: priorWindow(current), basis: 'year_earlier' };
}

function contrastOf(sq: SubQuestion): { dimension: string; values: [string, string] } {
  const c = sq.contrast;
  if (!c || c.values.length !== 2) throw new Error(`sub-question ${sq.id} (value_compare) needs two values to compare`);
  return c;
}

function metricOf(sq: SubQuestion, ctx: { dataset: CompileContext['dataset'] }): Metric {
  const name = sq.metrics[0];
  if (!name) throw new Error(`sub-question ${sq.id} names no metric`);
  return metricByName(ctx.dataset, name);
}

/** The value as text in SQL, so a number or text column compares alike with the bound values. */
function keyExpr(q: QueryBuilder, column: string): string {
  return `CAST(${q.ident(column)} AS VARCHAR)`;
}

/**
 * Conditions every query shares: the spans, the two values, the filters unless the query takes
 * them inside each aggregate (`scope`, as periodScope does: a day or period with rows of a value
 * but none that pass the filters keeps its row, so a filtered sum there is 0, not a gap), and (with
 * a minimum group size) only values big enough to show.
 */
function conditions(q: QueryBuilder, ctx: CompileContext, sq: SubQuestion, windows: DateWindow[], scope?: PeriodScope): string {
  const c = contrastOf(sq);
  const dim = groupableDimension(ctx.dataset, c.dimension);
  const key = keyExpr(q, dim.column);
  const values = `${key} IN (${c.values.map((v) => q.bind(v)).join(', ')})`;
  const parts = [scope ? scope.where : dateRanges(q, ctx, windows), ...(scope ? [] : segmentConditions(q, ctx, sq.filters)), values];
  const min = minGroupSize(ctx.dataset);
  if (min !== null) {
    // A value with fewer rows than the minimum in the compared spans is never shown on its own.
    const inner = [dateRanges(q, ctx, windows), ...segmentConditions(q, ctx, sq.filters), `${key} IN (${c.values.map((v) => q.bind(v)).join(', ')})`];
    parts.push(`${key} IN (SELECT ${key} FROM ${tableRef(q, ctx)} WHERE ${inner.join(' AND ')} GROUP BY 1 HAVING ${rowCountSql(q, ctx)} >= ${q.bind(min)})`);
  }
  return parts.join('\n  AND ');
}

/**
 * Summary columns per row: the metric and its rows that pass the filters (a sum or count, which a
 * rollup holds; `scope` puts the filters inside them), or a cell's pieces (filtered in WHERE).
 */
function columns(q: QueryBuilder, ctx: CompileContext, metric: Metric, scope: PeriodScope | undefined): string[] {
  if (scope) return [`${scope.measure(metric)} AS tc_value`, `${ctx.dialect.toDouble(scope.rowCount())} AS tc_rows`];
  return measureColumns(q, ctx.dataset, metric, planMeasure(q, ctx.dataset, metric));
}

/** The brief's window and filters as kpi_by_segment reads them (periodScope), for a metric whose days add up. */
function additiveScope(q: QueryBuilder, ctx: CompileContext, sq: SubQuestion, metric: Metric, windows: DateWindow[]): PeriodScope | undefined {
  return isAdditive(metric) ? periodScope(q, ctx, windows, sq.filters) : undefined;
}

/** The metric per day and value over both spans: the pieces every figure and test is pooled from. */
function compileDays(sq: SubQuestion, ctx: CompileContext, spans: ContrastSpans): NamedQuery {
  const metric = metricOf(sq, ctx);
  const dim = groupableDimension(ctx.dataset, contrastOf(sq).dimension);
  const q = new QueryBuilder(ctx.dialect);
  const scope = additiveScope(q, ctx, sq, metric, [spans.prior, spans.current]);
  const cols = columns(q, ctx, metric, scope);
  const where = conditions(q, ctx, sq, [spans.prior, spans.current], scope);
  return {
    name: 'days',
    ...q.finish(`SELECT ${localDateExpr(q, ctx)} AS day,
  ${keyExpr(q, dim.column)} AS tc_key,
  ${cols.join(',\n  ')}
FROM ${tableRef(q, ctx)}
WHERE ${where}
GROUP BY 1, 2
ORDER BY 1, 2`),
  };
}

/** Each value's metric over each whole span, for a metric whose days do not add up (a distinct count). */
function compileSides(sq: SubQuestion, ctx: CompileContext, spans: ContrastSpans): NamedQuery {
  const metric = metricOf(sq, ctx);
  const dim = groupableDimension(ctx.dataset, contrastOf(sq).dimension);
  const q = new QueryBuilder(ctx.dialect);
  const side = `CASE WHEN ${datesCondition(q, ctx, [spans.current])} THEN 'current' ELSE 'prior' END`;
  const scope = additiveScope(q, ctx, sq, metric, [spans.prior, spans.current]);
  const cols = columns(q, ctx, metric, scope);
  const where = conditions(q, ctx, sq, [spans.prior, spans.current], scope);
  return {
    name: 'sides',
    ...q.finish(`SELECT ${side} AS tc_side,
  ${keyExpr(q, dim.column)} AS tc_key,
  ${cols.join(',\n  ')}
FROM ${tableRef(q, ctx)}
WHERE ${where}
GROUP BY 1, 2
ORDER BY 1, 2`),
  };
}

/**
 * With a minimum group size: which of the two values have rows in the spans and whether each has
 * enough to be shown (a yes or no per value, never its count), so "too few to show" is told apart
 * from "no data".
 */
function compileSizes(sq: SubQuestion, ctx: CompileContext, spans: ContrastSpans, min: number): NamedQuery {
  const dim = groupableDimension(ctx.dataset, contrastOf(sq).dimension);
  const q = new QueryBuilder(ctx.dialect);
  const key = keyExpr(q, dim.column);
  const where = [dateRanges(q, ctx, [spans.prior, spans.current]), ...segmentConditions(q, ctx, sq.filters), `${key} IN (${contrastOf(sq).values.map((v) => q.bind(v)).join(', ')})`];
  return {
    name: 'sizes',
    ...q.finish(`SELECT ${key} AS tc_key,
  ${rowCountSql(q, ctx)} >= ${q.bind(min)} AS tc_shown
FROM ${tableRef(q, ctx)}
WHERE ${where.join('\n  AND ')}
GROUP BY 1
ORDER BY 1`),
  };
}

/** The chart's window: both spans and what lies between them when they are close, else the span asked about. */
export function chartWindow(spans: ContrastSpans): DateWindow {
  const start = spans.prior.start < spans.current.start ? spans.prior.start : spans.current.start;
  const end = spans.prior.end > spans.current.end ? spans.prior.end : spans.current.end;
  // A stretch's two ends: the whole stretch between them is what was asked about.
  return spans.basis === 'span_ends' || daysBetween(start, end) <= 800 ? { start, end } : spans.current;
}

function compileSeries(sq: SubQuestion, ctx: CompileContext, spans: ContrastSpans): NamedQuery {
  const metric = metricOf(sq, ctx);
  const dim = groupableDimension(ctx.dataset, contrastOf(sq).dimension);
  const q = new QueryBuilder(ctx.dialect);
  const period = ctx.dialect.periodStart(sq.grain, localDateExpr(q, ctx));
  // Any metric's value per period takes the filters inside its aggregate: a period with rows but none that pass them reads 0.
  const scope = periodScope(q, ctx, [chartWindow(spans)], sq.filters);
  const where = conditions(q, ctx, sq, [chartWindow(spans)], scope);
  return {
    name: 'series',
    ...q.finish(`SELECT ${period} AS period,
  ${keyExpr(q, dim.column)} AS tc_key,
  ${scope.measure(metric)} AS tc_value
FROM ${tableRef(q, ctx)}
WHERE ${where}
GROUP BY 1, 2
ORDER BY 1, 2`),
  };
}

/** Whether each day's pieces pool into a span's value (sums, counts, means, shares, ratios; not a distinct count). */
function poolable(metric: Metric, shape: Pick<MeasurePlan, 'kind'>): boolean {
  return isAdditive(metric) || shape.kind !== 'total';
}

export const valueCompareTemplate: Template = {
  compile: (sq, ctx) => {
    const spans = contrastSpans(sq, ctx.coverage);
    const metric = metricOf(sq, ctx);
    const own = poolable(metric, measureShape(ctx.dataset, metric)) ? [] : [compileSides(sq, ctx, spans)];
    const min = minGroupSize(ctx.dataset);
    const sizes = min === null ? [] : [compileSizes(sq, ctx, spans, min)];
    return [compileDays(sq, ctx, spans), ...own, compileSeries(sq, ctx, spans), ...sizes];
  },
  read: (sq, tables, ctx) => readValueCompare(sq, tables, ctx.coverage, ctx.dataset),
};

/** A day's (or a span's) pieces for one value, as a cell or a plain sum. */
interface Piece {
  day: string;
  key: string;
  value: number | null;
  rows: number;
  cell: Cell | null;
}

function num(v: CellValue | undefined): number | null {
  return typeof v === 'number' && Number.isFinite(v) ? v : null;
}

function piecesOf(table: ResultTable, metric: Metric, shape: MeasurePlan, dayColumn: string): Piece[] {
  const additive = isAdditive(metric);
  return table.rows
    .filter((r) => typeof r[dayColumn] === 'string' && r.tc_key !== null && r.tc_key !== undefined)
    .map((r) => ({
      day: String(r[dayColumn]),
      key: String(r.tc_key),
      value: num(r.tc_value),
      rows: num(r.tc_rows) ?? 0,
      cell: additive ? null : cellFromRow(r, shape),
    }));
}

/** One value over a set of pieces: the sum for a flow, the pooled cell's estimate otherwise. */
function pooled(pieces: Piece[], metric: Metric, shape: MeasurePlan): { value: number | null; rows: number; cell: Cell | null } {
  const rows = pieces.reduce((s, p) => s + p.rows, 0);
  if (isAdditive(metric)) {
    // A sum over no rows is zero once the span has rows at all; with none it is unknown.
    return { value: pieces.length === 0 ? null : pieces.reduce((s, p) => s + (p.value ?? 0), 0), rows, cell: null };
  }
  const cell = poolCells(pieces.map((p) => p.cell!).filter(Boolean), shape.kind, shape.additive);
  return { value: cellEstimate(cell), rows, cell };
}

/**
 * The periods the growth test compares: whole months when both spans hold at least six (or the
 * data is stamped monthly or coarser), else 7-day blocks counted from each span's start (every
 * block holds each weekday once), else days. Each piece's period is its offset within its span.
 */
export function testPeriods(spans: ContrastSpans, coverage: Coverage | undefined): { grain: Grain; blockOf(day: string, span: DateWindow): number | null } {
  const months = (w: DateWindow) => {
    let n = 0;
    for (let p = w.start; nextPeriod(p, 'month') <= w.end; p = nextPeriod(p, 'month')) n++;
    return w.start === periodStart(w.start, 'month') ? n : 0;
  };
  const coarse = coverage?.stamps === 'monthly' || coverage?.stamps === 'quarterly' || coverage?.stamps === 'yearly';
  const m = Math.min(months(spans.current), months(spans.prior));
  if (m >= 6 || (coarse && m >= 2)) {
    return {
      grain: 'month',
      blockOf: (day, span) => {
        const d = periodStart(day, 'month');
        let i = 0;
        for (let p = span.start; p < d; p = nextPeriod(p, 'month')) i++;
        return nextPeriod(d, 'month') <= span.end ? i : null;
      },
    };
  }
  const length = Math.min(daysBetween(spans.current.start, spans.current.end), daysBetween(spans.prior.start, spans.prior.end));
  if (length >= 21) {
    const whole = Math.floor(length / 7);
    return { grain: 'week', blockOf: (day, span) => { const i = Math.floor(daysBetween(span.start, day) / 7); return i < whole ? i : null; } };
  }
  return { grain: 'day', blockOf: (day, span) => daysBetween(span.start, day) };
}

export function readValueCompare(sq: SubQuestion, tables: Record<string, ResultTable>, coverage: Coverage, dataset: CompileContext['dataset']): Reading {
  const c = contrastOf(sq);
  const metric = metricOf(sq, { dataset });
  const shape = measureShape(dataset, metric) as MeasurePlan;
  const spans = contrastSpans(sq, coverage);
  const caveats: Caveat[] = [];
  for (const t of Object.values(tables)) if (t.truncated) caveats.push({ code: 'truncated', data: { rows: t.rows.length } });
  const days = piecesOf(tables.days ?? EMPTY_TABLE, metric, shape, 'day');
  const inSpan = (p: Piece, w: DateWindow) => p.day >= w.start && p.day < w.end;
  const sidesTable = tables.sides;
  const minimum = minGroupSize(dataset);

  // The one rule for stating the metric's change (catalog.ts changeBasisOf): the days' values of
  // both sides decide with the metric's unit and the dataset's own reading of its signs, so a
  // temperature or an average delay is compared in its units, a rate in points, a flow in percent.
  const dayValue = (p: Piece) => (p.cell ? cellEstimate(p.cell) : p.value);
  let basis = changeBasisOf(metric, days.map(dayValue));
  const sideOf = (value: string): ContrastSide & { cell: Cell | null } => {
    const own = days.filter((p) => p.key === value);
    let cur = pooled(own.filter((p) => inSpan(p, spans.current)), metric, shape);
    let pri = pooled(own.filter((p) => inSpan(p, spans.prior)), metric, shape);
    if (sidesTable) {
      const row = (side: string) => piecesOf({ ...sidesTable, rows: sidesTable.rows.filter((r) => r.tc_side === side) }, metric, shape, 'tc_side').find((p) => p.key === value);
      const exact = (p: Piece | undefined) => ({ value: p?.value ?? null, rows: p?.rows ?? 0, cell: p?.cell ?? null });
      cur = exact(row('current'));
      pri = exact(row('prior'));
    }
    // Below the minimum group size a value's rows never leave the database: only that it is too small.
    const suppressed = minimum !== null && (tables.sizes?.rows ?? []).some((r) => String(r.tc_key) === value && r.tc_shown === false);
    const change = cur.value !== null && pri.value !== null ? cur.value - pri.value : null;
    const growth = basis === 'percent' && cur.value !== null && pri.value !== null && pri.value > 0 ? cur.value / pri.value - 1 : null;
    return { value, current: cur.value, prior: pri.value, growth, change, rowsCurrent: cur.rows, rowsPrior: pri.rows, suppressed, cell: cur.cell };
  };
  // The spans' own figures can cross zero where no day did (a side pooled from one early flight).
  const spanBasis = changeBasisOf(metric, days.map(dayValue).concat(c.values.flatMap((v) => { const s = sideOf(v); return [s.current, s.prior]; })));
  if (spanBasis !== basis) basis = spanBasis;
  const [a, b] = [sideOf(c.values[0]), sideOf(c.values[1])];

  // The growth test: per period, the log of first over second, in the compared span and in the span asked about.
  const periods = testPeriods(spans, coverage);
  let relativeGrowth: ValueCompareFinding['relativeGrowth'] = null;
  let gapShift: ValueCompareFinding['gapShift'] = null;
  let noGrowthTest: ValueCompareFinding['noGrowthTest'] = null;
  // Per period: log(first / second) where percentages apply, else first − second in units.
  const perPeriod = (x: number | null, y: number | null): number | null => (basis === 'percent' ? logRatio(x, y) : x !== null && y !== null ? x - y : null);
  if (!poolable(metric, shape)) noGrowthTest = 'not_poolable';
  else if (a.rowsPrior === 0 || b.rowsPrior === 0 || a.rowsCurrent === 0 || b.rowsCurrent === 0) noGrowthTest = 'missing_side';
  else {
    const ratios = (span: DateWindow): number[] | null => {
      const blocks = new Map<number, { a: Piece[]; b: Piece[] }>();
      for (const p of days) {
        if (!inSpan(p, span)) continue;
        const i = periods.blockOf(p.day, span);
        if (i === null) continue;
        const block = blocks.get(i) ?? { a: [], b: [] };
        (p.key === c.values[0] ? block.a : block.b).push(p);
        blocks.set(i, block);
      }
      const out: number[] = [];
      for (const block of blocks.values()) {
        const r = perPeriod(pooled(block.a, metric, shape).value, pooled(block.b, metric, shape).value);
        if (r === null) return null;
        out.push(r);
      }
      return out;
    };
    const before = ratios(spans.prior);
    const after = ratios(spans.current);
    if (!before || !after) noGrowthTest = 'not_positive';
    else {
      if (basis === 'percent') {
        const shift = logShift(before, after, CONFIDENCE);
        if (shift) relativeGrowth = { ...shift, periods: periods.grain };
        else noGrowthTest = 'too_few_periods';
      } else {
        const shift = differenceShift(before, after, CONFIDENCE);
        if (shift) gapShift = { ...shift, periods: periods.grain };
        else noGrowthTest = 'too_few_periods';
      }
    }
  }

  // Two values' levels in the span asked about: a mean, share or ratio has a test; a flow's totals are what they are.
  let level: ValueCompareFinding['level'] = null;
  let noLevelTest: ValueCompareFinding['noLevelTest'] = null;
  if (!isAdditive(metric) && a.cell && b.cell) {
    const r = compareCells(a.cell, b.cell, CONFIDENCE);
    if (r.kind === 'test') {
      const { kind: _kind, ...test } = r;
      level = test;
    } else noLevelTest = r.reason;
  }
  const strip = ({ cell: _cell, ...side }: ContrastSide & { cell: Cell | null }): ContrastSide => side;
  // Spans of different lengths (two named months): the days are said, and a flow is also given per day.
  const [dc, dp] = [daysBetween(spans.current.start, spans.current.end), daysBetween(spans.prior.start, spans.prior.end)];
  const perDay = (s: ContrastSide): PerDaySide => {
    const current = s.current === null ? null : s.current / dc;
    const prior = s.prior === null ? null : s.prior / dp;
    return { current, prior, growth: basis === 'percent' && current !== null && prior !== null && prior > 0 ? current / prior - 1 : null };
  };
  const lengths = dc !== dp && dc > 0 && dp > 0 ? { current: dc, prior: dp, perDay: isAdditive(metric) ? { first: perDay(a), second: perDay(b) } : null } : null;
  const gap = (x: number | null, y: number | null) => (x !== null && y !== null ? x - y : null);
  const finding: ValueCompareFinding = {
    type: 'value_compare',
    metric: metric.name,
    dimension: c.dimension,
    metricKind: metricKind(dataset, metric),
    basis,
    current: spans.current,
    prior: spans.prior,
    priorBasis: spans.basis,
    ...(spans.unit ? { spanUnit: spans.unit } : {}),
    first: strip(a),
    second: strip(b),
    lengths,
    gapCurrent: gap(a.current, b.current),
    gapPrior: gap(a.prior, b.prior),
    growthGap: gap(a.growth, b.growth),
    changeGap: gap(a.change, b.change),
    relativeGrowth,
    gapShift,
    noGrowthTest,
    level,
    noLevelTest,
  };
  const findings: Finding[] = [finding, ...seriesFindings(sq, tables.series ?? EMPTY_TABLE, spans, coverage, metric)];
  if (a.rowsCurrent + a.rowsPrior + b.rowsCurrent + b.rowsPrior === 0) caveats.push({ code: 'no_data', data: { start: spans.prior.start, end: spans.current.end } });
  for (const s of [a, b]) {
    if (s.rowsPrior === 0 && s.rowsCurrent > 0) caveats.push({ code: 'late_segment', data: { segment: s.value, firstPeriod: firstDay(days, s.value) ?? spans.current.start, grain: 'day', ...earlierSpanData(spans.current, spans.prior) } });
    if (s.rowsCurrent === 0 && s.rowsPrior > 0) {
      caveats.push({ code: 'segment_gap', data: { segment: s.value, periods: 1, firstGap: spans.current.start, grain: 'day', window: 'current', ...earlierSpanData(spans.current, spans.prior) } });
    }
  }
  return { findings, caveats };
}

function firstDay(days: Piece[], key: string): string | null {
  return days.find((p) => p.key === key)?.day ?? null;
}

function seriesFindings(sq: SubQuestion, table: ResultTable, spans: ContrastSpans, coverage: Coverage, metric: Metric): Finding[] {
  const covered = coveredWindow(chartWindow(spans), coverage);
  if (!covered) return [];
  const { starts, partial } = windowPeriods(covered, sq.grain);
  return contrastOf(sq).values.map((value) => {
    const byPeriod = new Map(table.rows.filter((r) => String(r.tc_key) === value && typeof r.period === 'string').map((r) => [String(r.period), num(r.tc_value)]));
    const points: PeriodPoint[] = starts.map((period) => ({ period, value: byPeriod.get(period) ?? null, partial: partial.has(period) }));
    return { type: 'value_compare_series' as const, metric: metric.name, grain: sq.grain, value, points };
  });
}
