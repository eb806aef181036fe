// One shared scan per run: a rollup of the table at day grain over the dimensions the run's
// sub-questions use, keeping for each metric the additive pieces it is built from (sums and
// counts, filtered as the metric says). Every additive answer (totals, breakdowns, growth,
// seasonality, ratios of sums, rates, means) is then computed exactly from the rollup's rows
// instead of the table's, so the plan scans the table once. Medians, distinct counts and
// per-unit questions still read the table itself.
import { createHash } from 'node:crypto';
import type { DatasetConfig, Metric } from '../../config/schema.js';
import { groupableDimension, isLevelSum, metricByName, namedUnitDimension } from '../catalog.js';
import { datasetRelation, type CompileContext } from '../compile-context.js';
import { filterCondition } from '../sql/metric-sql.js';
import { QueryBuilder } from '../sql/query-builder.js';
import { rangeCondition } from '../sql/time-range.js';
import { momentPieces } from '../templates/performance-measure.js';
import type { CompiledQuery, DateWindow } from '../types.js';

/** The name queries give the rollup they read (a CTE in the SQL shown to people). */
export const ROLLUP_RELATION = 'tc_rollup';
/** The rollup column that counts the table's rows behind each rollup row. */
export const ROLLUP_ROWS = 'tc_rows';

/** What a run's rollup keeps: its dimension columns and the metrics whose pieces it sums. */
export interface RollupShape {
  /** Catalog columns, sorted, each a groupable dimension's column or a comparison group's column. */
  columns: string[];
  /** Metric names, sorted; each is additive (see `isRollupMetric`). */
  metrics: string[];
  /**
   * Metrics compared between groups row by row, sorted: the rollup also keeps their per-row
   * values' count, sum and sum of squares (templates/performance-measure.ts momentPieces), from
   * which means and variances add up exactly. Absent: none.
   */
  moments?: string[];
}

/** A query over the rollup, and the rollup it needs; what `NamedQuery.scan` carries. */
export interface SharedScan {
  /** Stable key of the rollup statement (its SQL and parameters): equal keys, equal rollups. */
  key: string;
  /** The rollup statement on its own (parameters numbered from 1). */
  rollup: CompiledQuery;
  /** The query reading the rollup as ROLLUP_RELATION (parameters numbered from 1). */
  body: CompiledQuery;
}

/** A metric the rollup can rebuild exactly: every piece is a sum or a count (no distinct counts). */
export function isRollupMetric(ds: DatasetConfig, metric: Metric): boolean {
  const def = metric.definition;
  switch (def.type) {
    case 'sum':
      // A level's mean over stamps needs the distinct stamps, which rollup pieces do not keep.
      return !isLevelSum(metric);
    case 'count':
    case 'average':
      return true;
    case 'distinct_count':
      return false;
    case 'ratio':
      return isRollupMetric(ds, metricByName(ds, def.numerator)) && isRollupMetric(ds, metricByName(ds, def.denominator));
    case 'rate':
      return def.of ? isRollupMetric(ds, metricByName(ds, def.of)) : true;
  }
}

/** One additive piece: a rollup column and the table aggregate that fills it. */
interface Piece {
  column: string;
  kind: 'sum' | 'count';
  /** Builds the table-side aggregate with the rollup statement's own builder (so values stay bound). */
  aggregate(q: QueryBuilder): string;
}

const sumName = (m: string) => `tc_sum__${m}`;
const countName = (m: string) => `tc_count__${m}`;
const hitName = (m: string) => `tc_hit__${m}`;
const hitCountName = (m: string) => `tc_hitcount__${m}`;

/** The pieces one metric needs, its numerator's and denominator's included. */
function piecesOf(ds: DatasetConfig, metric: Metric): Piece[] {
  const def = metric.definition;
  const filter = (q: QueryBuilder, extra?: string) => {
    const conds = [...(extra ? [extra] : []), ...('where' in def && def.where && def.type !== 'rate' ? [filterCondition(q, def.where)] : [])];
    return conds.length ? ` FILTER (WHERE ${conds.join(' AND ')})` : '';
  };
  switch (def.type) {
    case 'sum':
      return [{ column: sumName(metric.name), kind: 'sum', aggregate: (q) => `SUM(${q.ident(def.column)})${filter(q)}` }];
    case 'count':
      return [{ column: countName(metric.name), kind: 'count', aggregate: (q) => `COUNT(*)${filter(q)}` }];
    case 'average':
      return [
        { column: sumName(metric.name), kind: 'sum', aggregate: (q) => `SUM(${q.ident(def.column)})${filter(q)}` },
        { column: countName(metric.name), kind: 'count', aggregate: (q) => `COUNT(${q.ident(def.column)})${filter(q)}` },
      ];
    case 'distinct_count':
      throw new Error(`metric ${metric.name} is a distinct count, which a rollup cannot rebuild`);
    case 'ratio':
      return [...piecesOf(ds, metricByName(ds, def.numerator)), ...piecesOf(ds, metricByName(ds, def.denominator))];
    case 'rate': {
      const base = def.of ? metricByName(ds, def.of) : undefined;
      if (!base) return [{ column: hitName(metric.name), kind: 'count', aggregate: (q) => `COUNT(*) FILTER (WHERE ${filterCondition(q, def.where)})` }];
      const b = base.definition;
      const cond = (q: QueryBuilder) => [filterCondition(q, def.where), ...('where' in b && b.where ? [filterCondition(q, b.where)] : [])].join(' AND ');
      const hit: Piece[] =
        b.type === 'sum'
          ? [{ column: hitName(metric.name), kind: 'sum', aggregate: (q) => `SUM(${q.ident(b.column)}) FILTER (WHERE ${cond(q)})` }]
          : b.type === 'count'
            ? [{ column: hitName(metric.name), kind: 'count', aggregate: (q) => `COUNT(*) FILTER (WHERE ${cond(q)})` }]
            : b.type === 'average'
              ? [
                  { column: hitName(metric.name), kind: 'sum', aggregate: (q) => `SUM(${q.ident(b.column)}) FILTER (WHERE ${cond(q)})` },
                  { column: hitCountName(metric.name), kind: 'count', aggregate: (q) => `COUNT(${q.ident(b.column)}) FILTER (WHERE ${cond(q)})` },
                ]
              : [];
      if (hit.length === 0) throw new Error(`metric ${metric.name} cannot be the base of a rate`);
      return [...hit, ...piecesOf(ds, base)];
    }
  }
}

/**
 * The metric as an aggregate over the rollup's rows; the same number the table-side
 * `metricAggregate` gives (sums of sums and of counts are exact; a count over no rows is 0, and
 * so is a filtered sum). `rowCondition` limits every sum to the rollup rows where it holds, as
 * it does on the table side.
 */
export function rollupMetricAggregate(q: QueryBuilder, ds: DatasetConfig, metric: Metric, rowCondition?: string): string {
  const d = q.dialect;
  const only = rowCondition ? ` FILTER (WHERE ${rowCondition})` : '';
  const sum = (col: string) => d.toDouble(`SUM(${q.ident(col)})${only}`);
  const orZero = (col: string) => d.toDouble(`COALESCE(SUM(${q.ident(col)})${only}, 0)`);
  const def = metric.definition;
  switch (def.type) {
    case 'sum':
      return def.where || rowCondition ? orZero(sumName(metric.name)) : sum(sumName(metric.name));
    case 'count':
      return orZero(countName(metric.name));
    case 'average':
      return `(${sum(sumName(metric.name))} / NULLIF(${orZero(countName(metric.name))}, 0))`;
    case 'distinct_count':
      throw new Error(`metric ${metric.name} is a distinct count, which a rollup cannot rebuild`);
    case 'ratio':
      return `(${rollupMetricAggregate(q, ds, metricByName(ds, def.numerator), rowCondition)} / NULLIF(${rollupMetricAggregate(q, ds, metricByName(ds, def.denominator), rowCondition)}, 0))`;
    case 'rate': {
      const base = def.of ? metricByName(ds, def.of) : undefined;
      if (!base) return `(${orZero(hitName(metric.name))} / NULLIF(${orZero(ROLLUP_ROWS)}, 0))`;
      const b = base.definition.type;
      const part =
        b === 'sum' ? orZero(hitName(metric.name)) : b === 'count' ? orZero(hitName(metric.name)) : `(${sum(hitName(metric.name))} / NULLIF(${orZero(hitCountName(metric.name))}, 0))`;
      return `(${part} / NULLIF(${rollupMetricAggregate(q, ds, base, rowCondition)}, 0))`;
    }
  }
}

/** The table's row count behind the rows aggregated (what COUNT(*) is on the table). */
export function rollupRowCount(q: QueryBuilder, where?: string): string {
  return `CAST(COALESCE(SUM(${q.ident(ROLLUP_ROWS)})${where ? ` FILTER (WHERE ${where})` : ''}, 0) AS BIGINT)`;
}

/**
 * The rollup statement: the table grouped by the local calendar day (under the time column's
 * own name) and the shape's columns; with `span`, only the rows of those dates, as a range on the
 * time column itself. `firstParam` numbers its placeholders, so it can follow a query's own
 * parameters in one statement.
 */
export function compileRollup(ctx: CompileContext, shape: RollupShape, firstParam = 1, span: DateWindow | null = null): CompiledQuery {
  const ds = ctx.dataset;
  const q = new QueryBuilder(ctx.dialect, firstParam - 1);
  const date = ctx.dialect.localDate(q.ident(ds.time_column), ctx.timeColumnType, ds.timezone, q.bind);
  const day = q.ident(ds.time_column);
  const keys = [date === day ? day : `${date} AS ${day}`, ...shape.columns.map((c) => q.ident(c))];
  const where = span ? `\nWHERE ${rangeCondition(q, q.ident(ds.time_column), ctx.timeColumnType, ds.timezone, span)}` : '';
  const seen = new Set<string>();
  const pieces: string[] = [];
  for (const name of shape.metrics) {
    for (const p of piecesOf(ds, metricByName(ds, name))) {
      if (seen.has(p.column)) continue;
      seen.add(p.column);
      pieces.push(`${p.aggregate(q)} AS ${q.ident(p.column)}`);
    }
  }
  for (const name of shape.moments ?? []) {
    for (const p of momentPieces(q, ds, metricByName(ds, name))) {
      if (seen.has(p.column)) continue;
      seen.add(p.column);
      pieces.push(`${p.aggregate} AS ${q.ident(p.column)}`);
    }
  }
  return q.finish(`SELECT ${keys.join(', ')},
  COUNT(*) AS ${q.ident(ROLLUP_ROWS)}${pieces.map((p) => `,\n  ${p}`).join('')}
FROM ${datasetRelation(q, ds)}${where}
GROUP BY ${keys.map((_, i) => i + 1).join(', ')}`);
}

/** Heads a statement shown over the rollup, so a reader knows why the table is grouped by day first. */
export const ROLLUP_NOTE = `-- ${ROLLUP_RELATION}: the table's rows summed by day (and by the dimensions used) first; the numbers below are added up from those sums.`;

/** The columns a rollup needs for the dimensions, filters and comparison group named. */
export function rollupColumns(ds: DatasetConfig, names: { dimensions: string[]; groups: string[] }): string[] {
  const cols = new Set<string>();
  for (const d of names.dimensions) cols.add(groupableDimension(ds, d).column);
  for (const g of names.groups) {
    const group = ds.comparison_groups.find((x) => x.name === g);
    if (group) cols.add(group.column);
    // Units that enter or leave are left out of a comparison, judged per unit (see performance-common.ts).
    const units = group ? namedUnitDimension(ds, group) : null;
    if (units) cols.add(units.column);
  }
  return [...cols].sort();
}

/** Puts the rollup in front of a query as the CTE it reads (merging with the query's own WITH). */
export function withRollup(rollupSql: string, body: string): string {
  const cte = `${ROLLUP_RELATION} AS (\n${indent(rollupSql)}\n)`;
  const own = /^WITH\s+/i.exec(body);
  return own ? `WITH ${cte},\n${body.slice(own[0].length)}` : `WITH ${cte}\n${body}`;
}

/**
 * The statement shown, audited and (on an engine that keeps no rollups) run for a query over a
 * day-level rollup: the rollup of the query's own shape as a CTE, reading only the dates the
 * query reads (`body.datesRead`), then the query; runnable on its own, with the query's
 * parameters first and the rollup's after them. With `shared`, the run's rollup (a wider shape
 * over every date) that an engine keeping rollups reads instead: the same numbers either way.
 */
export function dayLevelQuery(ctx: CompileContext, own: RollupShape, body: CompiledQuery, shared?: { shape: RollupShape; version: string }): CompiledQuery {
  const inline = compileRollup(ctx, own, body.params.length + 1, body.datesRead ?? null);
  const shown = { sql: `${ROLLUP_NOTE}\n${withRollup(inline.sql, body.sql)}`, params: [...body.params, ...inline.params] };
  if (!shared) return shown;
  const rollup = compileRollup(ctx, shared.shape);
  return { ...shown, scan: { key: rollupKey(rollup, shared.version), rollup, body: { sql: body.sql, params: body.params } } };
}

/** A query over the run's rollup, shown with that whole rollup as its CTE (see dayLevelQuery). */
export function sharedScanQuery(ctx: CompileContext, shape: RollupShape, body: CompiledQuery, version = ''): CompiledQuery & { scan: SharedScan } {
  const q = dayLevelQuery(ctx, shape, { sql: body.sql, params: body.params, datesRead: null }, { shape, version });
  return { ...q, scan: q.scan! };
}

/** `version` names the state of the data the rollup was made from (equal SQL on changed data is another rollup). */
export function rollupKey(rollup: CompiledQuery, version = ''): string {
  return createHash('sha256')
    .update(rollup.sql)
    .update('\u0000')
    .update(JSON.stringify(rollup.params))
    .update('\u0000')
    .update(version)
    .digest('hex')
    .slice(0, 16);
}

/** Where an engine that keeps rollups (DuckDB) stores this one: its in-memory catalog, never the data file. */
export function rollupTable(key: string): string {
  return `memory.main.tc_rollup_${key}`;
}

/** The statement to store a rollup in the engine (DuckDB: CREATE TABLE ... AS over the data file). */
export function storeRollupStatement(scan: SharedScan): CompiledQuery {
  return { sql: `CREATE TABLE ${rollupTable(scan.key)} AS\n${scan.rollup.sql}`, params: scan.rollup.params };
}

/** The statement an engine that keeps rollups runs for a query over one: the body reading the stored copy. */
export function storedRollupQuery(scan: SharedScan): CompiledQuery {
  return { sql: withRollup(`SELECT * FROM ${rollupTable(scan.key)}`, scan.body.sql), params: scan.body.params };
}

/**
 * The statements DuckDB runs for a run's queries, in order: each distinct rollup stored once
 * (before its first reader), then every query as it is executed. The benchmark's floor runs these.
 */
export function executedStatements(queries: CompiledQuery[]): CompiledQuery[] {
  const stored = new Set<string>();
  const out: CompiledQuery[] = [];
  for (const q of queries) {
    if (!q.scan) {
      out.push({ sql: q.sql, params: q.params });
      continue;
    }
    if (!stored.has(q.scan.key)) {
      stored.add(q.scan.key);
      out.push(storeRollupStatement(q.scan));
    }
    out.push(storedRollupQuery(q.scan));
  }
  return out;
}

function indent(sql: string): string {
  return sql
    .split('\n')
    .map((l) => `  ${l}`)
    .join('\n');
}
