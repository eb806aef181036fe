// A catalog metric as one SQL aggregate expression. Ratios are ratios of aggregates at the
// grain asked for (never an average of per-row ratios), so they stay right at every grain.
import type { ColumnFilter, DatasetConfig, Metric } from '../../config/schema.js';
import { metricByName } from '../catalog.js';
import type { QueryBuilder } from './query-builder.js';

export function metricAggregate(q: QueryBuilder, ds: DatasetConfig, metric: Metric): string {
  const d = q.dialect;
  const def = metric.definition;
  switch (def.type) {
    case 'sum':
      return d.toDouble(`SUM(${q.ident(def.column)})${filterClause(q, def.where)}`);
    case 'count':
      return d.toDouble(`COUNT(*)${filterClause(q, def.where)}`);
    case 'distinct_count':
      return d.toDouble(`COUNT(DISTINCT ${q.ident(def.column)})${filterClause(q, def.where)}`);
    case 'average':
      return d.toDouble(`AVG(${q.ident(def.column)})${filterClause(q, def.where)}`);
    case 'ratio': {
      const num = metricAggregate(q, ds, metricByName(ds, def.numerator));
      const den = metricAggregate(q, ds, metricByName(ds, def.denominator));
      return `(${num} / NULLIF(${den}, 0))`;
    }
    case 'rate': {
      const base = def.of ? metricByName(ds, def.of) : undefined;
      const cond = filterCondition(q, def.where);
      const part = base ? metricAggregateWhere(q, ds, base, cond) : d.toDouble(`COUNT(*) FILTER (WHERE ${cond})`);
      const whole = base ? metricAggregate(q, ds, base) : d.toDouble('COUNT(*)');
      return `(${part} / NULLIF(${whole}, 0))`;
    }
  }
}

function metricAggregateWhere(q: QueryBuilder, ds: DatasetConfig, metric: Metric, cond: string): string {
  const def = metric.definition;
  const own = 'where' in def && def.where ? ` AND ${filterCondition(q, def.where)}` : '';
  const f = ` FILTER (WHERE ${cond}${own})`;
  switch (def.type) {
    case 'sum':
      return q.dialect.toDouble(`SUM(${q.ident(def.column)})${f}`);
    case 'count':
      return q.dialect.toDouble(`COUNT(*)${f}`);
    case 'distinct_count':
      return q.dialect.toDouble(`COUNT(DISTINCT ${q.ident(def.column)})${f}`);
    case 'average':
      return q.dialect.toDouble(`AVG(${q.ident(def.column)})${f}`);
    default:
      // Config validation forbids a rate of a ratio or rate.
      throw new Error(`metric ${metric.name} cannot be the base of a rate`);
  }
}

function filterClause(q: QueryBuilder, f: ColumnFilter | undefined): string {
  return f ? ` FILTER (WHERE ${filterCondition(q, f)})` : '';
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
