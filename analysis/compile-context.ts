// What a template needs to write SQL for one dataset on one engine.
import type { DatasetConfig } from '../config/schema.js';
import type { Coverage } from './coverage.js';
import { groupableDimension } from './catalog.js';
import type { Metric } from '../config/schema.js';
import { ROLLUP_RELATION, rollupMetricAggregate, rollupRowCount, type RollupShape } from './rollup/rollup.js';
import type { Dialect, TimeColumnType } from './sql/dialect.js';
import { expressionSql } from './sql/expression-sql.js';
import { metricAggregate } from './sql/metric-sql.js';
import { mergeWindows, rangeCondition } from './sql/time-range.js';
import type { QueryBuilder } from './sql/query-builder.js';
import type { DateWindow, SegmentFilter } from './types.js';
import { daysKept, isDayFilter } from './day-of-week.js';

export interface CompileContext {
  dataset: DatasetConfig;
  dialect: Dialect;
  timeColumnType: TimeColumnType;
  /** What the data covers, when known: lets a template bind exactly the periods it needs. */
  coverage?: Coverage;
  /**
   * When set, the query reads the run's rollup (see rollup/rollup.ts) instead of the table: one
   * row per local day and dimension values, with the metrics' additive pieces.
   */
  rollup?: RollupShape;
}

/** The time column as a calendar date in the dataset's time zone. */
export function localDateExpr(q: QueryBuilder, ctx: CompileContext): string {
  // The rollup's day is already the local calendar date, under the time column's name.
  if (ctx.rollup) return q.ident(ctx.dataset.time_column);
  return ctx.dialect.localDate(q.ident(ctx.dataset.time_column), ctx.timeColumnType, ctx.dataset.timezone, q.bind);
}

/**
 * The rows of local dates [start, end) as a range on the time column itself (see
 * sql/time-range.ts): `col >= $a AND col < $b`, never a function of the column, so an index, a
 * partition bound or a shard can use it. Over the rollup the column is already the local date.
 */
export function dateRange(q: QueryBuilder, ctx: CompileContext, window: DateWindow): string {
  q.readsDates(window);
  return rangeOf(q, ctx, window);
}

/**
 * The rows of any of the windows: one range per run of touching windows (adjacent periods read
 * as one), so each is sargable. FALSE for none.
 */
export function dateRanges(q: QueryBuilder, ctx: CompileContext, windows: DateWindow[]): string {
  const merged = mergeWindows(windows);
  if (merged.length === 0) return 'FALSE';
  q.readsDates({ start: merged[0]!.start, end: merged[merged.length - 1]!.end });
  if (merged.length === 1) return rangeOf(q, ctx, merged[0]!);
  return `(${merged.map((w) => `(${rangeOf(q, ctx, w)})`).join('\n    OR ')})`;
}

/** Rows of any of the windows, as ranges on the time column, inside an aggregate's FILTER (reads nothing more). */
export function datesCondition(q: QueryBuilder, ctx: CompileContext, windows: DateWindow[]): string {
  const merged = mergeWindows(windows);
  if (merged.length === 0) return 'FALSE';
  return merged.length === 1 ? rangeOf(q, ctx, merged[0]!) : `(${merged.map((w) => `(${rangeOf(q, ctx, w)})`).join(' OR ')})`;
}

function rangeOf(q: QueryBuilder, ctx: CompileContext, window: DateWindow): string {
  return rangeCondition(q, q.ident(ctx.dataset.time_column), ctx.rollup ? 'date' : ctx.timeColumnType, ctx.dataset.timezone, window);
}

/** WHERE conditions for the window and the segment filters; every value is bound. */
export function whereClause(q: QueryBuilder, ctx: CompileContext, window: DateWindow, filters: SegmentFilter[]): string {
  return [dateRange(q, ctx, window), ...segmentConditions(q, ctx, filters)].join('\n  AND ');
}

export function segmentConditions(q: QueryBuilder, ctx: CompileContext, filters: SegmentFilter[]): string[] {
  return filters.map((f) => {
    if (isDayFilter(f)) return dayOfWeekCondition(q, ctx, f);
    const dim = groupableDimension(ctx.dataset, f.dimension);
    const list = f.values.map((v) => q.bind(v)).join(', ');
    const col = q.ident(dim.column);
    // "excluding kiosk": every other value, and rows where the value is missing.
    if (f.exclude) return f.values.length === 0 ? 'TRUE' : `(${col} NOT IN (${list}) OR ${col} IS NULL)`;
    return f.values.length === 0 ? 'FALSE' : `${col} IN (${list})`;
  });
}

/**
 * The rows whose local date (the time column in the dataset's time zone, or the rollup's day) falls
 * on the filter's days of the week. EXTRACT(ISODOW …) reads 1 = Monday … 7 = Sunday alike in DuckDB
 * and PostgreSQL; where they differ is how a zoned timestamp becomes a local date (the dialect's
 * localDate). The ISO day numbers are bound like every filter value.
 */
export function dayOfWeekCondition(q: QueryBuilder, ctx: CompileContext, f: SegmentFilter): string {
  const days = daysKept(f);
  if (days.length === 0) return 'FALSE';
  if (days.length === 7) return 'TRUE';
  return `CAST(EXTRACT(ISODOW FROM ${localDateExpr(q, ctx)}) AS INTEGER) IN (${days.map((d) => q.bind(d)).join(', ')})`;
}

export function tableRef(q: QueryBuilder, ctx: CompileContext): string {
  q.readsTable();
  return ctx.rollup ? q.ident(ROLLUP_RELATION) : datasetRelation(q, ctx.dataset);
}

/** The name rows with computed columns go by in a statement (a CTE over the table). */
export const DATASET_ROWS = 'tc_rows';

/**
 * The dataset's rows as a statement reads them: the table itself, or, when the config computes
 * columns (expressions, a date from parts, a group defined by values), a CTE over the table that
 * adds them under their names, so every template reads them as it reads plain columns.
 */
export function datasetRelation(q: QueryBuilder, ds: DatasetConfig): string {
  if (!ds.derived?.length) return q.ident(ds.table);
  return q.relation(DATASET_ROWS, datasetRowsSql(ds, q.dialect));
}

/** The SELECT that adds the computed columns to the table's (no parameters: literals are written from parsed values). */
export function datasetRowsSql(ds: DatasetConfig, dialect: Dialect): string {
  const added = (ds.derived ?? []).map((d) => `${expressionSql(d.expr, dialect)} AS ${dialect.quoteIdent(d.name)}`);
  return `SELECT *${added.map((a) => `,\n  ${a}`).join('')}\nFROM ${dialect.quoteIdent(ds.table)}`;
}

/** A catalog metric as one aggregate over the rows the query reads (table or rollup). */
export function measureSql(q: QueryBuilder, ctx: CompileContext, metric: Metric): string {
  return ctx.rollup ? rollupMetricAggregate(q, ctx.dataset, metric) : metricAggregate(q, ctx.dataset, metric);
}

/**
 * How a statement grouped by period reads a sub-question's segment filters: the window alone in
 * WHERE, and the filters inside each aggregate. Every period that has rows at all keeps its row,
 * so a filtered count of a period with no matching rows is 0 (and an average of none is missing,
 * with a row count of 0) instead of the period vanishing as if the data had a hole there.
 */
export interface PeriodScope {
  /** The WHERE condition: the windows' dates only. */
  where: string;
  /** A catalog metric over the rows that pass the filters. */
  measure(metric: Metric): string;
  /** The table rows behind the group that pass the filters (and `where`, when given). */
  rowCount(where?: string): string;
  /** `expr` on the rows that pass the filters, NULL on the others (for a COUNT(DISTINCT …) of them). */
  onMatching(expr: string): string;
}

export function periodScope(q: QueryBuilder, ctx: CompileContext, windows: DateWindow | DateWindow[], filters: SegmentFilter[]): PeriodScope {
  const where = Array.isArray(windows) ? dateRanges(q, ctx, windows) : dateRange(q, ctx, windows);
  const conds = segmentConditions(q, ctx, filters);
  const only = conds.length > 0 ? conds.join(' AND ') : undefined;
  return {
    where,
    measure: (metric) => (ctx.rollup ? rollupMetricAggregate(q, ctx.dataset, metric, only) : metricAggregate(q, ctx.dataset, metric, only)),
    onMatching: (expr) => (only ? `CASE WHEN ${only} THEN ${expr} END` : expr),
    rowCount: (extra) => rowCountSql(q, ctx, [only, extra].filter((c): c is string => c !== undefined).join(' AND ') || undefined),
  };
}

/** The number of table rows behind the rows aggregated, optionally only where `where` holds. */
export function rowCountSql(q: QueryBuilder, ctx: CompileContext, where?: string): string {
  if (ctx.rollup) return rollupRowCount(q, where);
  return where ? `COUNT(*) FILTER (WHERE ${where})` : 'COUNT(*)';
}
