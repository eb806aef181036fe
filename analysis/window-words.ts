// A window said back in plain words: "1 June to 18 June 2025 (the data ends there)", so the
// requester can see how a period phrase was read.
import { type Coverage, dataEnd } from './coverage.js';
import { formatPeriod } from './format.js';
import { finestGrain } from './grains.js';
import { addDays, periodStart } from './periods.js';
import type { DateWindow } from './types.js';

const formats = new Map<string, Intl.DateTimeFormat>();

function format(iso: string, locale: string, withYear: boolean): string {
  const key = `${locale}|${withYear}`;
  let f = formats.get(key);
  if (!f) {
    f = new Intl.DateTimeFormat(locale, { day: 'numeric', month: 'long', ...(withYear ? { year: 'numeric' } : {}), timeZone: 'UTC' });
    formats.set(key, f);
  }
  return f.format(new Date(`${iso}T00:00:00Z`));
}

/** "1 June to 18 June 2025", "1 January 2024 to 31 December 2024", with a note when the data covers only part of it. */
export function describeWindow(w: DateWindow, coverage: Coverage, locale = 'en-IE'): string {
  const last = addDays(w.end, -1);
  const sameYear = w.start.slice(0, 4) === last.slice(0, 4);
  // Data stamped once a month (or coarser) is said in months: "1 April 2020" would claim a day it does not have.
  const stamp = finestGrain(coverage.stamps);
  const coarse = stamp !== 'day' && stamp !== 'week' && periodStart(w.start, 'month') === w.start && periodStart(w.end, 'month') === w.end;
  const month = (iso: string) => formatPeriod(iso, 'month', locale, 'long');
  const range = coarse
    ? w.start.slice(0, 7) === last.slice(0, 7) ? month(w.start) : `${month(w.start)} to ${month(last)}`
    : w.start === last ? format(w.start, locale, true) : `${format(w.start, locale, !sameYear)} to ${format(last, locale, true)}`;
  const notes: string[] = [];
  const dataLast = coverage.lastDate ? addDays(dataEnd({ lastDate: coverage.lastDate, ...(coverage.stamps ? { stamps: coverage.stamps } : {}) }), -1) : null;
  if (coverage.lastDate && dataLast && w.start <= dataLast && last > dataLast) notes.push(coarse ? `the data ends with ${month(dataLast)}` : `the data ends on ${format(coverage.lastDate, locale, true)}`);
  if (coverage.firstDate && w.start < coverage.firstDate) notes.push(coarse ? `the data starts with ${month(coverage.firstDate)}` : `the data starts on ${format(coverage.firstDate, locale, true)}`);
  if (coverage.lastDate && w.start > coverage.lastDate) notes.push('after the data ends');
  return notes.length > 0 ? `${range} (${notes.join('; ')})` : range;
}
