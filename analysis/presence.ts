// Whether a segment (a site, a channel, a product) was there through a compared span, or entered
// or left part-way: the one rule behind like-for-like growth and a group comparison's units left
// out. A segment's first or last row alone does not say it: a sparse category (a weather type seen
// a few days a month, a genre with a few releases a year) often has no row for weeks near the
// data's edge while it never went away. So a silence at an edge counts only when the segment's own
// rhythm makes it unlikely by chance.
//
// The reasoning is the run test of a Bernoulli sequence (the geometric waiting time): count the
// calendar months of a segment's life that have a row, and estimate the chance p that a month has
// one from the months after its first, (active months - 1) / (life months - 1); the first is
// active by definition, so a segment seen in one month only gives no evidence and is never judged
// to enter or leave. A run of g empty months at an edge then has probability (1 - p)^g, and the
// segment entered (or left) only when that is below PRESENCE_ALPHA. Months rather than days
// because rows cluster (a run of rainy days, a busy release weekend) and a month with any row is
// closer to independent than a day. A site with rows every month has p = 1, so one empty month is
// enough; drizzle in Seattle (rows in 21 of its 46 months) is not taken to have stopped after two
// empty months. Besides, the silence must be more than `presenceToleranceDays` long and cover at
// least one calendar month boundary, so a quiet first day or two is never news.
import type { DateWindow } from './types.js';

/**
 * The chance below which a silent run at an edge is taken as real: 1%, per segment and edge. Our
 * choice (common practice for a strict test); no correction for the number of segments, which
 * would hide a real newcomer among many sparse ones.
 */
export const PRESENCE_ALPHA = 0.01;

/**
 * How many days after the earliest first day of the earlier span a segment may first appear (or
 * before the latest last day of the later span it may last appear) and still count as present
 * through both, whatever its rhythm: a twelfth of the span, at least one day and at most 31. Our
 * rule; retailers' own like-for-like rules (a site open a full year, say) are stricter and may be
 * set by the organisation.
 */
export function presenceToleranceDays(w: DateWindow): number {
  const days = Math.round((Date.parse(w.end) - Date.parse(w.start)) / 86_400_000);
  return Math.min(31, Math.max(1, Math.floor(days / 12)));
}

/** A date's calendar month as one number (year * 12 + month), the same in DuckDB and PostgreSQL. */
function monthIndex(day: string): string {
  return `(EXTRACT(YEAR FROM ${day}) * 12 + EXTRACT(MONTH FROM ${day}))`;
}

/** The names of a segment's life columns, as selected by `lifeColumnsSql`. */
export interface LifeColumns {
  first: string;
  last: string;
  activeMonths: string;
}

/**
 * Aggregates over a segment's rows (grouped by segment) giving its life: first and last day, and
 * the number of calendar months with a row. `day` is the local date expression; `as` names the
 * output columns (SQL identifiers, already quoted where needed).
 */
export function lifeColumnsSql(day: string, as: LifeColumns): string {
  return `MIN(${day}) AS ${as.first}, MAX(${day}) AS ${as.last}, COUNT(DISTINCT ${monthIndex(day)}) AS ${as.activeMonths}`;
}

/**
 * A boolean SQL expression, NULL when the segment's life is unknown: the segment was silent from
 * `edge` up to its first row (side 'start': it entered) or from its last row up to `edge` (side
 * 'end': it left), beyond chance for its own rhythm (see above). `life` holds the columns of
 * `lifeColumnsSql` qualified by their table; `tolerance` is an SQL integer (a bound parameter).
 */
export function silentBeyondChanceSql(life: LifeColumns, edge: string, side: 'start' | 'end', tolerance: string): string {
  const [from, to] = side === 'start' ? [edge, life.first] : [life.last, edge];
  const gapMonths = `(${monthIndex(to)} - ${monthIndex(from)})`;
  const lifeMonths = `(${monthIndex(life.last)} - ${monthIndex(life.first)})`;
  // p = (active months - 1) / (life months - 1); NULL (never judged) for a life of one month.
  const p = `(CAST(${life.activeMonths} AS DOUBLE PRECISION) - 1) / NULLIF(CAST(${lifeMonths} AS DOUBLE PRECISION), 0)`;
  return `(${to} - ${from} > ${tolerance} AND ${gapMonths} >= 1 AND ${life.activeMonths} >= 2
      AND POWER(1 - ${p}, CAST(${gapMonths} AS DOUBLE PRECISION)) < ${PRESENCE_ALPHA})`;
}

/**
 * The calendar years (of those given, each with its count of months holding a row) that a segment
 * was there throughout: a year with a row in every month, or any year between two years in which
 * it has rows, since a sparse segment (a distributor with a few releases a year) has not entered
 * or left in a year it is seen both before and after. A first or last year with empty months may
 * be the one it entered or left in, so it counts only when every month has a row.
 */
export function yearsThroughout(years: readonly { year: number; monthsWithRows: number }[]): Set<number> {
  const seen = years.filter((y) => y.monthsWithRows > 0).map((y) => y.year);
  if (seen.length === 0) return new Set();
  const [first, last] = [Math.min(...seen), Math.max(...seen)];
  return new Set(years.filter((y) => y.monthsWithRows === 12 || (y.year > first && y.year < last)).map((y) => y.year));
}

/** A segment's life as the value index holds it: first and last day with a row, and months with one. */
export interface SegmentLife {
  first: string;
  last: string;
  activeMonths: number;
}

function monthNumberOf(day: string): number {
  return Number(day.slice(0, 4)) * 12 + Number(day.slice(5, 7));
}

/**
 * The same test as `silentBeyondChanceSql` with side 'start', on a life already read: the segment
 * was silent from `edge` (the data's first day) up to its first row beyond chance for its own
 * rhythm, so it entered the data on that first day ("since it opened" starts there). False when its
 * life is too short to judge, as the SQL's NULL counts as false.
 */
export function enteredAfter(life: SegmentLife, edge: string, toleranceDays: number): boolean {
  const gapDays = Math.round((Date.parse(life.first) - Date.parse(edge)) / 86_400_000);
  const gapMonths = monthNumberOf(life.first) - monthNumberOf(edge);
  const lifeMonths = monthNumberOf(life.last) - monthNumberOf(life.first);
  if (lifeMonths === 0 || life.activeMonths < 2) return false;
  const p = (life.activeMonths - 1) / lifeMonths;
  return gapDays > toleranceDays && gapMonths >= 1 && Math.pow(1 - p, gapMonths) < PRESENCE_ALPHA;
}
