// The shared segment SQL: a metric by one dimension, with every segment past the top N folded
// into one "All others" row inside the database, so a dimension with thousands of values
// still sends only N + 1 rows (per period) to Node.
import type { Metric } from '../../config/schema.js';
import { CatalogError, groupableDimension, metricByName } from '../catalog.js';
import { type CompileContext, localDateExpr, tableRef, whereClause } from '../compile-context.js';
import { metricAggregate } from '../sql/metric-sql.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { CompiledQuery, Grain, SubQuestion } from '../types.js';
import { minGroupSize } from './small-groups.js';

/** Segments named before the rest are folded (bars and Pareto charts stay readable at this size). */
export const SEGMENT_TOP_N = 8;

/** Sums and counts add up across segments and periods; averages, ratios, rates and distinct counts do not. */
export function isAdditiveMetric(metric: Metric): boolean {
  return metric.definition.type === 'sum' || metric.definition.type === 'count';
}

export interface FoldedQueryOptions {
  topN: number;
  /** Group by the period at this grain as well; null for one row per segment over the window. */
  grain: Grain | null;
  /** Also count the distinct months each row has data in (for "complete year" checks). */
  monthsWithRows?: boolean;
  /** Also return the window's total and sum of squared segment values, before folding (for shares and HHI). */
  totals?: boolean;
}

/** The dimension a segment sub-question breaks down by; personal data is refused here. */
export function segmentDimension(sq: SubQuestion, ctx: CompileContext) {
  if (!sq.dimension) throw new CatalogError('unknown_dimension', '', `the ${sq.template} template needs a dimension to break down by`);
  return groupableDimension(ctx.dataset, sq.dimension);
}

/**
 * Segments are ranked by the metric when it is additive (their size is the metric) and by row
 * count otherwise (an average has no size; the biggest segments are the ones worth naming).
 * Ties rank by the value's text so the fold never depends on scan order. Columns:
 * [period,] segment (text; null for missing values and for the fold), other, seg_rank, members,
 * value, row_count [, months_with_rows] [, seg_count, grand_total, sum_squares].
 *
 * With a minimum group size, a segment with fewer rows in the window is folded too, whatever its
 * rank (`small_members` counts those in the fold). Its value then never leaves the database on
 * its own: sum_squares counts the small segments as one, and min_segment_value is only a sign.
 */
export function compileFoldedSegments(sq: SubQuestion, ctx: CompileContext, opts: FoldedQueryOptions): CompiledQuery {
  const q = new QueryBuilder(ctx.dialect);
  const d = ctx.dialect;
  const dim = segmentDimension(sq, ctx);
  const metric = metricByName(ctx.dataset, sq.metrics[0]!);
  const col = q.ident(dim.column);
  const table = tableRef(q, ctx);
  const rankExpr = isAdditiveMetric(metric) ? metricAggregate(q, ctx.dataset, metric) : d.toDouble('COUNT(*)');
  const innerWhere = whereClause(q, ctx, sq.window, sq.filters);
  const topN = q.bind(opts.topN);
  const foldFrom = q.bind(opts.topN + 1);
  const min = minGroupSize(ctx.dataset);
  const minP = min === null ? null : q.bind(min);

  const select: string[] = [];
  const group: string[] = [];
  if (opts.grain) {
    select.push(`${d.periodStart(opts.grain, localDateExpr(q, ctx))} AS period`);
    group.push(String(select.length));
  }
  select.push(`CASE WHEN f.tc_other THEN NULL ELSE CAST(f.tc_value AS VARCHAR) END AS segment`);
  group.push(String(select.length));
  select.push('f.tc_other AS other');
  group.push(String(select.length));
  select.push(
    `${d.toDouble('MIN(f.tc_rank)')} AS seg_rank`,
    `${d.toDouble('COUNT(DISTINCT f.tc_rank)')} AS members`,
    `${metricAggregate(q, ctx.dataset, metric)} AS ${q.ident('value')}`,
    `${d.toDouble('COUNT(*)')} AS row_count`,
  );
  if (minP) select.push(`${d.toDouble('COUNT(DISTINCT CASE WHEN f.tc_small THEN f.tc_rank END)')} AS small_members`);
  if (opts.monthsWithRows) select.push(`${d.toDouble(`COUNT(DISTINCT ${d.periodStart('month', localDateExpr(q, ctx))})`)} AS months_with_rows`);
  if (opts.totals) {
    select.push(`${d.toDouble('MIN(f.tc_count)')} AS seg_count`, `MIN(f.tc_total) AS grand_total`, `MIN(f.tc_sum_squares) AS sum_squares`, `MIN(f.tc_min) AS min_segment_value`);
  }
  const outerWhere = whereClause(q, ctx, sq.window, sq.filters);
  const order = opts.grain ? 'ORDER BY other, seg_rank, period' : 'ORDER BY other, seg_rank';

  // Below the minimum group size: folded, counted in the HHI as one segment, hidden from the minimum.
  const small = minP ? `tc_rows < ${minP}` : null;
  const sumSquares = small
    ? `SUM(CASE WHEN ${small} THEN 0 ELSE tc_size * tc_size END) OVER () + COALESCE(SUM(CASE WHEN ${small} THEN tc_size END) OVER (), 0) * COALESCE(SUM(CASE WHEN ${small} THEN tc_size END) OVER (), 0)`
    : 'SUM(tc_size * tc_size) OVER ()';
  const minSize = small ? 'SIGN(MIN(tc_size) OVER ())' : 'MIN(tc_size) OVER ()';
  const other = small ? `((tc_rank > ${topN} AND tc_count > ${foldFrom}) OR tc_small)` : `(tc_rank > ${topN} AND tc_count > ${foldFrom})`;

  // IS NOT DISTINCT FROM joins the rows whose dimension is missing to their own (null) segment.
  return q.finish(`WITH tc_segments AS (
  SELECT ${col} AS tc_value, ${rankExpr} AS tc_size${small ? ', COUNT(*) AS tc_rows' : ''}
  FROM ${table}
  WHERE ${innerWhere}
  GROUP BY 1
), tc_ranked AS (
  SELECT tc_value,
    ROW_NUMBER() OVER (ORDER BY tc_size DESC NULLS LAST, CAST(tc_value AS VARCHAR) NULLS LAST) AS tc_rank,
    COUNT(*) OVER () AS tc_count,
    ${d.toDouble('SUM(tc_size) OVER ()')} AS tc_total,
    ${d.toDouble(sumSquares)} AS tc_sum_squares,
    ${d.toDouble(minSize)} AS tc_min${small ? `,
    (${small}) AS tc_small` : ''}
  FROM tc_segments
), f AS (
  SELECT tc_value, tc_rank, tc_count, tc_total, tc_sum_squares, tc_min,${small ? ' tc_small,' : ''} ${other} AS tc_other
  FROM tc_ranked
)
SELECT ${select.join(',\n  ')}
FROM ${table}
JOIN f ON ${col} IS NOT DISTINCT FROM f.tc_value
WHERE ${outerWhere}
GROUP BY ${group.join(', ')}
${order}`);
}
