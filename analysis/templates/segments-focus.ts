// The named segment of a share question ("What share of all flights does ATL have?", sq.focus):
// its total beside the whole's over the window, its rank among every segment (none folded), and
// its share in each period of the grain. Part of the segment_shares template.
import { metricByName } from '../catalog.js';
import { type CompileContext, localDateExpr, measureSql, periodScope, segmentConditions, tableRef, whereClause } from '../compile-context.js';
import type { ShareFocusFinding } from '../findings/segments.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { CompiledQuery, ResultTable, SegmentFilter, SubQuestion } from '../types.js';
import { segmentDimension } from './segments-fold-sql.js';
import type { ReadContext } from './template.js';
import { coveredWindow, numberOrNull, windowPeriods } from './trend-points.js';

function focusFilter(sq: SubQuestion): SegmentFilter {
  return { dimension: sq.focus!.dimension, values: [sq.focus!.value] };
}

/**
 * One row: the focus segment's total over the window (focus_value, NULL when it has no rows
 * there), its rank by size among every segment with rows in the window (RANK: ties share a rank,
 * a missing size counts as zero as on reading), how many segments there are, and the total.
 */
export function compileFocus(sq: SubQuestion, ctx: CompileContext): CompiledQuery {
  const q = new QueryBuilder(ctx.dialect);
  const d = ctx.dialect;
  const dim = segmentDimension({ ...sq, dimension: sq.focus!.dimension }, ctx);
  const metric = metricByName(ctx.dataset, sq.metrics[0]!);
  const isFocus = segmentConditions(q, ctx, [focusFilter(sq)])[0]!;
  return q.finish(`WITH tc_focus_sizes AS (
  SELECT ${q.ident(dim.column)} AS tc_value, COALESCE(${measureSql(q, ctx, metric)}, 0) AS tc_size,
    MAX(CASE WHEN ${isFocus} THEN 1 ELSE 0 END) AS tc_is_focus
  FROM ${tableRef(q, ctx)}
  WHERE ${whereClause(q, ctx, sq.window, sq.filters)}
  GROUP BY 1
), tc_focus_ranked AS (
  SELECT tc_size, tc_is_focus,
    RANK() OVER (ORDER BY tc_size DESC) AS tc_rank,
    COUNT(*) OVER () AS tc_count,
    SUM(tc_size) OVER () AS tc_total
  FROM tc_focus_sizes
)
SELECT ${d.toDouble('MAX(CASE WHEN tc_is_focus = 1 THEN tc_size END)')} AS focus_value,
  ${d.toDouble('MIN(CASE WHEN tc_is_focus = 1 THEN tc_rank END)')} AS focus_rank,
  ${d.toDouble('MAX(tc_count)')} AS focus_of,
  ${d.toDouble('MAX(tc_total)')} AS focus_total
FROM tc_focus_ranked`);
}

/** Per period of the grain: the focus segment's total (0 where it has no matching rows) and the whole's. */
export function compileFocusSeries(sq: SubQuestion, ctx: CompileContext): CompiledQuery {
  const q = new QueryBuilder(ctx.dialect);
  const d = ctx.dialect;
  const metric = metricByName(ctx.dataset, sq.metrics[0]!);
  const focus = periodScope(q, ctx, sq.window, [...sq.filters, focusFilter(sq)]);
  return q.finish(`SELECT ${d.periodStart(sq.grain, localDateExpr(q, ctx))} AS period,
  ${d.toDouble(`COALESCE(${focus.measure(metric)}, 0)`)} AS focus_value,
  ${d.toDouble(`COALESCE(${measureSql(q, ctx, metric)}, 0)`)} AS total_value
FROM ${tableRef(q, ctx)}
WHERE ${[focus.where, ...segmentConditions(q, ctx, sq.filters)].join('\n  AND ')}
GROUP BY 1
ORDER BY 1`);
}

/** The focus finding from the two tables; null when the whole has no positive total (no shares). */
export function readFocus(sq: SubQuestion, focusTable: ResultTable | undefined, seriesTable: ResultTable | undefined, ctx: ReadContext): ShareFocusFinding | null {
  const row = focusTable?.rows[0];
  if (!sq.focus || !row) return null;
  const total = numberOrNull(row.focus_total);
  if (total === null || !(total > 0)) return null;
  const value = numberOrNull(row.focus_value) ?? 0;
  const covered = coveredWindow(sq.window, ctx.coverage);
  const partial = covered ? windowPeriods(covered, sq.grain).partial : new Set<string>();
  const series = (seriesTable?.rows ?? []).map((r) => {
    const period = String(r.period).slice(0, 10);
    const v = numberOrNull(r.focus_value) ?? 0;
    const t = numberOrNull(r.total_value) ?? 0;
    return { period, value: v, total: t, share: t > 0 ? v / t : null, partial: partial.has(period) };
  });
  // The first and last complete periods with a share: a partial period's share is still a share, but the two ends compare like with like.
  const whole = series.filter((p) => !p.partial && p.share !== null);
  const first = whole[0];
  const last = whole[whole.length - 1];
  const change = first && last && first !== last ? { from: first.period, to: last.period, fromShare: first.share!, toShare: last.share!, points: last.share! - first.share! } : null;
  return { segment: sq.focus.value, value, total, grain: sq.grain, share: value / total, rank: numberOrNull(row.focus_rank), of: numberOrNull(row.focus_of) ?? 0, series, change };
}
