// How a catalog metric is compared between groups: which per-row model it has (mean, share,
// ratio of sums, or a plain total), the SQL summary pieces each group returns, and the cell read
// back from a result row. Only summary rows per group ever reach Node.
import type { ColumnFilter, ComparisonGroup, DatasetConfig, Metric, MetricDefinition } from '../../config/schema.js';
import type { MeasureKind, Quantity } from '../findings/performance.js';
import { metricByName, metricDirection, namedUnitDimension, rowsAreEvents } from '../catalog.js';
import { type CompileContext, localDateExpr, measureSql, rowCountSql } from '../compile-context.js';
import { filterCondition, metricAggregate } from '../sql/metric-sql.js';
import { duckdbDialect } from '../sql/dialect.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { CellValue, SubQuestion } from '../types.js';
import type { Cell } from './performance-stats.js';

export interface MeasurePlan {
  kind: MeasureKind;
  quantity: Quantity;
  /** For `mean`: the per-row value (NULL rows are left out), used for medians and samples too. */
  x?: string;
  /** For `ratio`: per-row numerator and denominator parts. */
  y?: string;
  /** For `proportion`: the rows counted (null = all rows) and the rows that pass. */
  base?: string | null;
  hit?: string;
  /** Totals of disjoint row sets add up (plain counts). */
  additive: boolean;
  /** For `mean` and `ratio`: `x` and `y` as parts (see `RowPart`), from which a rollup keeps their moments. */
  xPart?: RowPart;
  yPart?: RowPart;
  /**
   * For a count compared between groups (quantity `per_day`): the mean is over calendar days,
   * not rows. SQL returns per group the days with a row (tc_days), Σ and Σ² of the daily counts
   * (tc_sx, tc_sxx); the days of the window, known in Node, fill in the days with none as 0.
   */
  perDay?: boolean;
  /**
   * For a count compared between groups of named units (sites, routes: the group's unit column is
   * a dimension), quantity `per_unit_day`: each unit's count per calendar day is one observation,
   * so the groups are compared per unit, whatever their sizes. The dimension's name.
   */
  perUnit?: string;
}

/**
 * A per-row value as a column (or 1, to count) on the rows that pass `when` (all rows when null).
 * `x` and `y` are written from it for reading rows; a rollup's moments are written from it as
 * aggregates with FILTER (WHERE ...) and no CASE or COALESCE, which postgres_fdw (15) does not
 * send to a shard.
 */
export interface RowPart {
  value: string;
  when: string | null;
  /** Missing values and rows that fail `when` are left out (a mean's rows) rather than counted as 0. */
  skipsMissing: boolean;
}

/** Decides the per-row model of a metric; every expression is built with `q`, so values are bound. */
export function planMeasure(q: QueryBuilder, ds: DatasetConfig, metric: Metric): MeasurePlan {
  const def = metric.definition;
  switch (def.type) {
    case 'average': {
      const xPart: RowPart = { value: q.ident(def.column), when: def.where ? filterCondition(q, def.where) : null, skipsMissing: true };
      return { kind: 'mean', quantity: 'metric', x: partSql(xPart), xPart, additive: false };
    }
    case 'sum': {
      // A total per group says nothing about performance; the same money per row does (revenue per booking).
      const xPart = perRowPart(q, def)!;
      return { kind: 'mean', quantity: 'per_row', x: partSql(xPart), xPart, additive: false };
    }
    case 'count':
      return def.where
        ? { kind: 'proportion', quantity: 'metric', base: null, hit: filterCondition(q, def.where), additive: false }
        : { kind: 'total', quantity: 'metric', additive: true };
    case 'distinct_count':
      return { kind: 'total', quantity: 'metric', additive: false };
    case 'rate': {
      const cond = filterCondition(q, def.where);
      if (!def.of) return { kind: 'proportion', quantity: 'metric', base: null, hit: cond, additive: false };
      const base = metricByName(ds, def.of).definition;
      if (base.type === 'count') {
        const own = base.where ? filterCondition(q, base.where) : null;
        return { kind: 'proportion', quantity: 'metric', base: own, hit: own ? `(${cond}) AND (${own})` : cond, additive: false };
      }
      if (base.type === 'sum') {
        const yPart = perRowPart(q, base)!;
        const xPart: RowPart = { value: q.ident(base.column), when: yPart.when ? `(${cond}) AND (${yPart.when})` : cond, skipsMissing: false };
        return { kind: 'ratio', quantity: 'metric', x: partSql(xPart), y: partSql(yPart), xPart, yPart, additive: false };
      }
      return { kind: 'total', quantity: 'metric', additive: false };
    }
    case 'ratio': {
      const xPart = perRowPart(q, metricByName(ds, def.numerator).definition);
      const yPart = perRowPart(q, metricByName(ds, def.denominator).definition);
      return xPart && yPart
        ? { kind: 'ratio', quantity: 'metric', x: partSql(xPart), y: partSql(yPart), xPart, yPart, additive: false }
        : { kind: 'total', quantity: 'metric', additive: false };
    }
  }
}

/**
 * How a metric is compared between groups (members and others, before and after): as
 * `planMeasure`, except that a count, plain or filtered (weekday visits), is compared as its mean
 * per calendar day. A count's share of rows is not the count, and its total says only how big a
 * group is; a daily rate keeps the metric's own units and has a day-to-day spread to test with.
 */
export function planComparison(q: QueryBuilder, ds: DatasetConfig, metric: Metric, group?: ComparisonGroup): MeasurePlan {
  // A sum over rows that are no thing of their own (a shop's day on one channel) is compared as a
  // count is: per unit per day, or per day. Its mean per row would depend on how the rows are cut
  // (channels, days without catering), not on how the units did.
  if (metric.definition.type === 'count' || (metric.definition.type === 'sum' && !rowsAreEvents(ds))) {
    const unit = group ? namedUnitDimension(ds, group) : null;
    if (unit) return { kind: 'mean', quantity: 'per_unit_day', additive: false, perDay: true, perUnit: unit.name };
    return { kind: 'mean', quantity: 'per_day', additive: false, perDay: true };
  }
  return planMeasure(q, ds, metric);
}

/**
 * Whether higher is better for the quantity compared between groups: the metric's own declared
 * direction (also per unit per day: visits per site per day), except for a count per day, which is
 * two groups' volumes (they differ by the groups' sizes, so neither side is better for having
 * more); null when there is no good direction.
 */
export function goodDirection(metric: Metric, quantity: Quantity): boolean | null {
  return quantity === 'per_day' ? null : metricDirection(metric);
}

/** The shape of `planComparison` without building SQL for a real engine. */
export function comparisonShape(ds: DatasetConfig, metric: Metric, group?: ComparisonGroup): Pick<MeasurePlan, 'kind' | 'quantity' | 'additive' | 'perDay' | 'perUnit'> {
  const p = planComparison(new QueryBuilder(duckdbDialect), ds, metric, group);
  return { kind: p.kind, quantity: p.quantity, additive: p.additive, perDay: p.perDay, ...(p.perUnit ? { perUnit: p.perUnit } : {}) };
}

/**
 * A per-unit plan's query: the catalog count per key and unit over the window, then per key the
 * units (tc_units), Σ and Σ² of the units' counts (tc_ux, tc_uxx), the total (tc_value) and the
 * rows behind it (tc_rows). The days of the window, known in Node, turn each unit's count into a
 * daily rate. Columns as `measureColumns` returns them, for small-cell suppression.
 */
export function perUnitQuery(
  q: QueryBuilder,
  ctx: CompileContext,
  metric: Metric,
  unitColumn: string,
  keys: readonly { sql: string; alias: string }[],
  from: string,
  where: string,
): { body: string; columns: string[] } {
  const d = q.dialect;
  const columns = [
    `${d.toDouble('COUNT(*)')} AS tc_units`,
    `${d.toDouble('SUM(tc_unit_value)')} AS tc_ux`,
    `${d.toDouble('SUM(tc_unit_value * tc_unit_value)')} AS tc_uxx`,
    `${d.toDouble('SUM(tc_unit_value)')} AS tc_value`,
    `${d.toDouble('SUM(tc_unit_rows)')} AS tc_rows`,
  ];
  const aliases = keys.map((k) => k.alias).join(', ');
  return {
    body: `SELECT ${aliases},
  ${columns.join(',\n  ')}
FROM (
  SELECT ${keys.map((k) => `${k.sql} AS ${k.alias}`).join(', ')},
    ${q.ident(unitColumn)} AS tc_unit,
    ${d.toDouble(measureSql(q, ctx, metric))} AS tc_unit_value,
    ${rowCountSql(q, ctx)} AS tc_unit_rows
  FROM ${from}
  WHERE ${where}
  GROUP BY ${keys.map((_, i) => String(i + 1)).join(', ')}, ${keys.length + 1}
) tc_units
GROUP BY ${aliases}`,
    columns,
  };
}

/**
 * A per-day plan's query: the catalog count per day and key (`keys`: select expressions with
 * their aliases), then per key the days with a row, Σ and Σ² of the daily counts, the total
 * (tc_value) and the rows behind it (tc_rows). Columns as `measureColumns` returns them, for
 * small-cell suppression.
 */
export function perDayQuery(
  q: QueryBuilder,
  ctx: CompileContext,
  metric: Metric,
  keys: readonly { sql: string; alias: string }[],
  from: string,
  where: string,
): { body: string; columns: string[] } {
  const d = q.dialect;
  const day = localDateExpr(q, ctx);
  const columns = [
    `${d.toDouble('COUNT(*)')} AS tc_days`,
    `${d.toDouble('SUM(tc_day_value)')} AS tc_sx`,
    `${d.toDouble('SUM(tc_day_value * tc_day_value)')} AS tc_sxx`,
    `${d.toDouble('SUM(tc_day_value)')} AS tc_value`,
    `${d.toDouble('SUM(tc_day_rows)')} AS tc_rows`,
  ];
  const inner = `SELECT ${keys.map((k) => `${k.sql} AS ${k.alias}`).join(', ')},
    ${day} AS tc_day,
    ${d.toDouble(measureSql(q, ctx, metric))} AS tc_day_value,
    ${rowCountSql(q, ctx)} AS tc_day_rows
  FROM ${from}
  WHERE ${where}
  GROUP BY ${keys.map((_, i) => String(i + 1)).join(', ')}, ${keys.length + 1}`;
  const aliases = keys.map((k) => k.alias).join(', ');
  return {
    body: `SELECT ${aliases},
  ${columns.join(',\n  ')}
FROM (
  ${inner}
) tc_daily
GROUP BY ${aliases}`,
    columns,
  };
}

/** A sum or count metric as the per-row part of its total (so Σ part = the metric); null for other types. */
function perRowPart(q: QueryBuilder, def: MetricDefinition): RowPart | null {
  if (def.type !== 'sum' && def.type !== 'count') return null;
  return { value: def.type === 'sum' ? q.ident(def.column) : '1', when: def.where ? filterCondition(q, def.where) : null, skipsMissing: false };
}

/** The part as a per-row expression: NULL where it skips a row, otherwise 0. */
function partSql(p: RowPart): string {
  const value = p.skipsMissing || p.value === '1' ? p.value : `COALESCE(${p.value}, 0)`;
  return p.when ? `CASE WHEN ${p.when} THEN ${value} ELSE ${p.skipsMissing ? 'NULL' : '0'} END` : value;
}

function maybeWhere(q: QueryBuilder, where: ColumnFilter | undefined, then: string, otherwise: string): string {
  return where ? `CASE WHEN ${filterCondition(q, where)} THEN ${then} ELSE ${otherwise} END` : then;
}

/**
 * SELECT-list entries of the summary pieces, plus the catalog metric itself (tc_value) and the row
 * count (tc_rows). Over a rollup (a compile context with `rollup`), the pieces are added up from
 * the moments it keeps per day (see `momentPieces`); a non-additive total (a distinct count)
 * cannot be.
 */
export function measureColumns(q: QueryBuilder, ds: DatasetConfig, metric: Metric, plan: MeasurePlan, ctx?: CompileContext): string[] {
  if (ctx?.rollup) {
    if (plan.kind === 'total' && !plan.additive) throw new Error(`a comparison of ${metric.name} needs each row, not the rollup`);
    const rows = q.dialect.toDouble(rowCountSql(q, ctx));
    const n = plan.kind === 'total' ? rows : q.dialect.toDouble(`COALESCE(SUM(${q.ident(momentName('n', metric))}), 0)`);
    return [`${n} AS tc_n`, ...momentColumns(q, metric, plan), `${measureSql(q, ctx, metric)} AS tc_value`, `${rows} AS tc_rows`];
  }
  const d = q.dialect;
  const cols: string[] = [];
  switch (plan.kind) {
    case 'mean':
      cols.push(
        `${d.toDouble(`COUNT(${plan.x})`)} AS tc_n`,
        `${d.toDouble(`AVG(${plan.x})`)} AS tc_mean`,
        // var_samp is the numerically stable single-pass sample variance in DuckDB and PostgreSQL.
        `${d.toDouble(`var_samp(${plan.x})`)} AS tc_var`,
      );
      break;
    case 'proportion':
      cols.push(
        `${d.toDouble(plan.base ? `COUNT(*) FILTER (WHERE ${plan.base})` : 'COUNT(*)')} AS tc_n`,
        `${d.toDouble(`COUNT(*) FILTER (WHERE ${plan.hit})`)} AS tc_hits`,
      );
      break;
    case 'ratio':
      cols.push(
        `${d.toDouble('COUNT(*)')} AS tc_n`,
        `${d.toDouble(`AVG(${plan.x})`)} AS tc_mx`,
        `${d.toDouble(`AVG(${plan.y})`)} AS tc_my`,
        `${d.toDouble(`var_samp(${plan.x})`)} AS tc_vx`,
        `${d.toDouble(`var_samp(${plan.y})`)} AS tc_vy`,
        `${d.toDouble(`covar_samp(${plan.x}, ${plan.y})`)} AS tc_cxy`,
      );
      break;
    case 'total':
      cols.push(`${d.toDouble('COUNT(*)')} AS tc_n`);
      break;
  }
  cols.push(`${metricAggregate(q, ds, metric)} AS tc_value`, `${d.toDouble('COUNT(*)')} AS tc_rows`);
  return cols;
}

// ---- moments kept by a day-level rollup ----------------------------------------------------------
// A comparison between groups needs, per group, the count, mean and variance of the per-row
// values (and for a ratio the covariance). Per day they are kept as n, the sum and the sum of
// squares (and the sums of y, y squared and x times y), all exact for integer and decimal columns:
// each square is taken as x * (x + 0.0), which both engines compute as a decimal. Added up over
// the days, the variance is (n * sum(x^2) - sum(x)^2) / (n (n - 1)), the difference still exact,
// divided in floating point last. (Floating-point columns are summed in floating point.)

type Moment = 'n' | 'sx' | 'sy' | 'sxx' | 'syy' | 'sxy' | 'hits';

function momentName(moment: Moment, metric: Metric): string {
  return `tc_${moment}__${metric.name}`;
}

/** An aggregate over the rows that pass every condition given. */
function filtered(aggregate: string, ...conditions: (string | null)[]): string {
  const when = conditions.filter((c): c is string => !!c);
  if (!when.length) return aggregate;
  return `${aggregate} FILTER (WHERE ${when.length === 1 ? when[0] : when.map((c) => `(${c})`).join(' AND ')})`;
}

/** Σ part over a day (NULL when no row adds to it, read back as 0). */
function partSum(p: RowPart): string {
  return p.value === '1' ? filtered('COUNT(*)', p.when) : filtered(`SUM(${p.value})`, p.when);
}

/** Σ a times b over a day, as an exact decimal for integer and decimal columns: b + 0.0 is a decimal in both engines. */
function partProduct(a: RowPart, b: RowPart): string {
  return filtered(`SUM(${a.value} * (${b.value} + 0.0))`, a.when, b.when);
}

/**
 * The rollup's aggregates for a compared metric's moments, built with the rollup statement's
 * builder. A missing value adds 0 to a sum (or is left out of a mean's rows), so no COALESCE or
 * CASE is needed per row and every piece is a plain aggregate a shard can compute.
 */
export function momentPieces(q: QueryBuilder, ds: DatasetConfig, metric: Metric): { column: string; aggregate: string }[] {
  const plan = planMeasure(q, ds, metric);
  const piece = (m: Moment, aggregate: string) => ({ column: momentName(m, metric), aggregate });
  const { xPart: x, yPart: y } = plan;
  switch (plan.kind) {
    case 'mean':
      return [piece('n', x!.skipsMissing ? filtered(`COUNT(${x!.value})`, x!.when) : 'COUNT(*)'), piece('sx', partSum(x!)), piece('sxx', partProduct(x!, x!))];
    case 'proportion':
      return [piece('n', filtered('COUNT(*)', plan.base ?? null)), piece('hits', filtered('COUNT(*)', plan.hit!))];
    case 'ratio':
      return [
        piece('n', 'COUNT(*)'),
        piece('sx', partSum(x!)),
        piece('sy', partSum(y!)),
        piece('sxx', partProduct(x!, x!)),
        piece('syy', partProduct(y!, y!)),
        piece('sxy', partProduct(x!, y!)),
      ];
    case 'total':
      return [];
  }
}

/** The summary pieces (all but tc_n) read back from the moments over the rollup's rows. */
function momentColumns(q: QueryBuilder, metric: Metric, plan: MeasurePlan): string[] {
  const d = q.dialect;
  const sum = (m: Moment) => `COALESCE(SUM(${q.ident(momentName(m, metric))}), 0)`;
  const n = sum('n');
  const mean = (m: Moment) => `${d.toDouble(sum(m))} / NULLIF(${d.toDouble(n)}, 0)`;
  // The sample (co)variance; missing, as var_samp is, for fewer than two values.
  const covariance = (sxy: Moment, sx: Moment, sy: Moment) => `CASE WHEN ${n} > 1 THEN ${d.toDouble(`${n} * ${sum(sxy)} - ${sum(sx)} * ${sum(sy)}`)} / (${d.toDouble(n)} * ${d.toDouble(`${n} - 1`)}) END`;
  switch (plan.kind) {
    case 'mean':
      return [`${mean('sx')} AS tc_mean`, `${covariance('sxx', 'sx', 'sx')} AS tc_var`];
    case 'proportion':
      return [`${d.toDouble(sum('hits'))} AS tc_hits`];
    case 'ratio':
      return [
        `${mean('sx')} AS tc_mx`,
        `${mean('sy')} AS tc_my`,
        `${covariance('sxx', 'sx', 'sx')} AS tc_vx`,
        `${covariance('syy', 'sy', 'sy')} AS tc_vy`,
        `${covariance('sxy', 'sx', 'sy')} AS tc_cxy`,
      ];
    case 'total':
      return [];
  }
}

/**
 * Whether a group comparison of this metric can be added up from a day-level rollup: every kind
 * but a non-additive total (a distinct count, which needs the rows' values).
 */
export function comparableFromDays(plan: Pick<MeasurePlan, 'kind' | 'additive'>): boolean {
  return plan.kind !== 'total' || plan.additive;
}

/**
 * The per-row model as a query writes it: with the query's own builder when it reads rows, and a
 * scratch one over a rollup (which reads the kept moments, so the per-row expressions, and the
 * values they bind, must stay out of the statement).
 */
export function planFor(q: QueryBuilder, ctx: CompileContext, metric: Metric): MeasurePlan {
  return planMeasure(ctx.rollup ? new QueryBuilder(q.dialect) : q, ctx.dataset, metric);
}

/** As `planFor`, for a comparison between groups (`planComparison`). */
export function comparisonPlanFor(q: QueryBuilder, ctx: CompileContext, metric: Metric, group?: ComparisonGroup): MeasurePlan {
  return planComparison(ctx.rollup ? new QueryBuilder(q.dialect) : q, ctx.dataset, metric, group);
}

/**
 * Whether a summary comparison (performance_compare, performance_by_segment) adds up from a
 * day-level rollup: not for money compared as a mean, whose median (and its bootstrap sample)
 * needs the rows.
 */
export function comparedFromDays(sq: SubQuestion, ds: DatasetConfig): boolean {
  const metric = metricByName(ds, sq.metrics[0]!);
  const shape = comparisonShape(ds, metric);
  // Per day (or per unit per day) there is no median of rows to read.
  if (shape.perDay) return true;
  return comparableFromDays(shape) && !(shape.kind === 'mean' && isMoney(metric));
}

/** The median of the per-row value, for money compared as a mean (skewed values). */
export function medianColumn(q: QueryBuilder, plan: MeasurePlan): string | null {
  return plan.kind === 'mean' && plan.x ? `${q.dialect.toDouble(`percentile_cont(0.5) WITHIN GROUP (ORDER BY ${plan.x})`)} AS tc_median` : null;
}

export function num(v: CellValue | undefined): number | null {
  return typeof v === 'number' && Number.isFinite(v) ? v : null;
}

/**
 * Reads a cell from a summary row; a missing row is an empty cell. A per-day plan needs `days`,
 * the calendar days the row's window spans (its days without a row count as 0); a group with no
 * row on any day is empty.
 */
export function cellFromRow(row: Record<string, CellValue> | undefined, plan: Pick<MeasurePlan, 'kind' | 'additive' | 'perDay' | 'perUnit'>, days?: number): Cell {
  if (plan.perUnit) {
    if (days === undefined || days <= 0) throw new Error('a count compared per unit needs the days of its window');
    const n = row ? (num(row.tc_units) ?? 0) : 0;
    if (n === 0) return { kind: 'mean', n: 0, mean: 0, m2: 0 };
    // Each unit's rate is its count over the days; Σ(rate − mean)² = (Σx² − n·x̄²) / days².
    const mean = (num(row?.tc_ux) ?? 0) / n;
    return { kind: 'mean', n, mean: mean / days, m2: Math.max(0, (num(row?.tc_uxx) ?? 0) - n * mean * mean) / (days * days) };
  }
  if (plan.perDay) {
    const present = row ? (num(row.tc_days) ?? 0) : 0;
    if (days === undefined) throw new Error('a count compared per day needs the days of its window');
    const n = present > 0 ? Math.max(days, present) : 0;
    if (n === 0) return { kind: 'mean', n: 0, mean: 0, m2: 0 };
    const sx = num(row?.tc_sx) ?? 0;
    const mean = sx / n;
    // Σ(x − mean)² over every day, the days without a row adding mean² each: Σx² − n·mean².
    return { kind: 'mean', n, mean, m2: Math.max(0, (num(row?.tc_sxx) ?? 0) - n * mean * mean) };
  }
  const n = row ? (num(row.tc_n) ?? 0) : 0;
  const k = Math.max(0, n - 1);
  switch (plan.kind) {
    case 'mean':
      // var_samp is NULL for a single row: its spread is zero, not unknown.
      return { kind: 'mean', n, mean: num(row?.tc_mean) ?? 0, m2: (num(row?.tc_var) ?? 0) * k };
    case 'proportion':
      return { kind: 'proportion', n, hits: num(row?.tc_hits) ?? 0 };
    case 'ratio':
      return {
        kind: 'ratio',
        n,
        mx: num(row?.tc_mx) ?? 0,
        my: num(row?.tc_my) ?? 0,
        m2x: (num(row?.tc_vx) ?? 0) * k,
        m2y: (num(row?.tc_vy) ?? 0) * k,
        cxy: (num(row?.tc_cxy) ?? 0) * k,
      };
    case 'total':
      return { kind: 'total', n, value: row ? num(row.tc_value) : null, additive: plan.additive };
  }
}

/** True for money values, whose skew makes a median comparison worth adding. */
export function isMoney(metric: Metric): boolean {
  return metric.unit === 'currency';
}

/** The kind of a metric's per-row model without building SQL for a real engine (the text is thrown away). */
export function measureShape(ds: DatasetConfig, metric: Metric): Pick<MeasurePlan, 'kind' | 'quantity' | 'additive'> {
  const p = planMeasure(new QueryBuilder(duckdbDialect), ds, metric);
  return { kind: p.kind, quantity: p.quantity, additive: p.additive };
}
