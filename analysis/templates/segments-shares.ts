// Template "segment_shares": each segment's share of a metric over the window, Pareto
// cumulative shares, how many segments make up 80%, the top-N share and the HHI. Shares only
// exist for sums and counts; any other metric gets its per-segment values and no shares.
import { addsAcrossSegments, metricByName, rankDescending } from '../catalog.js';
import { type CompileContext, measureSql, tableRef, whereClause } from '../compile-context.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { SegmentDays, SegmentRanking, SegmentShareRow, SegmentSharesFinding } from '../findings/segments.js';
import { addDays } from '../periods.js';
import { concentration, hhiBand } from '../stats/index.js';
import type { Caveat, CompiledQuery, ResultTable, SubQuestion } from '../types.js';
import { compileFoldedSegments, foldedAs, namedSegmentCount, perDayAsked, RANK_FLOOR, segmentDimension } from './segments-fold-sql.js';
import { foldedCaveats, readSegmentTotals, type FoldedRow } from './segments-read.js';
import { compileFocus, compileFocusSeries, readFocus } from './segments-focus.js';
import { minGroupSize } from './small-groups.js';
import type { ReadContext, Reading, Template } from './template.js';
import { coveredWindow, EMPTY_TABLE, numberOrNull } from './trend-points.js';

/** The Pareto reference share ("80/20", common practice). */
export const SHARE_THRESHOLD = 0.8;
/** How many of the largest segments the top-N share counts. */
export const SHARE_TOP_N = 3;

export const segmentSharesTemplate: Template = {
  compile: (sq, ctx) => {
    segmentDimension(sq, ctx);
    const totals = { name: 'segment_totals', ...compileFoldedSegments(sq, ctx, { topN: namedSegmentCount(sq), grain: null, totals: true, perRow: perRowAsked(sq, ctx.dataset), perDay: perDayAsked(sq, ctx.dataset) }) };
    if (!sharesAsked(sq, ctx.dataset)) return [totals];
    // "What share of flights does ATL have": the named segment's share, rank and course beside the Pareto.
    const focus = sq.focus ? [{ name: 'segment_focus', ...compileFocus(sq, ctx) }, { name: 'segment_focus_series', ...compileFocusSeries(sq, ctx) }] : [];
    return [totals, { name: 'segment_reach', ...compileReach(sq, ctx) }, ...focus];
  },
  read: (sq, tables, ctx) => {
    const reading = readSegmentShares(sq, tables.segment_totals ?? EMPTY_TABLE, ctx, tables.segment_reach);
    const focus = sq.focus ? readFocus(sq, tables.segment_focus, tables.segment_focus_series, ctx) : null;
    if (!focus) return reading;
    // The answer is the one segment's share over every segment: no fold of the breakdown's tail is shown.
    return { findings: reading.findings.map((f) => (f.type === 'segment_shares' && f.additive ? { ...f, focus } : f)), caveats: reading.caveats.filter((c) => c.code !== 'segments_folded') };
  },
};

/** Whether the sub-question's segments have shares of a total (a sum or a count, largest first, not per row or per day). */
function sharesAsked(sq: SubQuestion, ds: ReadContext['dataset']): boolean {
  const metric = metricByName(ds, sq.metrics[0]!);
  return addsAcrossSegments(metric) && !perRowAsked(sq, ds) && !perDayAsked(sq, ds) && (!sq.rankOrder || rankDescending(metric, sq.rankOrder));
}

/**
 * The Pareto count over every segment, folded or not: the fewest segments, largest first, whose
 * running sum reaches SHARE_THRESHOLD of the total (reach_count), the share they hold
 * (reach_share), and how many segments there are. Ties do not change it: equal sizes give equal
 * running sums whichever comes first. A missing size counts as zero, as on reading.
 */
export function compileReach(sq: SubQuestion, ctx: CompileContext): CompiledQuery {
  const q = new QueryBuilder(ctx.dialect);
  const d = ctx.dialect;
  const dim = segmentDimension(sq, ctx);
  const metric = metricByName(ctx.dataset, sq.metrics[0]!);
  // The same tolerance as the stats module: a running share that should be exactly 80% may fall short by rounding.
  const threshold = d.toDouble(q.bind(SHARE_THRESHOLD - 1e-12));
  return q.finish(`WITH tc_reach_sizes AS (
  SELECT ${q.ident(dim.column)} AS tc_value, COALESCE(${measureSql(q, ctx, metric)}, 0) AS tc_size
  FROM ${tableRef(q, ctx)}
  WHERE ${whereClause(q, ctx, sq.window, sq.filters)}
  GROUP BY 1
), tc_reach_run AS (
  SELECT tc_size,
    ROW_NUMBER() OVER (ORDER BY tc_size DESC) AS tc_rank,
    SUM(tc_size) OVER (ORDER BY tc_size DESC ROWS BETWEEN UNBOUNDED PRECEDING AND CURRENT ROW) AS tc_run,
    SUM(tc_size) OVER () AS tc_total
  FROM tc_reach_sizes
)
SELECT ${d.toDouble(`MIN(CASE WHEN tc_run >= ${threshold} * tc_total THEN tc_rank END)`)} AS reach_count,
  ${d.toDouble(`MIN(CASE WHEN tc_run >= ${threshold} * tc_total THEN tc_run END)`)} / NULLIF(${d.toDouble('MAX(tc_total)')}, 0) AS reach_share,
  ${d.toDouble('COUNT(*)')} AS reach_segments,
  ${d.toDouble('MIN(tc_size)')} AS reach_min
FROM tc_reach_run`);
}

export function readSegmentShares(sq: SubQuestion, table: ResultTable, ctx: ReadContext, reach?: ResultTable): Reading {
  const metricName = sq.metrics[0]!;
  const metric = metricByName(ctx.dataset, metricName);
  const dimension = sq.dimension ?? '';
  const caveats: Caveat[] = [];
  if (table.truncated) caveats.push({ code: 'truncated', data: { rows: table.rows.length } });
  const rows = readSegmentTotals(table);
  if (rows.length === 0 || coveredWindow(sq.window, ctx.coverage) === null) {
    return { findings: [], caveats: [...caveats, { code: 'no_data', data: { start: sq.window.start, end: sq.window.end } }] };
  }
  if (rows.every((r) => r.value === null)) caveats.push({ code: 'all_null', data: { metric: metricName } });
  // A ranking's caption states its row floor and how many fell short: no note repeats it.
  caveats.push(...foldedCaveats(rows, dimension, minGroupSize(ctx.dataset), foldedAs(metric, sq.rankOrder)).filter((c) => !(sq.rankOrder && c.code === 'segments_folded' && 'minRows' in c.data)));
  const perRow = perRowAsked(sq, ctx.dataset);
  // Per day: each segment's total over its own days; shares of those apply only while every segment had the same days.
  const perDay = perDayAsked(sq, ctx.dataset) && !perRow;
  const changed = perDay ? (numberOrNull(table.rows[0]?.changed_segments) ?? 0) : 0;
  // Means per row have no shares.
  const additive = addsAcrossSegments(metric) && !perRow && changed === 0;
  const first = table.rows[0]!;
  const base: SegmentSharesFinding = {
    type: 'segment_shares',
    metric: metricName,
    dimension,
    additive,
    total: null,
    segmentCount: numberOrNull(first.seg_count) ?? rows.length,
    folded: rows.find((r) => r.other)?.members ?? 0,
    rows: rows.map((r) => ({ ...keyOf(r), value: r.value, share: null, cumulativeShare: null, ...(perRow ? { perRowN: numberOrNull(r.row.per_row_n) ?? 0, perRowMedian: numberOrNull(r.row.per_row_median) } : {}) })),
    ...(perRow ? { perRow: sq.perRow! } : {}),
    ...(perDay ? { perDay: { changed } } : {}),
    threshold: SHARE_THRESHOLD,
    countToThreshold: null,
    // "top 10 airports": the share the request asked about, else the common top-three share.
    topN: sq.rankLimit ? namedSegmentCount(sq) : SHARE_TOP_N,
    topNAsked: sq.rankLimit ?? null,
    topNShare: null,
    hhi: null,
    hhiBand: null,
    ...(sq.rankOrder ? { ranking: rankingOf(sq, metric, rows) } : {}),
  };
  if (!additive || rows.every((r) => r.value === null)) return { findings: [base], caveats };
  // "lowest 5 by bookings": a Pareto reads largest first, so an ascending ranking keeps its values only.
  if (base.ranking && !base.ranking.descending) return { findings: [base], caveats };

  // A sum over no values is null in SQL; as a part of a total it is zero.
  const values = rows.map((r) => r.value ?? 0);
  const negatives = values.filter((v) => v < 0).length;
  const total = values.reduce((a, b) => a + b, 0);
  if (negatives > 0) {
    caveats.push({ code: 'negative_amounts', data: { column: metricName, count: negatives, segments: true } });
    return { findings: [{ ...base, total }], caveats };
  }
  if (!(total > 0)) {
    caveats.push({ code: 'base_zero', data: { metric: metricName } });
    return { findings: [{ ...base, total }], caveats };
  }
  return { findings: [base.folded > 0 ? foldedShares(base, rows, values, first, reach) : exactShares(base, rows, values)], caveats };
}

/** The direction the request ranked in, and the row floor the query applied to an average or a rate. */
function rankingOf(sq: SubQuestion, metric: ReturnType<typeof metricByName>, rows: readonly FoldedRow[]): SegmentRanking {
  const fold = rows.find((r) => r.other);
  const minRows = rows.map((r) => numberOrNull(r.row.rank_min_rows)).find((x) => x !== null) ?? null;
  return { order: sq.rankOrder!, descending: rankDescending(metric, sq.rankOrder!), minRows, thin: fold ? (numberOrNull(fold.row.thin_members) ?? 0) : 0, floorRule: { ...RANK_FLOOR } };
}

function keyOf(r: FoldedRow) {
  // A per-day query returns each row's days.
  return { segment: r.segment, other: r.other, members: r.members, rank: r.rank, ...(r.row.days !== undefined ? { days: perDayOfRow(r) } : {}) };
}

/** The days a per-day figure is over, and whether the segment opened or closed inside the period (then its first or last day). */
export function perDayOfRow(r: FoldedRow): SegmentDays {
  const day = (v: unknown) => (v === null || v === undefined ? null : String(v).slice(0, 10));
  const to = day(r.row.to_day);
  return {
    days: numberOrNull(r.row.days) ?? 0,
    total: numberOrNull(r.row.period_total),
    opened: !r.other && r.row.opened === true,
    closed: !r.other && r.row.closed === true,
    from: day(r.row.from_day),
    // to_day is the day after the last one counted.
    last: to === null ? null : addDays(to, -1),
  };
}

/** Every segment is in hand: the stats module computes everything. */
function exactShares(base: SegmentSharesFinding, rows: readonly FoldedRow[], values: readonly number[]): SegmentSharesFinding {
  const c = concentration(rows.map((r, i) => ({ key: r.id, value: values[i]! })), { threshold: SHARE_THRESHOLD, topN: base.topN });
  if (c.kind !== 'ok') return base;
  const byId = new Map(rows.map((r) => [r.id, r]));
  const shareRows: SegmentShareRow[] = c.pareto.map((p) => ({ ...keyOf(byId.get(p.key)!), rank: p.rank, value: p.value, share: p.share, cumulativeShare: p.cumulativeShare }));
  const reachShare = c.pareto[c.countToThreshold - 1]?.cumulativeShare ?? null;
  return { ...base, total: c.total, rows: shareRows, countToThreshold: c.countToThreshold, reachShare, topNShare: c.topNShare, hhi: c.hhi, hhiBand: c.band };
}

/**
 * The tail is folded: named segments in rank order, then the fold. The count to the threshold is
 * the database's, over every segment (segment_reach); the HHI comes from the database's sum of squared
 * segment values over every segment, since the fold's square is not the sum of its members' squares.
 */
function foldedShares(base: SegmentSharesFinding, rows: readonly FoldedRow[], values: readonly number[], first: ResultTable['rows'][number], reachTable?: ResultTable): SegmentSharesFinding {
  const total = values.reduce((a, b) => a + b, 0);
  let running = 0;
  const shareRows: SegmentShareRow[] = rows.map((r, i) => {
    running += values[i]!;
    return { ...keyOf(r), value: values[i]!, share: values[i]! / total, cumulativeShare: running / total };
  });
  const named = shareRows.filter((r) => !r.other);
  const reach = named.find((r) => r.cumulativeShare! >= SHARE_THRESHOLD - 1e-12);
  const topN = named.slice(0, base.topN);
  const grandTotal = numberOrNull(first.grand_total);
  const sumSquares = numberOrNull(first.sum_squares);
  const minSegment = numberOrNull(first.min_segment_value);
  const hhi = grandTotal !== null && grandTotal > 0 && sumSquares !== null && (minSegment ?? 0) >= 0 ? (10_000 * sumSquares) / (grandTotal * grandTotal) : null;
  // Past the named segments, the count comes from the database's running sum over every segment.
  const sql = reachTable?.rows[0];
  const sqlCount = sql && (numberOrNull(sql.reach_min) ?? -1) >= 0 ? numberOrNull(sql.reach_count) : null;
  // (The database's count wins: a segment folded for its size is not among the named ones.)
  const count = sqlCount ?? (reach ? named.indexOf(reach) + 1 : null);
  return {
    ...base,
    total,
    rows: shareRows,
    countToThreshold: count,
    reachShare: sqlCount !== null ? numberOrNull(sql!.reach_share) : reach ? reach.cumulativeShare : null,
    topNShare: topN.length === base.topN ? topN[topN.length - 1]!.cumulativeShare : null,
    hhi,
    hhiBand: hhi === null ? null : hhiBand(hhi),
  };
}

/** Whether the request asked a summed metric per row ("gross per film"): its mean and median per row are compared, not its total. */
export function perRowAsked(sq: SubQuestion, ds: ReadContext['dataset']): boolean {
  return !!sq.perRow && metricByName(ds, sq.metrics[0]!).definition.type === 'sum';
}
