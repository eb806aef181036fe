// How a catalog metric is compared between groups: which per-row model it has (mean, share,
// ratio of sums, or a plain total), the SQL summary pieces each group returns, and the cell read
// back from a result row. Only summary rows per group ever reach Node.
import type { ColumnFilter, DatasetConfig, Metric, MetricDefinition } from '../../config/schema.js';
import type { MeasureKind, Quantity } from '../findings/performance.js';
import { metricByName } from '../catalog.js';
import { type CompileContext, measureSql, rowCountSql } from '../compile-context.js';
import { filterCondition, metricAggregate } from '../sql/metric-sql.js';
import { duckdbDialect } from '../sql/dialect.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { CellValue } from '../types.js';
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
}

/** Decides the per-row model of a metric; every expression is built with `q`, so values are bound. */
export function planMeasure(q: QueryBuilder, ds: DatasetConfig, metric: Metric): MeasurePlan {
  const def = metric.definition;
  switch (def.type) {
    case 'average':
      return { kind: 'mean', quantity: 'metric', x: maybeWhere(q, def.where, q.ident(def.column), 'NULL'), additive: false };
    case 'sum':
      // A total per group says nothing about performance; the same money per row does (revenue per booking).
      return { kind: 'mean', quantity: 'per_row', x: perRowPart(q, def)!, additive: false };
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
        const whole = perRowPart(q, base)!;
        const own = base.where ? `(${cond}) AND (${filterCondition(q, base.where)})` : cond;
        return { kind: 'ratio', quantity: 'metric', x: `CASE WHEN ${own} THEN COALESCE(${q.ident(base.column)}, 0) ELSE 0 END`, y: whole, additive: false };
      }
      return { kind: 'total', quantity: 'metric', additive: false };
    }
    case 'ratio': {
      const x = perRowPart(q, metricByName(ds, def.numerator).definition);
      const y = perRowPart(q, metricByName(ds, def.denominator).definition);
      return x && y ? { kind: 'ratio', quantity: 'metric', x, y, additive: false } : { kind: 'total', quantity: 'metric', additive: false };
    }
  }
}

/** A sum or count metric as the per-row part of its total (so Σ part = the metric); null for other types. */
function perRowPart(q: QueryBuilder, def: MetricDefinition): string | null {
  if (def.type === 'sum') return maybeWhere(q, def.where, `COALESCE(${q.ident(def.column)}, 0)`, '0');
  if (def.type === 'count') return def.where ? `CASE WHEN ${filterCondition(q, def.where)} THEN 1 ELSE 0 END` : '1';
  return null;
}

function maybeWhere(q: QueryBuilder, where: ColumnFilter | undefined, then: string, otherwise: string): string {
  return where ? `CASE WHEN ${filterCondition(q, where)} THEN ${then} ELSE ${otherwise} END` : then;
}

/**
 * SELECT-list entries of the summary pieces, plus the catalog metric itself (tc_value) and the row
 * count (tc_rows). With a compile context over the run's rollup, only a plain total can be read
 * (see `readsRollup`); the other kinds need each row's value.
 */
export function measureColumns(q: QueryBuilder, ds: DatasetConfig, metric: Metric, plan: MeasurePlan, ctx?: CompileContext): string[] {
  if (ctx?.rollup) {
    if (!totalOfRows(plan)) throw new Error(`a ${plan.kind} comparison of ${metric.name} needs each row, not the rollup`);
    const rows = q.dialect.toDouble(rowCountSql(q, ctx));
    return [`${rows} AS tc_n`, `${measureSql(q, ctx, metric)} AS tc_value`, `${rows} AS tc_rows`];
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

/** A comparison of plain totals of rows (bookings per group and period): sums of counts, so a rollup holds it. */
export function totalOfRows(plan: Pick<MeasurePlan, 'kind' | 'additive'>): boolean {
  return plan.kind === 'total' && plan.additive;
}

/** The median of the per-row value, for money compared as a mean (skewed values). */
export function medianColumn(q: QueryBuilder, plan: MeasurePlan): string | null {
  return plan.kind === 'mean' && plan.x ? `${q.dialect.toDouble(`percentile_cont(0.5) WITHIN GROUP (ORDER BY ${plan.x})`)} AS tc_median` : null;
}

export function num(v: CellValue | undefined): number | null {
  return typeof v === 'number' && Number.isFinite(v) ? v : null;
}

/** Reads a cell from a summary row; a missing row is an empty cell. */
export function cellFromRow(row: Record<string, CellValue> | undefined, plan: MeasurePlan): Cell {
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
