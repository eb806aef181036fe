// Small wording helpers the trend-family captions share: p-values, indices, counts in words,
// month and weekday names, segment labels and plural dimension nouns.
import type { Dimension } from '../../config/schema.js';
import { formatValue } from '../format.js';
import type { Grain } from '../types.js';

const NUMBER_WORDS = ['zero', 'one', 'two', 'three', 'four', 'five', 'six', 'seven', 'eight', 'nine', 'ten'];

/** "two", "eleven" → "11": whole numbers up to ten in words, larger ones as digits. */
export function countWord(n: number, locale: string): string {
  return Number.isInteger(n) && n >= 0 && n < NUMBER_WORDS.length ? NUMBER_WORDS[n]! : formatValue(n, { unit: 'count', locale });
}

import { capitalise, inSentence, pluralNoun } from './grammar.js';
export { capitalise };

/** A p-value with three decimals, or "< 0.001" below that. */
export function formatP(p: number, locale: string): string {
  if (!Number.isFinite(p)) return 'n/a';
  if (p < 0.001) return `< ${formatValue(0.001, { unit: 'number', decimals: 3, locale })}`;
  return `= ${formatValue(p, { unit: 'number', decimals: 3, locale })}`;
}

/** An index such as a seasonal index or Kendall's tau, two decimals. */
export function formatIndex(v: number | null, locale: string): string {
  return formatValue(v, { unit: 'number', decimals: 2, locale });
}

/** A share 0–1 as a whole percentage ("71%"), or with one decimal when `precise`. */
export function formatShare(v: number | null, locale: string, precise = false): string {
  return formatValue(v, { unit: 'percent', decimals: precise ? 1 : 0, locale });
}

const GRAIN_NOUN: Record<Grain, string> = { day: 'day', week: 'week', month: 'month', quarter: 'quarter', year: 'year' };

export function grainNoun(grain: Grain, count = 1): string {
  return count === 1 ? GRAIN_NOUN[grain] : `${GRAIN_NOUN[grain]}s`;
}

/** Full month name in the locale, 1 = January. */
export function monthName(month: number, locale: string): string {
  return safeFormat(locale, { month: 'long' }, new Date(Date.UTC(2001, month - 1, 1)));
}

/** Full weekday name in the locale, ISO numbering (1 = Monday). 2001-01-01 was a Monday. */
export function weekdayName(isoDay: number, locale: string): string {
  return safeFormat(locale, { weekday: 'long' }, new Date(Date.UTC(2001, 0, isoDay)));
}

/** Two months in the order a reader expects: calendar order, but December before January. */
export function monthPair(a: number, b: number, locale: string): string {
  const [x, y] = (a === 12 && b === 1) || (a === 1 && b === 12) ? [12, 1] : a <= b ? [a, b] : [b, a];
  return `${monthName(x, locale)} and ${monthName(y, locale)}`;
}

/** A segment key as text: the missing-value segment and the fold get their own words. */
export function segmentLabel(key: { segment: string | null; other: boolean; members: number }): string {
  if (key.other) return `All others (${key.members})`;
  return key.segment === null ? '(not recorded)' : key.segment;
}

/**
 * The dimension's label as a lower-case plural noun: "Route" → "routes", "Fare class" →
 * "fare classes"; a first word with inner capitals (a brand) keeps its case.
 */
export function dimensionPlural(dim: Pick<Dimension, 'label'>): string {
  // One plural rule for every caption (grammar.ts): "species" stays, "phase of flight" → "phases of flight".
  return pluralNoun(inSentence(dim.label));
}


/** "about 16%" style: a relative amount without its sign, whole percent from 10%, one decimal below. */
export function formatRelativeSize(relative: number, locale: string): string {
  const abs = Math.abs(relative);
  return formatValue(abs, { unit: 'percent', decimals: abs >= 0.1 ? 0 : 1, locale });
}

function safeFormat(locale: string, options: Intl.DateTimeFormatOptions, date: Date): string {
  try {
    return new Intl.DateTimeFormat(locale, { ...options, timeZone: 'UTC' }).format(date);
  } catch {
    return new Intl.DateTimeFormat('en', { ...options, timeZone: 'UTC' }).format(date);
  }
}
