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
export function periodsBetween(from: string, end: string, grain: Grain): string[] {
  const out: string[] = [];
  for (let p = periodStart(from, grain); p < end; p = nextPeriod(p, grain)) out.push(p);
  return out;
}

export function periodsPerYear(grain: Grain): number | null {
  return { day: null, week: 52, month: 12, quarter: 4, year: 1 }[grain];
}
