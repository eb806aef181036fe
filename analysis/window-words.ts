// A window said back in plain words: "1 June to 18 June 2025 (the data ends there)", so the
// requester can see how a period phrase was read.
import type { Coverage } from './coverage.js';
import { addDays } from './periods.js';
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
  const range = w.start === last ? format(w.start, locale, true) : `${format(w.start, locale, !sameYear)} to ${format(last, locale, true)}`;
  const notes: string[] = [];
  if (coverage.lastDate && last >= coverage.lastDate && w.start <= coverage.lastDate && last > coverage.lastDate) notes.push(`the data ends on ${format(coverage.lastDate, locale, true)}`);
  if (coverage.firstDate && w.start < coverage.firstDate) notes.push(`the data starts on ${format(coverage.firstDate, locale, true)}`);
  if (coverage.lastDate && w.start > coverage.lastDate) notes.push('after the data ends');
  return notes.length > 0 ? `${range} (${notes.join('; ')})` : range;
}
