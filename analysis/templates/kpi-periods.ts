// Which periods a KPI snapshot reads: the latest period the window and the data both cover in
// full, the period before it and the same period a year earlier. Pure calendar arithmetic.
import type { CompileContext } from '../compile-context.js';
import type { Coverage } from '../coverage.js';
import { dataEnd as coveredEnd } from '../coverage.js';
import { addDays, addMonths, periodStart, sameIsoWeekLastYear } from '../periods.js';
import type { DateWindow, Grain } from '../types.js';

/**
 * A compile context that may also know the data's coverage. With it, the latest complete
 * period is known when compiling and the query reads exactly the periods it needs; without it,
 * the query also reads the period before, in case the data ends inside the window's last period.
 */
export type KpiCompileContext = CompileContext & { coverage?: Coverage };

/** The period `n` periods after (negative: before) the one starting at `start`. */
export function shiftPeriod(start: string, grain: Grain, n: number): string {
  switch (grain) {
    case 'day':
      return addDays(start, n);
    case 'week':
      return addDays(start, 7 * n);
    case 'month':
      return addMonths(start, n);
    case 'quarter':
      return addMonths(start, 3 * n);
    case 'year':
      return addMonths(start, 12 * n);
  }
}

/**
 * The same period a year earlier, or null where there is none: at the year grain (the prior
 * period already is last year) and for an ISO week 53 whose previous year has 52 weeks. A week
 * is compared with the same ISO 8601 week number of the previous ISO year; a day goes back 52
 * weeks so the weekday lines up (common practice in retail and travel reporting, where a
 * Saturday is not comparable with a Tuesday).
 */
export function sameLastYear(start: string, grain: Grain): string | null {
  switch (grain) {
    case 'day':
      return addDays(start, -364);
    case 'week':
      return sameIsoWeekLastYear(start);
    case 'month':
    case 'quarter':
      return addMonths(start, -12);
    case 'year':
      return null;
  }
}

/** The three points a snapshot compares: the latest period, the one before and a year earlier. */
export interface KpiPeriods {
  latest: string;
  previous: string;
  lastYear: string | null;
}

export function comparisonPeriods(latest: string, grain: Grain): KpiPeriods {
  return { latest, previous: shiftPeriod(latest, grain, -1), lastYear: sameLastYear(latest, grain) };
}

/** Where the usable data ends inside the window: [start, end), clipped to the coverage when known. */
export function effectiveSpan(window: DateWindow, coverage: Coverage | undefined): DateWindow {
  let { start, end } = window;
  if (coverage?.firstDate && coverage.firstDate > start) start = coverage.firstDate;
  if (coverage?.lastDate) {
    const dataEnd = coveredEnd({ ...coverage, lastDate: coverage.lastDate });
    if (dataEnd < end) end = dataEnd;
  }
  return { start, end };
}

export interface LatestComplete {
  /** Start of the latest period covered in full by both the window and the data; null if none is. */
  latest: string | null;
  /** The period after it when the window or the data covers only part of it (left out, and said so). */
  partial: { period: string; coveredFrom: string; coveredTo: string } | null;
}

/** The latest complete period at `grain` inside the span [start, end). */
export function latestComplete(span: DateWindow, grain: Grain): LatestComplete {
  const edge = periodStart(span.end, grain);
  const candidate = shiftPeriod(edge, grain, -1);
  const latest = candidate >= span.start ? candidate : null;
  // The span ends inside a period: that period has data but is unfinished.
  const partial =
    edge < span.end && edge >= periodStart(span.start, grain)
      ? { period: edge, coveredFrom: edge > span.start ? edge : span.start, coveredTo: addDays(span.end, -1) }
      : null;
  return { latest, partial };
}

/**
 * Candidates for the latest complete period, newest first, as far as compiling can tell: one
 * when the coverage is known, else the window's last full period and the one before it.
 */
export function latestCandidates(window: DateWindow, grain: Grain, coverage: Coverage | undefined): string[] {
  const { latest } = latestComplete(effectiveSpan(window, coverage), grain);
  if (latest === null) return [];
  if (coverage?.lastDate) return [latest];
  const before = shiftPeriod(latest, grain, -1);
  return before >= window.start ? [latest, before] : [latest];
}

/** Every period a snapshot query must read for the candidates: each with its two comparison points. */
export function periodsToRead(candidates: string[], grain: Grain): string[] {
  const set = new Set<string>();
  for (const c of candidates) {
    const p = comparisonPeriods(c, grain);
    set.add(p.latest);
    set.add(p.previous);
    if (p.lastYear) set.add(p.lastYear);
  }
  return [...set].sort();
}

/** The latest complete period as the data's coverage shows it when reading, and the partial period left out. */
export function resolvedLatest(window: DateWindow, grain: Grain, coverage: Coverage): LatestComplete {
  return latestComplete(effectiveSpan(window, coverage), grain);
}

/**
 * A comparison period counts only when the data covers all of it: a year-ago month that the
 * data starts halfway through would make any change look larger than it is.
 */
export function coveredInFull(period: string, grain: Grain, coverage: Coverage): boolean {
  if (!coverage.firstDate || !coverage.lastDate) return false;
  return period >= coverage.firstDate && shiftPeriod(period, grain, 1) <= coveredEnd({ ...coverage, lastDate: coverage.lastDate });
}
