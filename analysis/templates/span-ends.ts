// The two ends of a stretch a change is measured over ("since 2001", "over the last 10 years"):
// its first whole period and its last, so "how has it changed since 2001" on data to 2017 sets
// 2001 against 2017, not 2017 against 2016.
import type { Coverage } from '../coverage.js';
import { addMonths, nextPeriod, periodStart } from '../periods.js';
import type { DateWindow, SpanEndsUnit } from '../types.js';
import { coveredWindow } from './trend-points.js';

const MONTHS: Record<SpanEndsUnit, number> = { month: 1, quarter: 3, year: 12 };
const ORDER: SpanEndsUnit[] = ['month', 'quarter', 'year'];
const STAMP_UNIT: Partial<Record<NonNullable<Coverage['stamps']>, SpanEndsUnit>> = { monthly: 'month', quarterly: 'quarter', yearly: 'year' };

export interface SpanEnds {
  /** The first whole period at or after the stretch's start, and the last whole one it and the data hold. */
  first: DateWindow;
  last: DateWindow;
  /** The unit compared: the one the request named, never finer than the data's stamps. */
  unit: SpanEndsUnit;
}

/**
 * The stretch's first and last whole periods of `unit` (coarsened to the data's stamps: yearly
 * data compares years), cut to the data; null when the stretch holds fewer than two, and the
 * comparison falls back to its usual spans.
 */
export function spanEnds(window: DateWindow, asked: SpanEndsUnit, coverage: Coverage | undefined): SpanEnds | null {
  const stamped = coverage?.stamps ? STAMP_UNIT[coverage.stamps] : undefined;
  const unit = stamped && ORDER.indexOf(stamped) > ORDER.indexOf(asked) ? stamped : asked;
  const covered = (coverage && coveredWindow(window, coverage)) || window;
  const head = periodStart(covered.start, unit);
  const firstStart = head < covered.start ? nextPeriod(head, unit) : head;
  const tail = periodStart(covered.end, unit);
  const lastStart = addMonths(tail, -MONTHS[unit]);
  if (lastStart <= firstStart) return null;
  return { first: { start: firstStart, end: nextPeriod(firstStart, unit) }, last: { start: lastStart, end: tail }, unit };
}
