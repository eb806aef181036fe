// A catalog metric as one SQL aggregate expression. Ratios are ratios of aggregates at the
// grain asked for (never an average of per-row ratios), so they stay right at every grain.
import type { ColumnFilter, DatasetConfig, Metric } from '../../config/schema.js';
import { isLevelSum, metricByName } from '../catalog.js';
import type { QueryBuilder } from './query-builder.js';
import { quantileAggregate } from './dialect.js';

/**
 * `rowCondition`, when given, limits every aggregate inside the metric to the rows where it holds
 * (a FILTER clause, not a WHERE): a statement grouped by period then keeps each period that has
 * rows at all, and a period with rows but none that match counts 0 rather than vanishing. A sum
 * over no matching rows is 0 for the same reason (SQL's SUM of nothing is NULL); an average over
 * none stays missing.
 */
export function metricAggregate(q: QueryBuilder, ds: DatasetConfig, metric: Metric, rowCondition?: string): string {
  const d = q.dialect;
  const def = metric.definition;
  const f = (own?: ColumnFilter) => filterClause(q, own, rowCondition);
  switch (def.type) {
    case 'sum': {
      const sum = `SUM(${q.ident(def.column)})${f(def.where)}`;
      // A level (headcounts, balances: one reading per series per stamp) adds up across segments at
      // one stamp but not over time: a period's value is the mean over its stamps of the stamp's
      // total, which is the period's sum over the stamps it has rows on.
      if (isLevelSum(metric)) return `(${d.toDouble(`COALESCE(${sum}, 0)`)} / NULLIF(${d.toDouble(`COUNT(DISTINCT ${q.ident(ds.time_column)})${f(def.where)}`)}, 0))`;
      return d.toDouble(def.where || rowCondition ? `COALESCE(${sum}, 0)` : sum);
    }
    case 'count':
      return d.toDouble(`COUNT(*)${f(def.where)}`);
    case 'distinct_count':
      return d.toDouble(`COUNT(DISTINCT ${q.ident(def.column)})${f(def.where)}`);
    case 'average':
      // A statistic named in the request ("median delay", analysis/statistic.ts): that quantile of the column.
      if (def.quantile !== undefined) return d.toDouble(`${quantileAggregate(d, q.ident(def.column), def.quantile)}${f(def.where)}`);
      return d.toDouble(`AVG(${q.ident(def.column)})${f(def.where)}`);
    case 'ratio': {
      const num = metricAggregate(q, ds, metricByName(ds, def.numerator), rowCondition);
      const den = metricAggregate(q, ds, metricByName(ds, def.denominator), rowCondition);
      return `(${num} / NULLIF(${den}, 0))`;
    }
    case 'rate': {
      const base = def.of ? metricByName(ds, def.of) : undefined;
      const cond = [filterCondition(q, def.where), ...(rowCondition ? [rowCondition] : [])].join(' AND ');
      if (base && !isRateBase(base)) throw new Error(`metric ${metric.name} cannot be the base of a rate`);
      const part = base ? metricAggregate(q, ds, base, cond) : d.toDouble(`COUNT(*) FILTER (WHERE ${cond})`);
      const whole = base ? metricAggregate(q, ds, base, rowCondition) : d.toDouble(`COUNT(*)${filterClause(q, undefined, rowCondition)}`);
      return `(${part} / NULLIF(${whole}, 0))`;
    }
  }
}

// Config validation forbids a rate of a ratio or rate.
function isRateBase(metric: Metric): boolean {
  const t = metric.definition.type;
  return t === 'sum' || t === 'count' || t === 'distinct_count' || t === 'average';
}

function filterClause(q: QueryBuilder, f: ColumnFilter | undefined, rowCondition?: string): string {
  const conds = [...(rowCondition ? [rowCondition] : []), ...(f ? [filterCondition(q, f)] : [])];
  return conds.length ? ` FILTER (WHERE ${conds.join(' AND ')})` : '';
}

export function filterCondition(q: QueryBuilder, f: ColumnFilter): string {
  const col = q.ident(f.column);
  const v = f.value;
  switch (f.op) {
    // A plain column reference rather than `IS TRUE`: the same rows pass wherever this is a
    // condition (WHERE, FILTER, CASE WHEN: a missing value passes neither test), and engines
    // that push work to where the data is (postgres_fdw among them) ship `col` and `NOT col` but
    // not `IS TRUE`.
    case 'is_true':
      return col;
    case 'is_false':
      return `NOT ${col}`;
    case 'in': {
      const list = Array.isArray(v) ? v : v === undefined ? [] : [v];
      return list.length === 0 ? 'FALSE' : `${col} IN (${list.map((x) => q.bind(x)).join(', ')})`;
    }
    default: {
      if (v === undefined || Array.isArray(v)) throw new Error(`filter on ${f.column} with op ${f.op} needs a single value`);
      const op = { eq: '=', ne: '<>', gt: '>', gte: '>=', lt: '<', lte: '<=' }[f.op];
      return `${col} ${op} ${q.bind(v)}`;
    }
  }
}
