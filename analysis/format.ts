// Number and period formatting shared by chart specs and captions, so a value reads the
// same in the picture and in the prose. Pure: Intl only, no clocks, no process state.
import type { Metric, Unit } from '../config/schema.js';
import { growthMultiple } from './stats/growth.js';
import type { Grain } from './types.js';

export interface ValueFormat {
  unit: Unit;
  /** ISO 4217 code, used when unit is 'currency'. */
  currency?: string;
  /**
   * Fixed decimals; unit defaults apply when absent. The compact form keeps them below 1,000
   * (above, a magnitude suffix decides), unless they would round a value that is not zero to zero.
   */
  decimals?: number;
  /** The unit's short name after a count or number ("ppm"), from the metric's `unit_label`. */
  label?: string;
  /**
   * A rate of the metric (a count per day, per row, per unit), wherever it is printed: the rate
   * rule of FormatOptions.rate applies in captions and chart labels alike.
   */
  rate?: boolean;
  locale: string;
}

export interface FormatOptions {
  /** About three significant figures with a magnitude suffix: "€1.93M". */
  compact?: boolean;
  /** Always show the sign: "+€12.3K", "−€612". */
  signed?: boolean;
  /**
   * A rate of the metric (per day, per unit), not a total: a count's "1.4 a day" must not read
   * "1", so below 100 it keeps three significant figures ("0.347", "1.43", "12.3"); from 100 whole
   * units ("11,999 a day"). A metric's own decimals still win; money keeps its own form.
   */
  rate?: boolean;
}

const NOT_AVAILABLE = 'n/a';
/** The unit of a change of a rate or share, in its one written form. */
export const POINTS = 'pts';
// Typographic minus: reads better than a hyphen in titles and never wraps apart from its number.
const MINUS = '\u2212';
const FALLBACK_LOCALE = 'en';

export function valueFormatOf(metric: Metric, locale: string): ValueFormat {
  const fmt: ValueFormat = { unit: metric.unit, locale };
  if (metric.currency !== undefined) fmt.currency = metric.currency;
  if (metric.decimals !== undefined) fmt.decimals = metric.decimals;
  if (metric.unit_label !== undefined && (metric.unit === 'count' || metric.unit === 'number')) fmt.label = metric.unit_label;
  return fmt;
}

/** The same format without the unit's name, for a figure whose words already carry it (an index, a share). */
export function withoutUnitLabel(fmt: ValueFormat): ValueFormat {
  const { label: _label, ...rest } = fmt;
  return rest;
}

// A unit label that is itself a magnitude ("thousand": data kept in thousands) would stack on a
// compact suffix ("142K thousand"), so such values are written out in full ("141,819 thousand").
const MAGNITUDE_LABEL = /^(?:thousands?|millions?|billions?|k|m|mn|bn|000s?)$/i;

/** Whether the format's unit name is itself a magnitude ("thousand"), which no compact suffix may stack on. */
export function hasMagnitudeLabel(fmt: ValueFormat): boolean {
  return fmt.label !== undefined && MAGNITUDE_LABEL.test(fmt.label.trim());
}

export function formatValue(value: number | null, fmt: ValueFormat, opts: FormatOptions = {}): string {
  if (value === null || !Number.isFinite(value)) return NOT_AVAILABLE;
  if (opts.compact && hasMagnitudeLabel(fmt)) opts = { ...opts, compact: false };
  const options = numberOptions(value, fmt, opts);
  const text = withMinus(numberFormat(fmt.locale, options).format(value === 0 ? 0 : value));
  // A no-break space keeps "355 ppm" together on a narrow line.
  return fmt.label && fmt.unit !== 'currency' && fmt.unit !== 'percent' ? `${text}\u00a0${fmt.label}` : text;
}

/**
 * A difference in a metric's own units: a rate or share (unit percent) moves in percentage points
 * ("+1.2 pts", never "+1.2%", which reads as growth of the rate itself); anything else in its unit.
 */
export function formatUnitChange(diff: number | null, fmt: ValueFormat, opts: FormatOptions = {}): string {
  if (fmt.unit !== 'percent') return formatValue(diff, fmt, opts);
  return formatPointChange(diff, fmt.locale, { signed: opts.signed ?? false });
}

/**
 * A change of a fraction in percentage points: 0.021 → "2.1 pts" ("+2.1 pts" signed). One decimal from 0.1 pts up, so a table's column reads alike ("0.7 pts",
 * "1.2 pts"); below that two significant figures ("0.042 pts"), so no move prints as zero. A slope
 * (`slope`) keeps two significant figures below 1 pt, so a monthly rate times twelve still agrees
 * with the yearly one beside it ("0.31 pts a month, 3.7 pts a year"). The one points formatter and
 * its one form, "pts", in KPI tiles, takeaways, captions and chart labels alike (never "pp" or "points").
 */
export function formatPointChange(diff: number | null, locale: string, opts: { signed?: boolean; slope?: boolean } = {}): string {
  if (diff === null || !Number.isFinite(diff)) return NOT_AVAILABLE;
  const pts = diff * 100;
  const size = Math.abs(pts);
  const decimals = size === 0 || size >= (opts.slope ? 1 : 0.1) ? 1 : Math.min(6, 1 - Math.floor(Math.log10(size)));
  const text = formatValue(opts.signed ? pts : size, { unit: 'number', decimals, locale }, { signed: opts.signed ?? false });
  return `${text} ${POINTS}`;
}

/** A relative change as a signed percentage: 0.081 → "+8.1%", −0.05 → "−5.0%". */
export function formatChange(relative: number | null, locale: string): string {
  if (relative === null || !Number.isFinite(relative)) return NOT_AVAILABLE;
  const digits = Math.abs(relative) >= 10 ? 0 : 1;
  const nf = numberFormat(locale, {
    style: 'percent',
    minimumFractionDigits: digits,
    maximumFractionDigits: digits,
    signDisplay: 'exceptZero',
  });
  return withMinus(nf.format(relative === 0 ? 0 : relative));
}

/** A growth rate as people take it in: a large rise as a multiple ("×15", see MULTIPLE_FROM), else a percentage ("−17.1%"). */
export function formatGrowth(relative: number | null, locale: string): string {
  const multiple = growthMultiple(relative);
  return multiple !== null ? formatMultiple(multiple, locale) : formatChange(relative, locale);
}

/** A multiple of a base ("×15", "×3.4"): whole from ten times up, one decimal below. */
export function formatMultiple(ratio: number | null, locale: string): string {
  if (ratio === null || !Number.isFinite(ratio)) return NOT_AVAILABLE;
  const digits = ratio >= 10 ? 0 : 1;
  return `\u00d7${numberFormat(locale, { minimumFractionDigits: digits, maximumFractionDigits: digits }).format(ratio)}`;
}

/**
 * A period label from the ISO date the period starts on. Dates are calendar dates, so they
 * are formatted in UTC: formatting a local midnight would shift them by a day west of UTC.
 */
export function formatPeriod(
  periodIso: string,
  grain: Grain,
  locale: string,
  style: 'short' | 'long' = 'short',
): string {
  const date = parseCalendarDate(periodIso);
  if (date === null) return NOT_AVAILABLE;
  const month = style === 'long' ? 'long' : 'short';
  switch (grain) {
    case 'year':
      return dateFormat(locale, { year: 'numeric' }).format(date);
    case 'quarter': {
      const quarter = Math.floor(date.getUTCMonth() / 3) + 1;
      return `Q${quarter} ${dateFormat(locale, { year: 'numeric' }).format(date)}`;
    }
    case 'month':
      return dateFormat(locale, { month, year: 'numeric' }).format(date);
    case 'week': {
      const day = dateFormat(locale, { day: 'numeric', month, year: 'numeric' }).format(date);
      return style === 'long' ? `week commencing ${day}` : `w/c ${day}`;
    }
    case 'day':
      return dateFormat(locale, { day: 'numeric', month, year: 'numeric' }).format(date);
  }
}

/**
 * A run of days or months from its first to its last (both included), with what the two ends share
 * said once, as the locale writes ranges (Intl's formatRange): "1 Jan – 18 Jun 2025",
 * "16 – 22 Nov 2015", "Jan – Jun 2001"; a run across years keeps both years.
 */
export function formatPeriodRange(firstIso: string, lastIso: string, grain: 'day' | 'month', locale: string): string {
  const [first, last] = [parseCalendarDate(firstIso), parseCalendarDate(lastIso)];
  if (first === null || last === null) return NOT_AVAILABLE;
  const options: Intl.DateTimeFormatOptions = grain === 'day' ? { day: 'numeric', month: 'short', year: 'numeric' } : { month: 'short', year: 'numeric' };
  const df = dateFormat(locale, options);
  return first.getTime() === last.getTime() ? df.format(first) : df.formatRange(first, last);
}

/** Rounds to `digits` significant figures; non-finite values pass through unchanged. */
export function significant(value: number, digits = 3): number {
  if (!Number.isFinite(value) || value === 0) return value === 0 ? 0 : value;
  const d = Math.min(100, Math.max(1, Math.round(digits)));
  const rounded = Number(value.toPrecision(d));
  return rounded === 0 ? 0 : rounded;
}

function numberOptions(value: number, fmt: ValueFormat, opts: FormatOptions): Intl.NumberFormatOptions {
  // 'negative' (ES2023 Intl) keeps a value that rounds to zero from showing as "-0".
  const sign = { signDisplay: opts.signed ? 'exceptZero' : 'negative' } as Intl.NumberFormatOptions;
  const decimals = fmt.decimals === undefined ? undefined : clampDecimals(fmt.decimals);
  if (fmt.unit === 'percent') {
    const d = decimals ?? 1;
    return { ...sign, style: 'percent', minimumFractionDigits: d, maximumFractionDigits: d };
  }
  const currency = fmt.unit === 'currency' ? validCurrency(fmt.currency) : undefined;
  const style: Intl.NumberFormatOptions = currency ? { style: 'currency', currency } : {};
  if (opts.compact) {
    if (decimals !== undefined && Math.abs(value) < 1000 && (value === 0 || Math.abs(value) >= 0.5 * 10 ** -decimals)) {
      return { ...sign, ...style, minimumFractionDigits: decimals, maximumFractionDigits: decimals };
    }
    // A reading keeps its third figure: "+2.00 ppm" beside "+2.91 ppm", never "+2 ppm" (one rule of
    // three significant figures, so a caption's figure and its chart label print alike).
    const zeros = fmt.unit === 'number' && decimals === undefined && value !== 0 && Math.abs(value) < 1000 ? { minimumSignificantDigits: smallFigures(value) } : {};
    return { ...sign, ...style, notation: 'compact', maximumSignificantDigits: smallFigures(value), ...zeros };
  }
  // A rate, and a plain number with no decimals of its own, keep three significant figures below
  // 100 ("0.417", "2.00", "12.3"; two below 0.1, "0.042") and whole units from 100 ("355", "11,999").
  if (((opts.rate || fmt.rate) && !currency) || fmt.unit === 'number') {
    if (decimals === undefined) return { ...sign, ...style, ...significantFigures(value) };
  }
  let d: { min: number; max: number };
  if (decimals !== undefined) d = { min: decimals, max: decimals };
  else if (fmt.unit === 'count') d = { min: 0, max: 0 };
  // Cents matter on a fare, not on a month's revenue.
  else if (fmt.unit === 'currency') d = Math.abs(value) < 1000 ? { min: 2, max: 2 } : { min: 0, max: 0 };
  else d = { min: 0, max: 2 };
  return { ...sign, ...style, minimumFractionDigits: d.min, maximumFractionDigits: d.max };
}

/**
 * The one significant-figures rule: three figures, trailing zeros kept, below 100; whole units from
 * 100; two below 0.1 (SMALL_BELOW), so a value near zero reads "−0.023 min", not "−0.0228 min":
 * a third figure there is past any metric's precision.
 */
function significantFigures(value: number): Intl.NumberFormatOptions {
  if (value === 0) return { maximumFractionDigits: 0 };
  const figures = smallFigures(value);
  return Math.abs(value) >= 100 ? { maximumFractionDigits: 0 } : { minimumSignificantDigits: figures, maximumSignificantDigits: figures };
}

/** Below this magnitude a plain number keeps two significant figures instead of three. */
const SMALL_BELOW = 0.1;

function smallFigures(value: number): number {
  return value !== 0 && Math.abs(value) < SMALL_BELOW ? 2 : 3;
}

function clampDecimals(decimals: number): number {
  return Number.isFinite(decimals) ? Math.min(6, Math.max(0, Math.round(decimals))) : 0;
}

function validCurrency(code: string | undefined): string | undefined {
  if (code === undefined) return undefined;
  try {
    new Intl.NumberFormat(FALLBACK_LOCALE, { style: 'currency', currency: code });
    return code.toUpperCase();
  } catch {
    return undefined;
  }
}

function withMinus(text: string): string {
  return text.replace(/-/g, MINUS);
}

// Building an Intl formatter costs far more than using one; charts format hundreds of ticks.
const numberFormats = new Map<string, Intl.NumberFormat>();
const dateFormats = new Map<string, Intl.DateTimeFormat>();

function numberFormat(locale: string, options: Intl.NumberFormatOptions): Intl.NumberFormat {
  const key = `${locale}|${JSON.stringify(options)}`;
  let nf = numberFormats.get(key);
  if (!nf) {
    try {
      nf = new Intl.NumberFormat(locale, options);
    } catch {
      nf = new Intl.NumberFormat(FALLBACK_LOCALE, options);
    }
    numberFormats.set(key, nf);
  }
  return nf;
}

/** A day within its year, without the year: "18 June"; `month` alone gives "January". */
export function formatDayOfYear(iso: string, locale: string, part: 'day' | 'month' = 'day'): string {
  const date = parseCalendarDate(iso);
  if (date === null) return NOT_AVAILABLE;
  return dateFormat(locale, part === 'day' ? { day: 'numeric', month: 'long' } : { month: 'long' }).format(date);
}

function dateFormat(locale: string, options: Intl.DateTimeFormatOptions): Intl.DateTimeFormat {
  const key = `${locale}|${JSON.stringify(options)}`;
  let df = dateFormats.get(key);
  if (!df) {
    const utc = { ...options, timeZone: 'UTC' };
    try {
      df = new Intl.DateTimeFormat(locale, utc);
    } catch {
      df = new Intl.DateTimeFormat(FALLBACK_LOCALE, utc);
    }
    dateFormats.set(key, df);
  }
  return df;
}

/** 'YYYY-MM-DD' (a time suffix is tolerated and ignored) → UTC midnight; null when not a real date. */
function parseCalendarDate(iso: string): Date | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})(?:$|[T ])/.exec(iso);
  if (!m) return null;
  const year = Number(m[1]);
  const month = Number(m[2]);
  const day = Number(m[3]);
  if (year < 1 || month < 1 || month > 12 || day < 1) return null;
  const date = new Date(0);
  date.setUTCFullYear(year, month - 1, day);
  if (date.getUTCMonth() !== month - 1 || date.getUTCDate() !== day) return null;
  return date;
}
