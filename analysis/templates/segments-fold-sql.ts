// The shared segment SQL: a metric by one dimension, with every segment past the top N folded
// into one "All others" row inside the database, so a dimension with thousands of values
// still sends only N + 1 rows (per period) to Node.
import type { DatasetConfig, Metric } from '../../config/schema.js';
import { CatalogError, groupableDimension, isAdditive, metricByName, rankDescending } from '../catalog.js';
import { type CompileContext, localDateExpr, measureSql, type PeriodScope, periodScope, rowCountSql, tableRef, whereClause } from '../compile-context.js';
import { addDays } from '../periods.js';
import { lifeColumnsSql, presenceToleranceDays, silentBeyondChanceSql } from '../presence.js';
import { coveredWindow } from './trend-points.js';
import { filterCondition } from '../sql/metric-sql.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { CompiledQuery, Grain, SubQuestion } from '../types.js';
import { complementaryFoldCtes, minGroupSize } from './small-groups.js';

/** Segments named before the rest are folded (bars and Pareto charts stay readable at this size). */
export const SEGMENT_TOP_N = 8;
/** The most segments a request can have named ("top 50 routes"): past this a bar chart is unreadable. */
export const MAX_NAMED_SEGMENTS = 20;

/** How many segments to name before the fold: as many as the request asked for ("top 10"), else SEGMENT_TOP_N. */
export function namedSegmentCount(sq: Pick<SubQuestion, 'rankLimit'>): number {
  return sq.rankLimit ? Math.min(Math.max(1, Math.floor(sq.rankLimit)), MAX_NAMED_SEGMENTS) : SEGMENT_TOP_N;
}

/**
 * A ranking of an average or a rate by its value names only segments with enough rows: at least
 * this share of the window's rows, kept between the two bounds (common practice: a value over a
 * few dozen rows swings too far to rank; the floor is said in the caption, as rank_min_rows), and
 * never more than `ofLargest` of the largest segment's rows: where every segment is a dozen
 * monthly readings, each is as firm as the others and all are ranked.
 */
export const RANK_FLOOR = { share: 0.01, least: 30, most: 100, ofLargest: 0.5 } as const;

/**
 * RANK_FLOOR as SQL over one row per segment: `rows` is the column with each segment's rows, read
 * with window functions over all the segments (so the SELECT it sits in must not be grouped).
 */
export function rankFloorSql(q: QueryBuilder, rows: string): string {
  const share = `CEIL(${q.bind(RANK_FLOOR.share)} * SUM(${rows}) OVER ())`;
  // The fraction is read as a double: PostgreSQL would take a bare parameter beside MAX(bigint) for a bigint.
  return q.dialect.toDouble(`LEAST(CEIL(${q.dialect.toDouble(q.bind(RANK_FLOOR.ofLargest))} * MAX(${rows}) OVER ()), GREATEST(${q.bind(RANK_FLOOR.least)}, LEAST(${q.bind(RANK_FLOOR.most)}, ${share})))`);
}

export interface FoldedQueryOptions {
  topN: number;
  /** Group by the period at this grain as well; null for one row per segment over the window. */
  grain: Grain | null;
  /** Also count the distinct months each row has data in (for "complete year" checks). */
  monthsWithRows?: boolean;
  /** Also return the window's total and sum of squared segment values, before folding (for shares and HHI). */
  totals?: boolean;
  /** A summed metric asked per row ("gross per film", sq.perRow): each segment's mean per row with a value, their count and median, instead of its total. */
  perRow?: boolean;
  /**
   * "Which shops have the most orders per day" (sq.perDay, a total that adds up over days, no
   * grain): each segment is ranked by its total over its own days, and `value` is that figure.
   * See `perDaySegmentsSql` for which days.
   */
  perDay?: boolean;
}

/** Whether a segment sub-question states its metric per day: asked per day, and a total that adds up over days. */
export function perDayAsked(sq: Pick<SubQuestion, 'perDay' | 'metrics'>, ds: DatasetConfig): boolean {
  return sq.perDay === true && isAdditive(metricByName(ds, sq.metrics[0]!));
}

/**
 * What the segments folded past those named are, against them, under the one ranking rule:
 * 'smaller' for a sum or a count ranked largest first, 'lower' or 'higher' values otherwise
 * (an average ranked highest first; anything ranked lowest first). Captions say it.
 */
export type FoldedAs = 'smaller' | 'lower' | 'higher';
export function foldedAs(metric: Metric, rankOrder: SubQuestion['rankOrder']): FoldedAs {
  const descending = !rankOrder || rankDescending(metric, rankOrder);
  if (!descending) return 'higher';
  return isAdditive(metric) ? 'smaller' : 'lower';
}

/** The dimension a segment sub-question breaks down by; personal data is refused here. */
export function segmentDimension(sq: SubQuestion, ctx: CompileContext) {
  if (!sq.dimension) throw new CatalogError('unknown_dimension', '', `the ${sq.template} template needs a dimension to break down by`);
  return groupableDimension(ctx.dataset, sq.dimension);
}

/**
 * Segments are ranked by the metric's own value, one rule for every metric: the largest first
 * ("top 5", a plain breakdown), or in the direction asked ("worst 10", sq.rankOrder, with the
 * metric's direction for best/worst). Rows count only as a floor for an average or a rate: a
 * segment with fewer rows than RANK_FLOOR (never more than half the largest segment's rows, so a
 * table of one reading per segment and period ranks every segment) ranks after the rest and is
 * folded (rank_min_rows says the floor, thin_members how many the fold holds for it). Ties rank
 * by value, then by the segment's text, so the fold never depends on scan order. Columns:
 * [period,] segment (text; null for missing values and for the fold), other, seg_rank, members,
 * value, row_count [, months_with_rows] [, seg_count, grand_total, sum_squares].
 *
 * With a minimum group size, a segment with fewer rows in the window is folded too, whatever its
 * rank (`small_members` counts those in the fold), and so is the smallest named segment when the
 * fold would still hold fewer rows than the minimum (`complement_members`). Its value then never
 * leaves the database on its own: sum_squares counts the whole fold as one, and
 * min_segment_value is only a sign.
 */
export function compileFoldedSegments(sq: SubQuestion, ctx: CompileContext, opts: FoldedQueryOptions): CompiledQuery {
  const q = new QueryBuilder(ctx.dialect);
  const d = ctx.dialect;
  const dim = segmentDimension(sq, ctx);
  const metric = metricByName(ctx.dataset, sq.metrics[0]!);
  const col = q.ident(dim.column);
  const table = tableRef(q, ctx);
  const rankExpr = measureSql(q, ctx, metric);
  const descending = !sq.rankOrder || rankDescending(metric, sq.rankOrder);
  const floored = !isAdditive(metric);
  const innerWhere = whereClause(q, ctx, sq.window, sq.filters);
  const topN = q.bind(opts.topN);
  const foldFrom = q.bind(opts.topN + 1);
  const min = minGroupSize(ctx.dataset);
  const minP = min === null ? null : q.bind(min);

  // The segments are those with matching rows in the window; each one's periods are read with the
  // filters inside the aggregates, so a period where it has rows but none that match is a 0.
  const outerScope = periodScope(q, ctx, sq.window, sq.filters);
  const perRow = opts.perRow && !opts.grain ? perRowValue(q, sq, metric, outerScope) : null;
  const perDay = opts.perDay && !opts.grain && !perRow && isAdditive(metric) ? perDaySegmentsSql(q, ctx, sq, { col, table, rankExpr, where: innerWhere }) : null;
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
    `${perRow ? d.toDouble(`AVG(${perRow})`) : perDay ? `${d.toDouble(outerScope.measure(metric))} / NULLIF(MAX(pd.tc_pd_days), 0)` : outerScope.measure(metric)} AS ${q.ident('value')}`,
    `${d.toDouble(outerScope.rowCount())} AS row_count`,
  );
  // Per day: the days each figure is over, whether the segment opened or closed inside the period, and the days' edges.
  if (perDay) {
    select.push(
      `${d.toDouble('MAX(pd.tc_pd_days)')} AS days`,
      `${d.toDouble(outerScope.measure(metric))} AS period_total`,
      // The fold's members each have their own days: no one flag stands for them.
      'CASE WHEN f.tc_other THEN NULL ELSE BOOL_OR(pd.tc_pd_opened) END AS opened',
      'CASE WHEN f.tc_other THEN NULL ELSE BOOL_OR(pd.tc_pd_closed) END AS closed',
      'MIN(pd.tc_pd_from) AS from_day',
      'MAX(pd.tc_pd_to) AS to_day',
      `${d.toDouble('MIN(tc_changed.tc_n)')} AS changed_segments`,
    );
  }
  // "Gross per film": the mean over the rows with a value (the value column), their count and the median beside it.
  if (perRow) select.push(`${d.toDouble(`COUNT(${perRow})`)} AS per_row_n`, `${d.toDouble(`percentile_cont(0.5) WITHIN GROUP (ORDER BY ${perRow})`)} AS per_row_median`);
  if (floored) select.push(`${d.toDouble('MIN(f.tc_floor)')} AS rank_min_rows`, `${d.toDouble('COUNT(DISTINCT CASE WHEN f.tc_thin THEN f.tc_rank END)')} AS thin_members`);
  if (minP) {
    select.push(
      `${d.toDouble('COUNT(DISTINCT CASE WHEN f.tc_small THEN f.tc_rank END)')} AS small_members`,
      `${d.toDouble('COUNT(DISTINCT CASE WHEN f.tc_complement THEN f.tc_rank END)')} AS complement_members`,
    );
  }
  if (opts.monthsWithRows) select.push(`${d.toDouble(`COUNT(DISTINCT ${outerScope.onMatching(d.periodStart('month', localDateExpr(q, ctx)))})`)} AS months_with_rows`);
  if (opts.totals) {
    select.push(`${d.toDouble('MIN(f.tc_count)')} AS seg_count`, `MIN(f.tc_total) AS grand_total`, `MIN(f.tc_sum_squares) AS sum_squares`, `MIN(f.tc_min) AS min_segment_value`);
  }
  const order = opts.grain ? 'ORDER BY other, seg_rank, period' : 'ORDER BY other, seg_rank';

  const outer = `SELECT ${select.join(',\n  ')}
FROM ${table}
JOIN f ON ${col} IS NOT DISTINCT FROM f.tc_value${perDay ? `
JOIN tc_perday pd ON f.tc_value IS NOT DISTINCT FROM pd.tc_pd_value
CROSS JOIN tc_changed` : ''}
WHERE ${outerScope.where}
GROUP BY ${group.join(', ')}
${order}`;
  // tc_thin: too few rows to be ranked by an average's value; such a segment ranks after the rest and is folded.
  const floor = floored ? rankFloorSql(q, 'tc_rows') : d.toDouble('NULL');
  const counted = perDay
    ? `${perDay},
tc_counted AS (
  SELECT tc_pd_value AS tc_value, ${d.toDouble('tc_pd_total')} / NULLIF(tc_pd_days, 0) AS tc_size, tc_pd_rows AS tc_rows
  FROM tc_perday
)`
    : `tc_counted AS (
  SELECT ${col} AS tc_value, ${rankExpr} AS tc_size, ${rowCountSql(q, ctx)} AS tc_rows
  FROM ${table}
  WHERE ${innerWhere}
  GROUP BY 1
)`;
  const segments = `${counted}, tc_floored AS (
  SELECT tc_value, tc_size, tc_rows, ${floor} AS tc_floor
  FROM tc_counted
), tc_segments AS (
  SELECT tc_value, tc_size, tc_rows, tc_floor, COALESCE(tc_rows < tc_floor, FALSE) AS tc_thin
  FROM tc_floored
)`;
  const rank = `ROW_NUMBER() OVER (ORDER BY tc_thin, tc_size ${descending ? 'DESC' : 'ASC'} NULLS LAST, CAST(tc_value AS VARCHAR) NULLS LAST)`;
  const rankedOut = `((tc_rank > ${topN} AND tc_count > ${foldFrom}) OR tc_thin)`;
  if (minP) return q.finish(`WITH ${segments}, ${suppressedFold(d, { rank, rankedOut, minimum: minP })}
${outer}`);

  // IS NOT DISTINCT FROM joins the rows whose dimension is missing to their own (null) segment.
  return q.finish(`WITH ${segments}, tc_ranked AS (
  SELECT tc_value, tc_thin, tc_floor,
    ${rank} AS tc_rank,
    COUNT(*) OVER () AS tc_count,
    ${d.toDouble('SUM(tc_size) OVER ()')} AS tc_total,
    ${d.toDouble('SUM(tc_size * tc_size) OVER ()')} AS tc_sum_squares,
    ${d.toDouble('MIN(tc_size) OVER ()')} AS tc_min
  FROM tc_segments
), f AS (
  SELECT tc_value, tc_rank, tc_count, tc_total, tc_sum_squares, tc_min, tc_thin, tc_floor, ${rankedOut} AS tc_other
  FROM tc_ranked
)
${outer}`);
}

/**
 * The fold with a minimum group size. A segment with fewer rows in the window is folded whatever
 * its rank (primary suppression), and when the fold is still below the minimum the smallest named
 * segment joins it (complementary suppression, see small-groups.ts). Once anything is folded for
 * its size, nothing computed from the fold's members alone may leave the database: the HHI's sum
 * of squares counts the whole fold as one segment (its members' squares with the fold's value
 * would give them away), and the smallest segment value is only a sign.
 */
function suppressedFold(d: CompileContext['dialect'], o: { rank: string; rankedOut: string; minimum: string }): string {
  const hidden = 'tc_hidden';
  return `tc_ranked AS (
  SELECT tc_value, tc_size, tc_rows, tc_thin, tc_floor,
    ${o.rank} AS tc_rank,
    COUNT(*) OVER () AS tc_count,
    (tc_rows < ${o.minimum}) AS tc_small
  FROM tc_segments
), tc_first AS (
  SELECT tc_value, 0 AS tc_period, tc_rows, (${o.rankedOut} OR tc_small) AS tc_folded
  FROM tc_ranked
), ${complementaryFoldCtes({ name: 'tc_extra', cells: 'tc_first', segments: 'tc_first', key: 'tc_value', period: 'tc_period', rows: 'tc_rows', folded: 'tc_folded', minimum: o.minimum })},
tc_marked AS (
  SELECT r.tc_value, r.tc_size, r.tc_rank, r.tc_count, r.tc_small, r.tc_thin, r.tc_floor,
    COALESCE(x.tc_sdc_fold, FALSE) AS tc_complement,
    (${o.rankedOut.replaceAll('tc_', 'r.tc_')} OR r.tc_small OR COALESCE(x.tc_sdc_fold, FALSE)) AS tc_other,
    MAX(CASE WHEN r.tc_small THEN 1 ELSE 0 END) OVER () AS tc_any_small
  FROM tc_ranked r
  LEFT JOIN tc_extra x ON r.tc_value IS NOT DISTINCT FROM x.tc_sdc_key
), f AS (
  SELECT tc_value, tc_rank, tc_count, tc_small, tc_complement, tc_other, tc_thin, tc_floor,
    ${d.toDouble('SUM(tc_size) OVER ()')} AS tc_total,
    ${d.toDouble(`SUM(CASE WHEN ${hidden} THEN 0 ELSE tc_size * tc_size END) OVER () + COALESCE(SUM(CASE WHEN ${hidden} THEN tc_size END) OVER (), 0) * COALESCE(SUM(CASE WHEN ${hidden} THEN tc_size END) OVER (), 0)`)} AS tc_sum_squares,
    ${d.toDouble('SIGN(MIN(tc_size) OVER ())')} AS tc_min
  FROM (SELECT tc_marked.*, (tc_other AND tc_any_small = 1) AS ${hidden} FROM tc_marked) tc_h
)`;
}

/**
 * Each segment's days for a figure per day (CTEs tc_life, tc_totals, tc_perday, tc_changed): the
 * calendar days of the period the data covers (the window cut to the data's first and last day),
 * so a day without a row counts as a zero day, as an analyst would count a shop's quiet Monday.
 * A segment that opened inside the period (silent from the period's start up to its first row
 * anywhere in the table, beyond chance for its own rhythm: the rule in analysis/presence.ts) is
 * counted from its first day, one that closed up to its last: "per day since it opened", flagged
 * (tc_opened, tc_closed) so the words say so. tc_changed counts such segments.
 */
function perDaySegmentsSql(q: QueryBuilder, ctx: CompileContext, sq: SubQuestion, n: { col: string; table: string; rankExpr: string; where: string }): string {
  const d = q.dialect;
  const covered = (ctx.coverage ? coveredWindow(sq.window, ctx.coverage) : null) ?? sq.window;
  const day = localDateExpr(q, ctx);
  const start = d.dateParam(q.bind(covered.start));
  const end = d.dateParam(q.bind(covered.end));
  const lastDay = d.dateParam(q.bind(addDays(covered.end, -1)));
  const tolerance = q.bind(presenceToleranceDays(covered));
  const life = { first: 'tc_life.tc_first_ever', last: 'tc_life.tc_last_ever', activeMonths: 'tc_life.tc_active_months' };
  const opened = `COALESCE(${silentBeyondChanceSql(life, start, 'start', tolerance)}, FALSE)`;
  const closed = `COALESCE(${silentBeyondChanceSql(life, lastDay, 'end', tolerance)}, FALSE)`;
  // The segment's whole life, over every date the table holds (no filter: a shop opened when it first sold anything).
  q.readsEveryDate();
  return `tc_life AS (
  SELECT ${n.col} AS tc_life_value, ${lifeColumnsSql(day, { first: 'tc_first_ever', last: 'tc_last_ever', activeMonths: 'tc_active_months' })}
  FROM ${n.table}
  GROUP BY 1
), tc_totals AS (
  SELECT ${n.col} AS tc_pd_value, ${n.rankExpr} AS tc_pd_total, ${rowCountSql(q, ctx)} AS tc_pd_rows
  FROM ${n.table}
  WHERE ${n.where}
  GROUP BY 1
), tc_lived AS (
  SELECT tc_totals.tc_pd_value, tc_totals.tc_pd_total, tc_totals.tc_pd_rows, ${opened} AS tc_pd_opened, ${closed} AS tc_pd_closed,
    CASE WHEN ${opened} THEN tc_life.tc_first_ever ELSE ${start} END AS tc_pd_from,
    CASE WHEN ${closed} THEN tc_life.tc_last_ever + 1 ELSE ${end} END AS tc_pd_to
  FROM tc_totals
  LEFT JOIN tc_life ON tc_totals.tc_pd_value IS NOT DISTINCT FROM tc_life.tc_life_value
), tc_perday AS (
  SELECT tc_pd_value, tc_pd_total, tc_pd_rows, tc_pd_opened, tc_pd_closed, tc_pd_from, tc_pd_to, (tc_pd_to - tc_pd_from) AS tc_pd_days
  FROM tc_lived
), tc_changed AS (
  SELECT COUNT(*) AS tc_n FROM tc_perday WHERE tc_pd_opened OR tc_pd_closed
)`;
}

/**
 * A summed metric's value per row, on the rows that pass the filters (and the metric's own
 * condition), NULL elsewhere: when the request asked it per row ("gross per film"); else null.
 */
export function perRowValue(q: QueryBuilder, sq: SubQuestion, metric: Metric, scope: PeriodScope): string | null {
  const def = metric.definition;
  if (!sq.perRow || def.type !== 'sum') return null;
  const own = def.where ? `CASE WHEN ${filterCondition(q, def.where)} THEN ${q.ident(def.column)} END` : q.ident(def.column);
  return scope.onMatching(own);
}
