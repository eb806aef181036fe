// Which period labels to show on a time axis: as many as fit, on calendar boundaries.
import type { SKRSContext2D } from '@napi-rs/canvas';
import type { Grain } from '../types.js';
import { monthNames } from './header.js';

const STEPS: Record<Grain, number[]> = {
  day: [1, 2, 7, 14, 28, 56, 91, 182, 364],
  week: [1, 2, 4, 8, 13, 26, 52, 104],
  month: [1, 2, 3, 6, 12, 24, 36, 60],
  quarter: [1, 2, 4, 8, 12, 20],
  year: [1, 2, 5, 10, 20, 50],
};

/** A tick label: one line, or two (month over year). Null hides the tick. */
export type TickLabel = string | string[] | null;

/**
 * Returns one entry per point. Periods are written short ("Jul", "Q3", "29 Jan") with the year
 * underneath where it changes. Months and quarters land on calendar boundaries (Jan, Apr, Jul,
 * Oct) rather than a random stride; weeks and days count back from the latest period so the
 * newest is labelled.
 */
export function timeTicks(
  ctx: SKRSContext2D,
  labels: string[],
  periods: string[],
  grain: Grain,
  locale: string,
  availableWidth: number,
  gap: number,
): TickLabel[] {
  const n = labels.length;
  if (n === 0) return [];
  const parsed = periods.map(calendarDate);
  // Short labels with the year on a second line, for every grain below a year.
  const twoLine = grain !== 'year' && parsed.every((p) => p !== null);
  const months = monthNames(locale);
  const short = twoLine ? parsed.map((p) => shortLabel(p!, grain, locale, months)) : labels;
  const widest = Math.max(...short.map((l) => ctx.measureText(l).width), ...(twoLine ? [ctx.measureText('0000').width] : []));
  const capacity = Math.max(1, Math.floor(availableWidth / (widest + gap)));
  const step = STEPS[grain].find((s) => Math.ceil(n / s) <= capacity) ?? Math.ceil(n / capacity);
  const calendar = twoLine && (grain === 'month' || grain === 'quarter');
  const stride = grain === 'quarter' ? step * 3 : step;

  let lastYear: number | null = null;
  return labels.map((label, i) => {
    const p = parsed[i];
    const shown = calendar ? step === 1 || (p!.year * 12 + p!.month) % stride === 0 : (n - 1 - i) % step === 0;
    if (!shown) return null;
    if (!twoLine) return label;
    const showYear = lastYear === null || p!.year !== lastYear;
    lastYear = p!.year;
    return showYear ? [short[i]!, String(p!.year)] : short[i]!;
  });
}

interface CalendarDate {
  year: number;
  month: number;
  day: number;
}

function calendarDate(iso: string): CalendarDate | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})/.exec(iso);
  if (!m) return null;
  const month = Number(m[2]) - 1;
  const day = Number(m[3]);
  return month >= 0 && month <= 11 && day >= 1 && day <= 31 ? { year: Number(m[1]), month, day } : null;
}

function shortLabel(p: CalendarDate, grain: Grain, locale: string, months: string[]): string {
  if (grain === 'month') return months[p.month]!;
  if (grain === 'quarter') return `Q${Math.floor(p.month / 3) + 1}`;
  return dayMonth(locale).format(new Date(Date.UTC(2001, p.month, p.day)));
}

const dayMonthFormats = new Map<string, Intl.DateTimeFormat>();

function dayMonth(locale: string): Intl.DateTimeFormat {
  let df = dayMonthFormats.get(locale);
  if (!df) {
    const options = { day: 'numeric', month: 'short', timeZone: 'UTC' } as const;
    try {
      df = new Intl.DateTimeFormat(locale, options);
    } catch {
      df = new Intl.DateTimeFormat('en', options);
    }
    dayMonthFormats.set(locale, df);
  }
  return df;
}
