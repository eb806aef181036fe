// Calendar arithmetic on ISO dates (YYYY-MM-DD), done in UTC so no local zone shifts a day.
import type { Grain } from './types.js';

export function parseIsoDate(iso: string): Date {
  return new Date(`${iso.slice(0, 10)}T00:00:00Z`);
}

export function toIsoDate(d: Date): string {
  return d.toISOString().slice(0, 10);
}

export function addDays(iso: string, days: number): string {
  const d = parseIsoDate(iso);
  d.setUTCDate(d.getUTCDate() + days);
  return toIsoDate(d);
}

export function addMonths(iso: string, months: number): string {
  const d = parseIsoDate(iso);
  return toIsoDate(new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + months, d.getUTCDate())));
}

/** First day of the period at `grain` containing the date (weeks start on Monday, ISO 8601). */
export function periodStart(iso: string, grain: Grain): string {
  const d = parseIsoDate(iso);
  const y = d.getUTCFullYear();
  const m = d.getUTCMonth();
  switch (grain) {
    case 'day':
      return toIsoDate(d);
    case 'week':
      return addDays(toIsoDate(d), -((d.getUTCDay() + 6) % 7));
    case 'month':
      return toIsoDate(new Date(Date.UTC(y, m, 1)));
    case 'quarter':
      return toIsoDate(new Date(Date.UTC(y, m - (m % 3), 1)));
    case 'year':
      return toIsoDate(new Date(Date.UTC(y, 0, 1)));
  }
}

/** First day of the period after the one starting at `start`. */
export function nextPeriod(start: string, grain: Grain): string {
  switch (grain) {
    case 'day':
      return addDays(start, 1);
    case 'week':
      return addDays(start, 7);
    case 'month':
      return addMonths(start, 1);
    case 'quarter':
      return addMonths(start, 3);
    case 'year':
      return addMonths(start, 12);
  }
}

/** Every period start from the one containing `from` up to (not including) `end`. */
/** Calendar days from `start` up to the exclusive `end` (0 when end is not after start). */
export function daysBetween(start: string, end: string): number {
  return Math.max(0, Math.round((parseIsoDate(end).getTime() - parseIsoDate(start).getTime()) / 86_400_000));
}

export function periodsBetween(from: string, end: string, grain: Grain): string[] {
  const out: string[] = [];
  for (let p = periodStart(from, grain); p < end; p = nextPeriod(p, grain)) out.push(p);
  return out;
}

/** Days in a calendar month (1 = January): 28 or 29 for February by the Gregorian leap rule. */
export function daysInMonth(year: number, month: number): number {
  return new Date(Date.UTC(year, month, 0)).getUTCDate();
}

/** A date as a time in years, for slopes per year: 1960-07-01 → 1960.497 (its day within its own year's length). */
export function yearFraction(iso: string): number {
  const d = parseIsoDate(iso);
  const year = d.getUTCFullYear();
  const start = Date.UTC(year, 0, 1);
  return year + (d.getTime() - start) / (Date.UTC(year + 1, 0, 1) - start);
}

export function periodsPerYear(grain: Grain): number | null {
  return { day: null, week: 52, month: 12, quarter: 4, year: 1 }[grain];
}

// ISO 8601 week calendar: weeks start on Monday and belong to the year that holds their
// Thursday, so week 1 is the week with 4 January and a year has 52 or 53 weeks.

/** The ISO week-numbering year and week number of the week containing the date. */
export function isoWeekOf(iso: string): { year: number; week: number } {
  const thursday = parseIsoDate(addDays(periodStart(iso, 'week'), 3));
  const year = thursday.getUTCFullYear();
  const dayOfYear = Math.round((thursday.getTime() - Date.UTC(year, 0, 1)) / 86_400_000);
  return { year, week: Math.floor(dayOfYear / 7) + 1 };
}

/** Monday of ISO week `week` of ISO year `year` (week 1 holds 4 January). */
export function isoWeekStart(year: number, week: number): string {
  const jan4 = toIsoDate(new Date(Date.UTC(year, 0, 4)));
  return addDays(periodStart(jan4, 'week'), 7 * (week - 1));
}

/** 52 or 53: 28 December always falls in an ISO year's last week. */
export function isoWeeksInYear(year: number): number {
  return isoWeekOf(toIsoDate(new Date(Date.UTC(year, 11, 28)))).week;
}

/**
 * The week with the same ISO week number in the previous ISO year, or null for a week 53 whose
 * previous year has only 52 weeks (there is no like-for-like week to compare with). Going back a
 * fixed 52 weeks instead lands one week off for a whole year after every 53-week year.
 */
export function sameIsoWeekLastYear(weekStart: string): string | null {
  return sameIsoWeekYearsEarlier(weekStart, 1);
}

/** The week with the same ISO week number `years` ISO years earlier (null when that year has no such week). */
export function sameIsoWeekYearsEarlier(weekStart: string, years: number): string | null {
  const { year, week } = isoWeekOf(weekStart);
  return week > isoWeeksInYear(year - years) ? null : isoWeekStart(year - years, week);
}
