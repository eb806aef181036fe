// A window said back in plain words: "1 June to 18 June 2025 (the data ends there)", so the
// requester can see how a period phrase was read.
import { type Coverage, type DatesAfter, dataEnd, STRAY_DAY_SHARE, type StrayTail } from './coverage.js';
import { formatPeriod } from './format.js';
import { finestGrain } from './grains.js';
import { addDays, periodStart } from './periods.js';
import type { StampGranularity } from './stamps.js';
import type { DateWindow, Grain } from './types.js';

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
  const unit = windowWordsGrain(w, coverage.stamps);
  const period = (iso: string) => formatPeriod(iso, unit, locale, 'long');
  const coarse = unit !== 'day';
  const range = coarse
    ? period(w.start) === period(last) ? period(w.start) : `${period(w.start)} to ${period(last)}`
    : w.start === last ? format(w.start, locale, true) : `${format(w.start, locale, !sameYear)} to ${format(last, locale, true)}`;
  const notes: string[] = [];
  const dataLast = coverage.lastDate ? addDays(dataEnd({ lastDate: coverage.lastDate, ...(coverage.stamps ? { stamps: coverage.stamps } : {}) }), -1) : null;
  if (coverage.lastDate && dataLast && w.start <= dataLast && last > dataLast) notes.push(coarse ? `the data ends with ${period(dataLast)}` : `the data ends on ${format(coverage.lastDate, locale, true)}`);
  if (coverage.firstDate && w.start < coverage.firstDate) notes.push(coarse ? `the data starts with ${period(coverage.firstDate)}` : `the data starts on ${format(coverage.firstDate, locale, true)}`);
  if (coverage.lastDate && w.start > coverage.lastDate) notes.push('after the data ends');
  return notes.length > 0 ? `${range} (${notes.join('; ')})` : range;
}

/**
 * The unit a window over data stamped this often is said in: the stamp's own unit when the window
 * keeps its bounds, else months when it keeps theirs, else days. A stamp stands for its whole
 * period, so data stamped once a year has no months or days to name ("2001 to 2017", not "1
 * January 2001 to 1 January 2017"); daily or weekly data is said in days.
 */
export function windowWordsGrain(w: DateWindow, stamps: StampGranularity | undefined): Grain {
  const stamp = finestGrain(stamps);
  if (stamp === 'day' || stamp === 'week') return 'day';
  for (const unit of new Set<Grain>([stamp, 'month'])) {
    if (periodStart(w.start, unit) === w.start && periodStart(w.end, unit) === w.end) return unit;
  }
  return 'day';
}

/**
 * Whether a window over data stamped this often is said in months or coarser: data stamped once
 * a month (or coarser) has no days to name, and "1 April 2020" would claim one it does not have.
 */
export function saidInMonths(w: DateWindow, stamps: StampGranularity | undefined): boolean {
  return windowWordsGrain(w, stamps) !== 'day';
}

/**
 * A window in a chart's short words, by the same stamp rule as describeWindow: "Mar 1958 to Apr
 * 2020" for monthly data, "2001 to 2017" for yearly, "1 Jan 2024 to 18 Jun 2025" for daily data;
 * one period alone when the window holds one.
 */
export function shortWindow(w: DateWindow, stamps: StampGranularity | undefined, locale: string): string {
  const grain = windowWordsGrain(w, stamps);
  const from = formatPeriod(w.start, grain, locale);
  const to = formatPeriod(addDays(w.end, -1), grain, locale);
  return from === to ? from : `${from} to ${to}`;
}

/**
 * The data's last date as a footer says it ("Data as of …"), by the same stamp rule: monthly
 * data stamped 1 April 2020 is data "as of Apr 2020" (the whole month), yearly data stamped 1
 * January 2017 "as of 2017", daily data of its day.
 */
export function dataDateWords(lastDate: string, stamps: StampGranularity | undefined, locale: string): string {
  const end = dataEnd({ lastDate, ...(stamps ? { stamps } : {}) });
  const grain = finestGrain(stamps);
  const coveredTo = addDays(end, -1);
  const unit = grain === 'day' || grain === 'week' ? 'day' : windowWordsGrain({ start: periodStart(coveredTo, grain), end }, stamps);
  return unit === 'day' ? formatPeriod(lastDate, 'day', locale) : formatPeriod(coveredTo, unit, locale);
}

/**
 * Rows dated after the run's day, said once: "16 rows dated after 5 December 2026 (12 August
 * 2027 to 31 December 2046) are left out: a date in the future is likely a mistake in the data."
 */
export function datesAfterWords(after: DatesAfter, locale = 'en-GB'): string {
  const span = after.firstDate === after.lastDate ? format(after.firstDate, locale, true) : `${format(after.firstDate, locale, true)} to ${format(after.lastDate, locale, true)}`;
  const rows = after.rows === 1 ? '1 row' : `${after.rows.toLocaleString('en')} rows`;
  return `${rows} dated after ${format(after.day, locale, true)} (${span}) ${after.rows === 1 ? 'is' : 'are'} left out: a date in the future is likely a mistake in the data.`;
}

/**
 * A stray tail, said once: "6 rows dated 1 July 2001 (under 1% of a typical day's 16,668 rows)
 * are read as a stray tail: the data is taken to end on 30 June 2001, the last full day."
 */
export function strayTailWords(tail: StrayTail, lastFullDay: string, locale = 'en-GB'): string {
  const span = tail.firstDate === tail.lastDate ? format(tail.firstDate, locale, true) : `${format(tail.firstDate, locale, true)} to ${format(tail.lastDate, locale, true)}`;
  const rows = tail.rows === 1 ? '1 row' : `${tail.rows.toLocaleString('en')} rows`;
  const typical = Math.round(tail.typicalDayRows).toLocaleString('en');
  return `${rows} dated ${span} (under ${Math.round(STRAY_DAY_SHARE * 100)}% of a typical day's ${typical} rows) ${tail.rows === 1 ? 'is' : 'are'} read as a stray tail: the data is taken to end on ${format(lastFullDay, locale, true)}, its last full day, and no period after it counts as complete.`;
}
