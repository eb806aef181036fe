// Calendar periods as half-open windows of ISO dates [start, end): the months, quarters, halves,
// seasons, ISO weeks and years a request names, and the arithmetic a like-for-like comparison
// needs. Month arithmetic clamps to the month's last day (31 January plus a month is 28 or 29
// February), as people count.
import { addDays, isoWeekOf, isoWeekStart, periodStart, sameIsoWeekYearsEarlier } from '../../analysis/periods.js';
import type { DateWindow } from '../../analysis/types.js';

export type PeriodUnit = 'day' | 'week' | 'month' | 'quarter' | 'half' | 'season' | 'year';

export type Hemisphere = 'north' | 'south';

export const SEASON_NAMES = ['winter', 'spring', 'summer', 'autumn'] as const;
export type Season = (typeof SEASON_NAMES)[number];

// Meteorological seasons (whole months; common practice in weather and retail reporting):
// in the north winter is December to February, spring March to May, summer June to August,
// autumn September to November; the south is six months apart.
const SEASON_FIRST_MONTH: Record<Hemisphere, Record<Season, number>> = {
  north: { winter: 12, spring: 3, summer: 6, autumn: 9 },
  south: { winter: 6, spring: 9, summer: 12, autumn: 3 },
};

export function ymd(year: number, month: number, day = 1): string {
  const d = new Date(Date.UTC(year, month - 1, 1));
  const last = daysInMonth(d.getUTCFullYear(), d.getUTCMonth() + 1);
  d.setUTCDate(Math.min(day, last));
  return d.toISOString().slice(0, 10);
}

export function daysInMonth(year: number, month: number): number {
  return new Date(Date.UTC(year, month, 0)).getUTCDate();
}

export function yearOf(iso: string): number {
  return Number(iso.slice(0, 4));
}

export function monthOf(iso: string): number {
  return Number(iso.slice(5, 7));
}

export function dayOf(iso: string): number {
  return Number(iso.slice(8, 10));
}

/** The same day `months` later, clamped to the month's length. */
export function addMonthsClamped(iso: string, months: number): string {
  const total = yearOf(iso) * 12 + (monthOf(iso) - 1) + months;
  return ymd(Math.floor(total / 12), (total % 12) + 1, dayOf(iso));
}

export function isValidDate(year: number, month: number, day: number): boolean {
  return month >= 1 && month <= 12 && day >= 1 && day <= daysInMonth(year, month);
}

export function monthWindow(year: number, month: number): DateWindow {
  const start = ymd(year, month);
  return { start, end: addMonthsClamped(start, 1) };
}

export function quarterWindow(year: number, quarter: number): DateWindow {
  const start = ymd(year, (quarter - 1) * 3 + 1);
  return { start, end: addMonthsClamped(start, 3) };
}

export function halfWindow(year: number, half: number): DateWindow {
  const start = ymd(year, half === 1 ? 1 : 7);
  return { start, end: addMonthsClamped(start, 6) };
}

export function yearWindow(year: number): DateWindow {
  return { start: ymd(year, 1), end: ymd(year + 1, 1) };
}

export function dayWindow(iso: string): DateWindow {
  return { start: iso, end: addDays(iso, 1) };
}

export function isoWeekWindow(year: number, week: number): DateWindow {
  const start = isoWeekStart(year, week);
  return { start, end: addDays(start, 7) };
}

/**
 * The season labelled `year`. A season that spans two calendar years (the northern winter) takes
 * the label of the year its January falls in, as weather services count it: winter 2024 runs
 * from December 2023 to February 2024.
 */
export function seasonWindow(season: Season, year: number, hemisphere: Hemisphere): DateWindow {
  const first = SEASON_FIRST_MONTH[hemisphere][season];
  const startYear = first === 12 ? year - 1 : year;
  const start = ymd(startYear, first);
  return { start, end: addMonthsClamped(start, 3) };
}

/** The season that holds a date, and its label year. */
export function seasonOf(iso: string, hemisphere: Hemisphere): { season: Season; year: number } {
  const m = monthOf(iso);
  for (const season of SEASON_NAMES) {
    const first = SEASON_FIRST_MONTH[hemisphere][season];
    const months = [first, (first % 12) + 1, ((first + 1) % 12) + 1];
    if (months.includes(m)) return { season, year: first === 12 && m === 12 ? yearOf(iso) + 1 : yearOf(iso) };
  }
  throw new Error(`no season holds ${iso}`);
}

/** The period of a unit that holds a date. */
export function periodHolding(iso: string, unit: PeriodUnit, hemisphere: Hemisphere = 'north'): DateWindow {
  switch (unit) {
    case 'day':
      return dayWindow(iso);
    case 'week': {
      const { year, week } = isoWeekOf(iso);
      return isoWeekWindow(year, week);
    }
    case 'month':
      return monthWindow(yearOf(iso), monthOf(iso));
    case 'quarter':
      return quarterWindow(yearOf(iso), Math.ceil(monthOf(iso) / 3));
    case 'half':
      return halfWindow(yearOf(iso), monthOf(iso) <= 6 ? 1 : 2);
    case 'season': {
      const { season, year } = seasonOf(iso, hemisphere);
      return seasonWindow(season, year, hemisphere);
    }
    case 'year':
      return yearWindow(yearOf(iso));
  }
}

/** The period of the same unit `n` steps before (negative: after) the one starting at `start`. */
export function shiftPeriod(w: DateWindow, unit: PeriodUnit, n: number): DateWindow {
  switch (unit) {
    case 'day':
      return { start: addDays(w.start, -n), end: addDays(w.end, -n) };
    case 'week':
      return { start: addDays(w.start, -7 * n), end: addDays(w.end, -7 * n) };
    case 'month':
      return shiftMonths(w, -n);
    case 'quarter':
    case 'season':
      return shiftMonths(w, -3 * n);
    case 'half':
      return shiftMonths(w, -6 * n);
    case 'year':
      return shiftMonths(w, -12 * n);
  }
}

export function shiftMonths(w: DateWindow, months: number): DateWindow {
  return { start: addMonthsClamped(w.start, months), end: addMonthsClamped(w.end, months) };
}

/**
 * A window of weeks moved back by whole years to the same ISO week numbers (README: a year earlier
 * is the same ISO week for weeks), so Monday stays Monday; the same dates would start on another
 * weekday. A window clipped inside its week moves by the same number of days. Undefined when the
 * earlier year has no such week (a week 53).
 */
export function shiftWeeksYears(w: DateWindow, years: number): DateWindow | undefined {
  const weekStart = startOfWeek(w.start);
  const earlier = sameIsoWeekYearsEarlier(weekStart, years);
  if (earlier === null) return undefined;
  const days = daysBetween(earlier, weekStart);
  return { start: addDays(w.start, -days), end: addDays(w.end, -days) };
}

/** A window moved back by whole years, keeping calendar position (29 February becomes the 28th). */
export function shiftYears(w: DateWindow, years: number): DateWindow {
  return shiftMonths(w, -12 * years);
}

/** Monday of the ISO week holding a date. */
export function startOfWeek(iso: string): string {
  return periodStart(iso, 'week');
}

export function minIso(a: string, b: string): string {
  return a < b ? a : b;
}

export function maxIso(a: string, b: string): string {
  return a > b ? a : b;
}

/** Whole days from `a` to `b`. */
export function daysBetween(a: string, b: string): number {
  return Math.round((Date.parse(`${b}T00:00:00Z`) - Date.parse(`${a}T00:00:00Z`)) / 86_400_000);
}
