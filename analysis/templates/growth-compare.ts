// Shared by growth_drivers and growth_share_shift: the metric by one dimension in the window
// asked for and in the same dates a year earlier, both cut to the dates the data covers so the
// two spans stay like for like (18 days of this June against 18 days of last June, not 30). Each
// segment is also marked as present through both spans or not (a site that opened or closed in
// between), and the segments present through both get a total of their own: like-for-like growth.
import type { DatasetConfig } from '../../config/schema.js';
import { groupableDimension, isAdditive, metricByName } from '../catalog.js';
import { type CompileContext, localDateExpr, measureSql, rowCountSql, tableRef, whereClause } from '../compile-context.js';
import type { Coverage } from '../coverage.js';
import { dataEnd, lastCoveredDay } from '../coverage.js';
import type { ChangedSegment, GrowthSpan } from '../findings/growth.js';
import { addDays, addMonths, daysBetween, periodStart } from '../periods.js';
import { lifeColumnsSql, presenceToleranceDays, silentBeyondChanceSql } from '../presence.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { Caveat, CompiledQuery, DateWindow, ResultTable, SubQuestion } from '../types.js';
import { perDayAsked } from './segments-fold-sql.js';
import { complementaryFoldCtes, minGroupSize } from './small-groups.js';
import { spanEnds } from './span-ends.js';
import { coveredWindow } from './trend-points.js';

const WINDOW = '__tc_window';
const DAY = '__tc_day';
const FIRST = '__tc_first';
const LAST = '__tc_last';
const SEG = '__tc_seg';
const FOLDED = '__tc_folded';
const KEY = '__tc_key';
const ROWS = '__tc_rows';
const SMALL = '__tc_small';
const SMALL_COUNT = '__tc_small_count';
const COMPLEMENT_COUNT = '__tc_complement_count';
const LIFE_KEY = '__tc_life_key';
const OPENED = '__tc_opened';
const CLOSED = '__tc_closed';
const LFL = '__tc_lfl';
const LIFE_FIRST = '__tc_life_first';
const LIFE_LAST = '__tc_life_last';

/**
 * The same dates one year earlier. A window edge on 29 February moves to 1 March: the window is
 * half-open, so [.., 29 Feb 2024) ends after 28 Feb and [.., 1 Mar 2023) does too.
 */
export function priorWindow(w: DateWindow): DateWindow {
  return { start: addMonths(w.start, -12), end: addMonths(w.end, -12) };
}

/** An inclusive day moved by whole years the way SQL `+ INTERVAL 'n' YEAR` does: 29 Feb becomes 28 Feb. */
export function shiftDayByYears(iso: string, years: number): string {
  const shifted = addMonths(iso, 12 * years);
  return shifted.slice(8, 10) === iso.slice(8, 10) ? shifted : addDays(shifted, -Number(shifted.slice(8, 10)));
}

/**
 * The window a growth comparison uses: never one that overlaps its own year-earlier base. A window
 * of a year or less is compared with the same dates a year earlier, as asked. A longer one (the
 * whole history, say) becomes the last complete calendar year against the one before when the
 * data holds both, else the last 12 complete months against the 12 before; the caption's spans
 * ("2024 against 2023") say which.
 */
export function comparisonWindow(w: DateWindow, coverage: Coverage | undefined): DateWindow {
  if (addMonths(w.start, 12) >= w.end) return w;
  const from = coverage?.firstDate ? maxIso(w.start, coverage.firstDate) : w.start;
  const to = coverage?.lastDate ? minIso(w.end, dataEnd({ ...coverage, lastDate: coverage.lastDate })) : w.end;
  const yearEnd = periodStart(to, 'year');
  if (addMonths(yearEnd, -24) >= from) return { start: addMonths(yearEnd, -12), end: yearEnd };
  const monthEnd = periodStart(to, 'month');
  if (addMonths(monthEnd, -24) >= from) return { start: addMonths(monthEnd, -12), end: monthEnd };
  return w;
}

/**
 * The two spans a growth comparison sets side by side. With a comparison period named in the
 * request, both are cut to the data (`asked`) and compared as `askedPrior` says: two whole periods
 * of one kind ("Q1 2001 against Q1 2000") whole, even when one is a day longer (the caption then
 * says so and gives per-day figures); a period still running against the same dates of the other. Otherwise
 * the non-overlapping window above against the same dates a year earlier, which the SQL and the
 * spans cut to the data by a year's shift.
 */
export function comparedSpans(asked: SubQuestion, coverage: Coverage | undefined): { current: DateWindow; prior: DateWindow; asked: boolean } {
  // "since 2001": the stretch's last whole period against its first, both cut to the data already.
  const ends = asked.spanEnds && !asked.compareWindow ? spanEnds(asked.window, asked.spanEnds, coverage) : null;
  if (ends) return { current: ends.last, prior: ends.first, asked: true };
  if (asked.compareWindow) {
    const current = (coverage && coveredWindow(asked.window, coverage)) || asked.window;
    const cw = (coverage && coveredWindow(asked.compareWindow, coverage)) || asked.compareWindow;
    // A before/after's two sides are set by the plan, equal in days either side of the date.
    return { current, prior: asked.beforeAfter ? cw : askedPrior(current, cw, asked.window), asked: true };
  }
  const current = comparisonWindow(asked.window, coverage);
  return { current, prior: priorWindow(current), asked: false };
}

/**
 * A named comparison period. A whole calendar year, quarter or month ("vs 2007") is compared whole,
 * whatever the other span, unless the span asked was a period of the same kind that the data cuts
 * short ("2002 against 2000", data ending in July 2002: the same dates of each): the brief card says "2007", so the SQL and the caption use all of 2007
 * (a level or a ratio is its mean over the span; a total over spans of unequal length is also
 * said per day, captions/growth-drivers-caption.ts perDaySentence). Named periods keep their own
 * lengths, so a leap year's first quarter keeps its 91 days. The like-for-like cut of a span still
 * running ("2025 so far against 2023": 1 January to 18 June of each) is the reader's
 * (bot/reading/read-request.ts compareOf), which the card then shows. Any other compare span is
 * taken like for like: from its start, over the same dates (or as many days) as the current
 * span, never past its end.
 */
export function askedPrior(current: DateWindow, compare: DateWindow, asked: DateWindow = current): DateWindow {
  const kind = wholePeriodKind(compare);
  if (kind !== null && kind === wholePeriodKind(current)) return compare;
  // "2002 against 2000" on data ending 25 July 2002: two periods of one kind, the later still
  // running, are compared over the same dates of each, as the reader cuts them (and says "so far").
  const sameKind = kind !== null && kind === wholePeriodKind(asked);
  if (kind !== null && kind !== 'week' && !sameKind) return compare;
  // Both starting on the same day of a month: the same dates ("1 January to 25 July" of each,
  // whatever the leap days between); otherwise as many days.
  const months = (Number(compare.start.slice(0, 4)) - Number(current.start.slice(0, 4))) * 12 + Number(compare.start.slice(5, 7)) - Number(current.start.slice(5, 7));
  const end = compare.start.slice(8) === current.start.slice(8) ? addMonths(current.end, months) : addDays(compare.start, spanDays(current));
  return { start: compare.start, end: end < compare.end ? end : compare.end };
}

export function compileWindowComparison(asked: SubQuestion, ctx: CompileContext): CompiledQuery {
  const spans = comparedSpans(asked, ctx.coverage);
  const sq = { ...asked, window: spans.current };
  if (sq.dimension === undefined) throw new Error(`sub-question ${sq.id} (${sq.template}) needs a dimension`);
  const dim = groupableDimension(ctx.dataset, sq.dimension);
  const q = new QueryBuilder(ctx.dialect);
  const d = ctx.dialect;
  const seg = q.ident(dim.column);
  const day = q.ident(DAY);
  const win = q.ident(WINDOW);
  const first = q.ident(FIRST);
  const last = q.ident(LAST);
  const prior = spans.prior;
  const table = tableRef(q, ctx);
  const measures = sq.metrics.map((name) => `  ${measureSql(q, ctx, metricByName(ctx.dataset, name))} AS ${q.ident(name)}`);
  const sides = sidesSql(q, ctx, sq, prior, { table, win, day, first, last }, spans.asked);
  const [opened, closed, lfl] = [OPENED, CLOSED, LFL].map(q.ident) as [string, string, string];
  const life = presenceSql(q, ctx, { seg, win, day, tolerance: q.bind(presenceToleranceDays(sq.window)), table });
  const min = minGroupSize(ctx.dataset);
  if (min !== null) {
    // A segment with fewer rows than the minimum on either side (where it has rows at all) joins
    // one folded row per side, combined here so its own values never leave the database; so does
    // the smallest named segment while a side's fold is still below the minimum (complementary
    // suppression: the fold is the total minus the named segments).
    const [segAlias, folded, key, rows, small, smallCount, complementCount] = [SEG, FOLDED, KEY, ROWS, SMALL, SMALL_COUNT, COMPLEMENT_COUNT].map(q.ident);
    const minP = q.bind(min);
    return q.finish(`${sides},
tc_cells AS (
  SELECT ${win} AS ${win}, ${seg} AS ${key}, ${rowCountSql(q, ctx)} AS ${rows}
  FROM tagged
  GROUP BY 1, 2
),
tc_primary AS (
  SELECT ${key}, (MIN(${rows}) < ${minP}) AS ${small}
  FROM tc_cells
  GROUP BY ${key}
),
${complementaryFoldCtes({ name: 'tc_extra', cells: 'tc_cells', segments: 'tc_primary', key: key!, period: win, rows: rows!, folded: small!, minimum: minP })},
tc_small AS (
  SELECT tc_primary.${key}, TRUE AS ${small}
  FROM tc_primary
  LEFT JOIN tc_extra ON tc_primary.${key} IS NOT DISTINCT FROM tc_extra.tc_sdc_key
  WHERE tc_primary.${small} OR tc_extra.tc_sdc_fold
),
${life.ctes},
marked AS (
  SELECT tagged.*,
    COALESCE(tc_small.${small}, FALSE) AS ${folded},
    CASE WHEN COALESCE(tc_small.${small}, FALSE) THEN NULL ELSE tagged.${seg} END AS ${segAlias},
    (SELECT COUNT(*) FROM tc_primary WHERE tc_primary.${small}) AS ${smallCount},
    (SELECT COUNT(*) FROM tc_extra) AS ${complementCount},
    ${life.opened} AS ${opened},
    ${life.closed} AS ${closed},
    ${life.columns},
    -- Segments too small to show stay in the like-for-like base, so it never gives their values away.
    (COALESCE(tc_small.${small}, FALSE) OR NOT (${life.opened} OR ${life.closed})) AS ${lfl}
  FROM tagged
  LEFT JOIN tc_small ON tagged.${seg} IS NOT DISTINCT FROM tc_small.${key}
  ${life.joins}
)
SELECT ${win} AS window_name,
  GROUPING(${segAlias}) AS g_segment,
  GROUPING(${lfl}) AS g_lfl,
  ${segAlias} AS segment,
  ${folded} AS folded,
  ${lfl} AS like_for_like,
  BOOL_OR(${opened}) AS opened,
  BOOL_OR(${closed}) AS closed,
${measures.join(',\n')},
  ${d.toDouble(rowCountSql(q, ctx))} AS row_count,
  MIN(${day}) AS first_day,
  MAX(${day}) AS last_day,
  MIN(${life.firstEver}) AS life_first,
  MAX(${life.lastEver}) AS life_last,
  ${d.toDouble(`COUNT(DISTINCT ${seg})`)} AS members,
  ${d.toDouble(`MAX(${smallCount})`)} AS small_segments,
  ${d.toDouble(`MAX(${complementCount})`)} AS complement_segments
FROM marked
GROUP BY GROUPING SETS ((${win}, ${folded}, ${segAlias}, ${lfl}), (${win}), (${win}, ${lfl}))
ORDER BY 1, 2, 3, 5, 4`);
  }
  return q.finish(`${sides},
${life.ctes},
lived AS (
  SELECT tagged.*, ${life.opened} AS ${opened}, ${life.closed} AS ${closed}, NOT (${life.opened} OR ${life.closed}) AS ${lfl}, ${life.columns}
  FROM tagged
  ${life.joins}
)
SELECT ${win} AS window_name,
  GROUPING(${seg}) AS g_segment,
  GROUPING(${lfl}) AS g_lfl,
  ${seg} AS segment,
  ${lfl} AS like_for_like,
  BOOL_OR(${opened}) AS opened,
  BOOL_OR(${closed}) AS closed,
${measures.join(',\n')},
  ${d.toDouble(rowCountSql(q, ctx))} AS row_count,
  MIN(${day}) AS first_day,
  MAX(${day}) AS last_day,
  MIN(${life.firstEver}) AS life_first,
  MAX(${life.lastEver}) AS life_last
FROM lived
GROUP BY GROUPING SETS ((${win}, ${seg}, ${lfl}), (${win}), (${win}, ${lfl}))
ORDER BY 1, 2, 3, 4`);
}

/**
 * Whether each segment was there through both spans, read from the whole table (every date, no
 * filter): it opened if it was silent from the earliest first day of any segment in the earlier
 * span up to its first record anywhere, it closed if silent from its last record anywhere to the
 * latest last day in the later span, each beyond chance for its own rhythm (the rule in
 * analysis/presence.ts). A segment merely without rows in one span (a sparse airport with no
 * strike that quarter, there since 1990; drizzle, missing from Seattle's last weeks) is there
 * throughout: it stays in like-for-like growth, with zero for a count or a sum. The span edges
 * come from the spans' own rows, so a span cut to the data's dates is judged on the days it has.
 */
function presenceSql(
  q: QueryBuilder,
  ctx: CompileContext,
  n: { seg: string; win: string; day: string; tolerance: string; table: string },
): { ctes: string; joins: string; opened: string; closed: string; columns: string; firstEver: string; lastEver: string } {
  const key = q.ident(LIFE_KEY);
  const [firstEver, lastEver] = [q.ident(LIFE_FIRST), q.ident(LIFE_LAST)];
  // The segment's whole life, over every date the table holds.
  q.readsEveryDate();
  const life = { first: 'tc_first_ever', last: 'tc_last_ever', activeMonths: 'tc_active_months' };
  const lived = { first: `tc_life.${life.first}`, last: `tc_life.${life.last}`, activeMonths: `tc_life.${life.activeMonths}` };
  const ctes = `tc_life AS (
  SELECT ${n.seg} AS ${key}, ${lifeColumnsSql(localDateExpr(q, ctx), life)}
  FROM ${n.table} AS t
  GROUP BY 1
),
tc_edges AS (
  SELECT MIN(CASE WHEN ${n.win} = 'prior' THEN ${n.day} END) AS tc_first_prior,
    MAX(CASE WHEN ${n.win} = 'current' THEN ${n.day} END) AS tc_last_current
  FROM tagged
)`;
  return {
    ctes,
    joins: `LEFT JOIN tc_life ON tagged.${n.seg} IS NOT DISTINCT FROM tc_life.${key}
  CROSS JOIN tc_edges`,
    opened: `COALESCE(${silentBeyondChanceSql(lived, 'tc_edges.tc_first_prior', 'start', n.tolerance)}, FALSE)`,
    closed: `COALESCE(${silentBeyondChanceSql(lived, 'tc_edges.tc_last_current', 'end', n.tolerance)}, FALSE)`,
    columns: `tc_life.tc_first_ever AS ${firstEver}, tc_life.tc_last_ever AS ${lastEver}`,
    firstEver,
    lastEver,
  };
}

/**
 * Both windows' rows, tagged with their window (a CTE `tagged`): the current window from a year
 * after the data's first day, the prior one up to a year before its last, so the two stay like
 * for like. With the coverage known those edges are bound values and each side is one date range
 * on the time column; otherwise the whole table's first and last day are read (`reach`, as in the
 * coverage check), never the filtered rows', so a segment filter never shortens the span compared.
 */
export function sidesSql(
  q: QueryBuilder,
  ctx: CompileContext,
  sq: SubQuestion,
  prior: DateWindow,
  n: { table: string; win: string; day: string; first: string; last: string },
  asked = false,
): string {
  const coverage = ctx.coverage;
  // Spans the request named are already cut to the data (comparedSpans); a year-earlier base is cut by a year's shift.
  if ((coverage?.firstDate && coverage.lastDate) || asked) {
    const current = asked || !coverage?.firstDate ? sq.window : { start: maxIso(sq.window.start, shiftDayByYears(coverage.firstDate, 1)), end: sq.window.end };
    // A stamp stands for its whole period: a yearly stamp of 1 January 2017 covers 2017, so the year before runs to 31 December 2016.
    const before = asked || !coverage?.lastDate ? prior : { start: prior.start, end: minIso(prior.end, addDays(shiftDayByYears(lastCoveredDay({ ...coverage, lastDate: coverage.lastDate }), -1), 1)) };
    const side = (name: 'current' | 'prior', w: DateWindow) => `SELECT t.*, '${name}' AS ${n.win}, ${localDateExpr(q, ctx)} AS ${n.day}
  FROM ${n.table} AS t
  WHERE ${whereClause(q, ctx, w, sq.filters)}`;
    return `WITH tagged AS (
  ${side('current', current)}
  UNION ALL
  ${side('prior', before)}
)`;
  }
  q.readsEveryDate();
  const side = (name: 'current' | 'prior', w: DateWindow, edge: string) =>
    `SELECT t.*, '${name}' AS ${n.win}, ${localDateExpr(q, ctx)} AS ${n.day}
  FROM ${n.table} AS t CROSS JOIN reach
  WHERE ${whereClause(q, ctx, w, sq.filters)}
    AND ${edge}`;
  const yearFrom = (e: string, sign: '+' | '-') => `CAST(${e} ${sign} INTERVAL '1' YEAR AS DATE)`;
  const reachSql = `SELECT MIN(${localDateExpr(q, ctx)}) AS ${n.first}, MAX(${localDateExpr(q, ctx)}) AS ${n.last} FROM ${n.table}`;
  const current = side('current', sq.window, `${localDateExpr(q, ctx)} >= ${yearFrom(`reach.${n.first}`, '+')}`);
  const before = side('prior', prior, `${localDateExpr(q, ctx)} <= ${yearFrom(`reach.${n.last}`, '-')}`);
  return `WITH reach AS (
  ${reachSql}
),
tagged AS (
  ${current}
  UNION ALL
  ${before}
)`;
}

export interface SideRow {
  rows: number;
  firstDay: string | null;
  lastDay: string | null;
  values: Record<string, number | null>;
}

export interface WindowSide {
  /** The grand total over the side's span (the empty grouping set). */
  total: SideRow | null;
  /** Keyed by the segment's value as text; null for rows where the dimension is missing. */
  segments: Map<string | null, SideRow>;
  /** Segments below the dataset's minimum group size, combined in the database; null when none. */
  folded: (SideRow & { members: number }) | null;
  /** The total over the segments present through both spans; null when there are none (or none was read). */
  likeForLike: SideRow | null;
}

export interface WindowComparison {
  current: WindowSide;
  prior: WindowSide;
  currentSpan: GrowthSpan;
  priorSpan: GrowthSpan;
  caveats: Caveat[];
  /** Neither span has any row. */
  empty: boolean;
  /** Segments below the minimum group size, folded on both sides (0 without a minimum). */
  smallSegments: number;
  /** Named segments folded with them so they cannot be worked out from the total (complementary suppression). */
  complementSegments: number;
  /** Segments not there through both spans, left out of the like-for-like totals; empty when every segment was. */
  changed: ChangedSegment[];
}

/**
 * The days of each compared span (cut to the data), when the request asked per day of a total that
 * adds up over days (perDayAsked: "flights per day", "daily average of orders"): the comparison is
 * then of daily averages, so a 31-day January meets a 30-day June, or a month the data covers in
 * part, on equal terms. Null otherwise, and for a span with no days.
 */
export function perDaySpanDays(sq: SubQuestion, dataset: DatasetConfig, metric: string, cmp: Pick<WindowComparison, 'currentSpan' | 'priorSpan'>): { before: number; after: number } | null {
  const before = daysBetween(cmp.priorSpan.start, cmp.priorSpan.end);
  const after = daysBetween(cmp.currentSpan.start, cmp.currentSpan.end);
  if (before <= 0 || after <= 0) return null;
  if (perDayAsked({ ...sq, metrics: [metric] }, dataset)) return { before, after };
  // Two named spans far apart in length ("2025 so far against 2023": 169 days against 365): totals
  // that add up over days differ by the days more than by anything asked, so every figure is per day.
  const additive = isAdditive(metricByName(dataset, metric));
  return additive && Math.abs(after - before) > UNEQUAL_SPANS * Math.max(after, before) ? { before, after } : null;
}

/**
 * How far two compared spans may differ in length before totals are compared per day: a tenth (our
 * own choice), past any two calendar months (31 against 28 days is 9.7%) or a leap day.
 */
export const UNEQUAL_SPANS = 0.1;

/**
 * Splits the comparison rows into the two sides, and works out the compared spans from the same
 * data bounds the SQL used: the current span starts no earlier than a year after the data's first
 * day, the prior span ends no later than a year before its last.
 */
export function readWindowComparison(asked: SubQuestion, table: ResultTable, coverage: Coverage): WindowComparison {
  const spans = comparedSpans(asked, coverage);
  const sq = { ...asked, window: spans.current };
  const caveats: Caveat[] = [];
  if (table.truncated) caveats.push({ code: 'truncated', data: { rows: table.rows.length } });
  const prior = spans.prior;
  const current: WindowSide = { total: null, segments: new Map(), folded: null, likeForLike: null };
  const before: WindowSide = { total: null, segments: new Map(), folded: null, likeForLike: null };
  let smallSegments = 0;
  let complementSegments = 0;
  const changed = new Map<string | null, ChangedSegment>();
  for (const r of table.rows) {
    if (typeof r.small_segments === 'number' && Number.isFinite(r.small_segments)) smallSegments = Math.max(smallSegments, r.small_segments);
    if (typeof r.complement_segments === 'number' && Number.isFinite(r.complement_segments)) complementSegments = Math.max(complementSegments, r.complement_segments);
    const sideOf = r.window_name === 'current' ? current : r.window_name === 'prior' ? before : null;
    if (!sideOf) continue;
    const values: Record<string, number | null> = {};
    for (const m of sq.metrics) values[m] = typeof r[m] === 'number' && Number.isFinite(r[m]) ? r[m] : null;
    const row: SideRow = { rows: Number(r.row_count ?? 0), firstDay: dayOf(r.first_day), lastDay: dayOf(r.last_day), values };
    if (Number(r.g_segment) === 1) {
      // The like-for-like grouping: the segments through both spans (true) or the others (false, not kept).
      if (r.g_lfl !== undefined && Number(r.g_lfl) === 0) {
        if (r.like_for_like === true) sideOf.likeForLike = row;
      } else sideOf.total = row;
    } else if (r.folded === true) sideOf.folded = { ...row, members: Number(r.members ?? 0) };
    else {
      const key = r.segment === null || r.segment === undefined ? null : String(r.segment);
      sideOf.segments.set(key, row);
      if (r.like_for_like === false) {
        const seen = changed.get(key);
        changed.set(key, {
          segment: key,
          opened: r.opened === true,
          closed: r.closed === true,
          // Its first and last record in the whole table, which is what opened and closed were judged on.
          firstDay: minDay(seen?.firstDay ?? null, dayOf(r.life_first) ?? row.firstDay),
          lastDay: maxDay(seen?.lastDay ?? null, dayOf(r.life_last) ?? row.lastDay),
        });
      }
    }
  }
  let currentSpan: GrowthSpan = { ...sq.window };
  let priorSpan: GrowthSpan = { ...prior };
  if (coverage.firstDate !== null && coverage.lastDate !== null && !spans.asked) {
    currentSpan = {
      start: maxIso(sq.window.start, shiftDayByYears(coverage.firstDate, 1)),
      end: minIso(sq.window.end, dataEnd({ ...coverage, lastDate: coverage.lastDate })),
    };
    priorSpan = {
      start: maxIso(prior.start, coverage.firstDate),
      end: minIso(prior.end, addDays(shiftDayByYears(lastCoveredDay({ ...coverage, lastDate: coverage.lastDate }), -1), 1)),
    };
    const cut = currentSpan.start !== sq.window.start || currentSpan.end !== sq.window.end;
    if (cut && currentSpan.start < currentSpan.end) {
      caveats.push({
        code: 'partial_period',
        data: { period: sq.window.start, grain: 'day', coveredFrom: currentSpan.start, coveredTo: addDays(currentSpan.end, -1), window: 'current' },
      });
    }
  }
  const currentRows = current.total?.rows ?? 0;
  const priorRows = before.total?.rows ?? 0;
  const empty = currentRows === 0 && priorRows === 0;
  // Dates a year before the data starts cut the current span away too; say it is the year earlier that is missing.
  const priorUncovered = coverage.firstDate !== null && prior.end <= coverage.firstDate && sq.window.end > coverage.firstDate;
  if (priorUncovered || (priorRows === 0 && currentRows > 0)) {
    caveats.push({ code: 'no_data', data: { start: prior.start, end: prior.end, window: 'prior', yearEarlier: addMonths(sq.window.start, -12) === prior.start } });
  } else if (empty) caveats.push({ code: 'no_data', data: { start: sq.window.start, end: sq.window.end } });
  else if (currentRows === 0) caveats.push({ code: 'no_data', data: { start: sq.window.start, end: sq.window.end, window: 'current' } });
  return { current, prior: before, currentSpan, priorSpan, caveats, empty, smallSegments, complementSegments, changed: [...changed.values()] };
}

function dayOf(v: unknown): string | null {
  return typeof v === 'string' ? v : null;
}

function minDay(a: string | null, b: string | null): string | null {
  return a === null ? b : b === null ? a : minIso(a, b);
}

function maxDay(a: string | null, b: string | null): string | null {
  return a === null ? b : b === null ? a : maxIso(a, b);
}

/**
 * Segments present in one span only because they opened after the earlier span (`late_segment`,
 * with their first record) or closed before the later one (`segment_gap`), as the whole table says.
 * A sparse segment merely without rows in one span is no news: it counts as zero there. Only said
 * when both spans have data at all.
 */
export function segmentPresenceCaveats(cmp: WindowComparison): Caveat[] {
  const out: Caveat[] = [];
  if (!cmp.current.total?.rows || !cmp.prior.total?.rows) return out;
  const changed = new Map(cmp.changed.map((c) => [c.segment, c]));
  for (const [key, row] of cmp.current.segments) {
    const c = changed.get(key);
    if (!cmp.prior.segments.has(key) && c?.opened) {
      out.push({ code: 'late_segment', data: { segment: key, firstPeriod: c.firstDay ?? row.firstDay ?? cmp.currentSpan.start, grain: 'day', ...earlierSpanData(cmp.currentSpan, cmp.priorSpan) } });
    }
  }
  for (const key of cmp.prior.segments.keys()) {
    if (!cmp.current.segments.has(key) && changed.get(key)?.closed) {
      out.push({ code: 'segment_gap', data: { segment: key, periods: 1, firstGap: cmp.currentSpan.start, grain: 'day', window: 'current', ...earlierSpanData(cmp.currentSpan, cmp.priorSpan) } });
    }
  }
  return out;
}

/**
 * The earlier span a note about a segment new or gone names: its dates, and whether it is the same
 * dates a year earlier (said so) or another period the request named ("February 2015").
 */
export function earlierSpanData(current: DateWindow, prior: DateWindow): { earlierStart: string; earlierEnd: string; yearEarlier: boolean } {
  return { earlierStart: prior.start, earlierEnd: prior.end, yearEarlier: addMonths(current.start, -12) === prior.start };
}

/** How many segments the small-group fold holds (over both sides, complements included), 0 when there is none. */
export function foldedMembers(cmp: WindowComparison): number {
  return cmp.smallSegments + cmp.complementSegments;
}

/** Segment keys in a stable order: text order, the missing value last. */
export function segmentKeys(cmp: WindowComparison): (string | null)[] {
  const keys = new Set<string | null>([...cmp.prior.segments.keys(), ...cmp.current.segments.keys()]);
  return [...keys].sort((a, b) => (a === null ? 1 : b === null ? -1 : a < b ? -1 : a > b ? 1 : 0));
}

/** The kind of calendar period a span is exactly (a week of seven days from any day), or null. */
export function wholePeriodKind(span: DateWindow): 'year' | 'quarter' | 'month' | 'week' | null {
  if (span.start.slice(8) === '01') {
    const month = Number(span.start.slice(5, 7));
    if (month === 1 && addMonths(span.start, 12) === span.end) return 'year';
    if ((month - 1) % 3 === 0 && addMonths(span.start, 3) === span.end) return 'quarter';
    if (addMonths(span.start, 1) === span.end) return 'month';
  }
  return spanDays(span) === 7 ? 'week' : null;
}

/** Days in a half-open span of dates. */
export function spanDays(span: DateWindow): number {
  return Math.round((Date.parse(span.end) - Date.parse(span.start)) / 86_400_000);
}

export function maxIso(a: string, b: string): string {
  return a > b ? a : b;
}

export function minIso(a: string, b: string): string {
  return a < b ? a : b;
}
