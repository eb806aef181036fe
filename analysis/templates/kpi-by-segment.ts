// Template "kpi_by_segment" (kpi × breakdown): the snapshot's three points (latest complete
// period, the one before, a year earlier) for each segment of a dimension. The top N segments
// (as many as the request asked for, else namedSegmentCount's default; ranked by the first
// metric's value in the latest period, as segments-fold-sql ranks them) are named; the rest are combined in
// the database, because a ratio or a distinct count of "All others" cannot be added up from the
// segments' own values.
import type { DatasetConfig } from '../../config/schema.js';
import { groupableDimension, isAdditive, metricByName, rankDescending } from '../catalog.js';
import { type PeriodScope, rowCountSql, tableRef } from '../compile-context.js';
import type { Coverage } from '../coverage.js';
import type { KpiBySegmentFinding, KpiSegmentRow, SegmentKey } from '../findings/kpi.js';
import { nextPeriod } from '../periods.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { Caveat, CellValue, CompiledQuery, Finding, ResultTable, SubQuestion } from '../types.js';
import { baseIsZero, kpiDelta } from './kpi-delta.js';
import { comparisonPeriods, coveredInFull, type KpiCompileContext, latestCandidates, periodsToRead, resolvedLatest } from './kpi-periods.js';
import { EMPTY_TABLE, numberOrNull, periodExpr, periodsScope, periodsWhere } from './kpi-sql.js';
import { foldedAs, namedSegmentCount, rankFloorSql } from './segments-fold-sql.js';
import { complementaryFoldCtes, minGroupSize, suppressedSegmentsCaveat } from './small-groups.js';
import type { Reading, Template } from './template.js';

// Working column names inside the query. They start "tc_kpi_" to stay clear of the table's own columns.
const KEY = 'tc_kpi_key';
const RANK = 'tc_kpi_rank';
const PERIOD = 'tc_kpi_period';
const OTHER = 'tc_kpi_other';
const SMALL = 'tc_kpi_small';
const CELL_PERIOD = 'tc_kpi_cell_period';
const CELL_ROWS = 'tc_kpi_cell_rows';

export function compileKpiBySegment(sq: SubQuestion, ctx: KpiCompileContext, topN = namedSegmentCount(sq)): CompiledQuery {
  if (!sq.dimension) throw new Error('kpi_by_segment needs a dimension');
  const ds = ctx.dataset;
  const dim = groupableDimension(ds, sq.dimension);
  const metrics = sq.metrics.map((m) => metricByName(ds, m));
  const q = new QueryBuilder(ctx.dialect);
  const table = tableRef(q, ctx);
  const seg = q.ident(dim.column);
  const candidates = latestCandidates(sq.window, sq.grain, ctx.coverage);
  const periods = periodsToRead(candidates, sq.grain);
  const rankPeriod = periodExpr(q, ctx, sq.grain);
  const rankWhere = periodsWhere(q, ctx, periods, sq.grain, sq.filters);
  const period = periodExpr(q, ctx, sq.grain);
  const n = q.bind(topN);
  // The periods' dates in WHERE and the filters inside each aggregate (periodScope): a segment or a
  // period with rows but none matching keeps its row, so a filtered count there is 0, not a gap.
  const scope = periodsScope(q, ctx, periods, sq.grain, sq.filters);
  const where = scope.where;
  const measures = metrics.map((m) => `  ${scope.measure(m)} AS ${q.ident(m.name)}`);
  const [key, rank, per, other] = [KEY, RANK, PERIOD, OTHER].map(q.ident);
  const min = minGroupSize(ds);
  const values = latestValues(q, ctx, sq, metrics[0]!, candidates);
  if (min !== null) {
    return q.finish(withMinimum(q, ctx, { table, seg, rankPeriod, rankWhere, period, n, where, measures, min: q.bind(min), scope, values }));
  }
  return q.finish(`WITH ${values.ctes}, ranked AS (
  SELECT tc_kpi_seg.${key},
    ROW_NUMBER() OVER (ORDER BY ${values.order('tc_kpi_seg')}) AS ${rank}
  FROM (
    SELECT ${seg} AS ${key}, ${rowCountSql(q, ctx)} AS tc_kpi_all_rows
    FROM ${table}
    WHERE ${rankWhere}
    GROUP BY ${seg}
  ) tc_kpi_seg
  LEFT JOIN tc_kpi_values ON tc_kpi_seg.${key} IS NOT DISTINCT FROM tc_kpi_values.${key}
), tagged AS (
  SELECT ${table}.*,
    ${period} AS ${per},
    COALESCE(ranked.${rank} > ${n}, TRUE) AS ${other},
    ranked.${rank} AS ${rank}
  FROM ${table}
  LEFT JOIN ranked ON ${table}.${seg} IS NOT DISTINCT FROM ranked.${key}
  WHERE ${where}
)
SELECT ${per} AS period,
  CASE WHEN ${other} THEN NULL ELSE ${seg} END AS segment,
  ${other} AS other,
  GROUPING(${other}) AS total_row,
  MIN(${rank}) AS segment_rank,
  ${ctx.dialect.toDouble(`COUNT(DISTINCT ${scope.onMatching(seg)})`)} AS segment_count,
${measures.join(',\n')},
  ${ctx.dialect.toDouble(scope.rowCount())} AS row_count
FROM tagged
GROUP BY GROUPING SETS ((${per}, CASE WHEN ${other} THEN NULL ELSE ${seg} END, ${other}), (${per}))
ORDER BY 1, 4, 5`);
}

/**
 * The first metric's value for each segment in the latest period (CTE tc_kpi_values: the key,
 * tc_kpi_value, tc_kpi_thin), and the ranking order over it: by that value, largest first or in
 * the direction asked, a thin segment of an average or a rate after the rest (RANK_FLOOR, on its
 * rows in the latest period), a segment with no value there after those with one (by its rows
 * in all the periods read, `seg`.tc_kpi_all_rows), then by name.
 */
function latestValues(q: QueryBuilder, ctx: KpiCompileContext, sq: SubQuestion, metric: ReturnType<typeof metricByName>, candidates: string[]) {
  const key = q.ident(KEY);
  const seg = q.ident(groupableDimension(ctx.dataset, sq.dimension!).column);
  const latest = periodsScope(q, ctx, candidates, sq.grain, sq.filters);
  const descending = !sq.rankOrder || rankDescending(metric, sq.rankOrder);
  const floor = isAdditive(metric) ? 'NULL' : rankFloorSql(q, 'tc_kpi_latest_rows');
  const ctes = `tc_kpi_counted AS (
  SELECT ${seg} AS ${key}, ${latest.measure(metric)} AS tc_kpi_value, ${latest.rowCount()} AS tc_kpi_latest_rows
  FROM ${tableRef(q, ctx)}
  WHERE ${latest.where}
  GROUP BY ${seg}
), tc_kpi_values AS (
  SELECT ${key}, tc_kpi_value, COALESCE(tc_kpi_latest_rows < ${floor}, FALSE) AS tc_kpi_thin
  FROM tc_kpi_counted
)`;
  const order = (segAlias: string) =>
    `COALESCE(tc_kpi_values.tc_kpi_thin, FALSE), tc_kpi_values.tc_kpi_value ${descending ? 'DESC' : 'ASC'} NULLS LAST, ${segAlias}.tc_kpi_all_rows DESC, ${segAlias}.${key} ASC NULLS LAST`;
  return { ctes, order };
}

/**
 * The same query with a minimum group size: a segment with fewer rows than the minimum in any
 * period read (where it has rows at all) joins "All others" whatever its rank, so no value shown
 * rests on fewer rows; while the fold is below the minimum in a period, the smallest named
 * segments join it too (complementary suppression, see small-groups.ts). small_segments counts
 * the small ones (in any period), complement_segments those folded beside them,
 * ranked_out_segments the ones folded for their rank alone.
 */
function withMinimum(
  q: QueryBuilder,
  ctx: KpiCompileContext,
  p: { table: string; seg: string; rankPeriod: string; rankWhere: string; period: string; n: string; where: string; measures: string[]; min: string; scope: PeriodScope; values: ReturnType<typeof latestValues> },
): string {
  const [key, rank, per, other, small, cellPeriod, cellRows, smallCount, rankedOut, complementCount] = [KEY, RANK, PERIOD, OTHER, SMALL, CELL_PERIOD, CELL_ROWS, 'tc_kpi_small_count', 'tc_kpi_ranked_out', 'tc_kpi_complement_count'].map(q.ident);
  return `WITH ${p.values.ctes}, cells AS (
  SELECT ${p.seg} AS ${key}, ${p.rankPeriod} AS ${cellPeriod}, ${rowCountSql(q, ctx)} AS ${cellRows}
  FROM ${p.table}
  WHERE ${p.rankWhere}
  GROUP BY 1, 2
), ranked AS (
  SELECT tc_kpi_seg.${key},
    ROW_NUMBER() OVER (ORDER BY ${p.values.order('tc_kpi_seg')}) AS ${rank},
    tc_kpi_seg.${small}
  FROM (
    SELECT ${key}, SUM(${cellRows}) AS tc_kpi_all_rows, (MIN(${cellRows}) < ${p.min}) AS ${small}
    FROM cells
    GROUP BY ${key}
  ) tc_kpi_seg
  LEFT JOIN tc_kpi_values ON tc_kpi_seg.${key} IS NOT DISTINCT FROM tc_kpi_values.${key}
), first_fold AS (
  SELECT ${key}, (${rank} > ${p.n} OR ${small}) AS tc_kpi_folded
  FROM ranked
), ${complementaryFoldCtes({ name: 'tc_kpi_extra', cells: 'cells', segments: 'first_fold', key: key!, period: cellPeriod!, rows: cellRows!, folded: 'tc_kpi_folded', minimum: p.min })},
tagged AS (
  SELECT ${p.table}.*,
    ${p.period} AS ${per},
    COALESCE(ranked.${rank} > ${p.n} OR ranked.${small} OR tc_kpi_extra.tc_sdc_fold IS NOT NULL, TRUE) AS ${other},
    COALESCE(ranked.${small}, FALSE) AS ${small},
    ranked.${rank} AS ${rank},
    (SELECT COUNT(*) FROM ranked WHERE ranked.${small}) AS ${smallCount},
    (SELECT COUNT(*) FROM ranked WHERE ranked.${rank} > ${p.n} AND NOT ranked.${small}) AS ${rankedOut},
    (SELECT COUNT(*) FROM tc_kpi_extra) AS ${complementCount}
  FROM ${p.table}
  LEFT JOIN ranked ON ${p.table}.${p.seg} IS NOT DISTINCT FROM ranked.${key}
  LEFT JOIN tc_kpi_extra ON ${p.table}.${p.seg} IS NOT DISTINCT FROM tc_kpi_extra.tc_sdc_key
  WHERE ${p.where}
)
SELECT ${per} AS period,
  CASE WHEN ${other} THEN NULL ELSE ${p.seg} END AS segment,
  ${other} AS other,
  GROUPING(${other}) AS total_row,
  MIN(${rank}) AS segment_rank,
  ${ctx.dialect.toDouble(`COUNT(DISTINCT ${p.scope.onMatching(p.seg)})`)} AS segment_count,
${p.measures.join(',\n')},
  ${ctx.dialect.toDouble(p.scope.rowCount())} AS row_count,
  ${ctx.dialect.toDouble(`MAX(${smallCount})`)} AS small_segments,
  ${ctx.dialect.toDouble(`MAX(${rankedOut})`)} AS ranked_out_segments,
  ${ctx.dialect.toDouble(`MAX(${complementCount})`)} AS complement_segments
FROM tagged
GROUP BY GROUPING SETS ((${per}, CASE WHEN ${other} THEN NULL ELSE ${p.seg} END, ${other}), (${per}))
ORDER BY 1, 4, 5`;
}

export const kpiBySegmentTemplate: Template = {
  compile: (sq, ctx) => [{ name: 'segments', ...compileKpiBySegment(sq, ctx) }],
  read: (sq, tables, ctx) => readKpiBySegment(sq, tables.segments ?? EMPTY_TABLE, ctx.dataset, ctx.coverage),
};

type Row = Record<string, CellValue>;

export function readKpiBySegment(sq: SubQuestion, table: ResultTable, dataset: DatasetConfig, coverage: Coverage, topN = namedSegmentCount(sq)): Reading {
  const caveats: Caveat[] = [];
  if (table.truncated) caveats.push({ code: 'truncated', data: { rows: table.rows.length } });
  const { latest, partial } = resolvedLatest(sq.window, sq.grain, coverage);
  if (partial) caveats.push({ code: 'partial_period_excluded', data: { ...partial, grain: sq.grain } });
  const totals = new Map<string, Row>();
  const groups = new Map<string, { key: SegmentKey; other: boolean; byPeriod: Map<string, Row> }>();
  for (const r of table.rows) {
    const p = String(r.period);
    if (Number(r.total_row) === 1) {
      totals.set(p, r);
      continue;
    }
    const other = r.other === true;
    const key = other ? null : (r.segment ?? null);
    const id = other ? 'other' : `segment:${typeof key}:${String(key)}`;
    let g = groups.get(id);
    if (!g) groups.set(id, (g = { key, other, byPeriod: new Map() }));
    g.byPeriod.set(p, r);
  }
  const latestTotal = latest === null ? undefined : totals.get(latest);
  // A latest period with rows but none matching the filters is read (a filtered count of 0), not missing.
  if (latest === null || latestTotal === undefined) {
    caveats.push({ code: 'no_data', data: { start: latest ?? sq.window.start, end: latest ? nextPeriod(latest, sq.grain) : sq.window.end } });
    return { findings: [], caveats };
  }
  const { previous, lastYear } = comparisonPeriods(latest, sq.grain);
  const usable = (p: string | null) => p !== null && coveredInFull(p, sq.grain, coverage);
  const findings: Finding[] = [];
  let zeroBase = false;
  for (const name of sq.metrics) {
    const metric = metricByName(dataset, name);
    const point = (byPeriod: Map<string, Row>): Omit<KpiSegmentRow, 'key' | 'other' | 'segments'> => {
      const value = numberOrNull(byPeriod.get(latest)?.[name]);
      const base = (p: string | null) => (usable(p) ? numberOrNull(byPeriod.get(p!)?.[name]) : null);
      const prev = kpiDelta(value, previous, base(previous), metric);
      const ly = lastYear === null ? null : kpiDelta(value, lastYear, base(lastYear), metric);
      zeroBase ||= baseIsZero(prev, value, metric) || baseIsZero(ly, value, metric);
      return { value, rows: Number(byPeriod.get(latest)?.row_count ?? 0), previous: prev, lastYear: ly };
    };
    const rows = [...groups.values()].map((g) => ({
      key: g.key,
      other: g.other,
      segments: g.other ? Math.max(...[...g.byPeriod.values()].map((r) => Number(r.segment_count ?? 0))) : 1,
      rank: g.other ? Infinity : Number(g.byPeriod.get(latest)?.segment_rank ?? firstRank(g.byPeriod)),
      ...point(g.byPeriod),
    }));
    // Named segments in rank order, then "All others"; a segment absent from the latest period sorts after those present.
    rows.sort((a, b) => a.rank - b.rank || Number(a.other) - Number(b.other));
    const segments: KpiSegmentRow[] = rows.map(({ rank: _rank, ...r }) => r);
    const finding: KpiBySegmentFinding = {
      type: 'kpi_by_segment',
      metric: name,
      grain: sq.grain,
      dimension: sq.dimension!,
      period: latest,
      segments,
      total: point(new Map([...totals.entries()])),
      topN,
    };
    findings.push(finding);
  }
  const other = [...groups.values()].find((g) => g.other);
  const folded = foldedAs(metricByName(dataset, sq.metrics[0]!), sq.rankOrder);
  if (other) {
    const count = Math.max(...[...other.byPeriod.values()].map((r) => Number(r.segment_count ?? 0)));
    const minimum = minGroupSize(dataset);
    if (minimum === null) caveats.push({ code: 'segments_folded', data: { count, folded } });
    else {
      const first = [...other.byPeriod.values()][0]!;
      const small = Number(first.small_segments ?? 0);
      const ranked = Number(first.ranked_out_segments ?? 0);
      const complement = Number(first.complement_segments ?? 0);
      if (ranked > 0) caveats.push({ code: 'segments_folded', data: { count: ranked, folded } });
      if (small > 0) caveats.push(suppressedSegmentsCaveat(small, minimum, { dimension: sq.dimension! }, complement));
    }
  }
  if (zeroBase) caveats.push({ code: 'base_zero', data: {} });
  return { findings, caveats };
}

function firstRank(byPeriod: Map<string, Row>): number {
  const ranks = [...byPeriod.values()].map((r) => numberOrNull(r.segment_rank)).filter((x): x is number => x !== null);
  return ranks.length ? Math.min(...ranks) : Number.MAX_SAFE_INTEGER;
}
