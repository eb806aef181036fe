// Words shared by the growth family's titles and captions: how a change reads, how a span of
// dates reads, how a segment is named, and the growth family's own caveat notes.
import type { DatasetConfig, Metric } from '../../config/schema.js';
import type { GrowthSeriesFinding, GrowthSpan } from '../findings/growth.js';
import { changesInUnits } from '../catalog.js';
import { formatChange, formatPeriod, formatPeriodRange, formatPointChange, formatUnitChange, formatValue, valueFormatOf, type ValueFormat } from '../format.js';
import { addDays, addMonths } from '../periods.js';
import { TINY_BASE_FRACTION } from '../stats/index.js';
import type { Answer, Audience, Caveat, Grain } from '../types.js';
import { caveatNote } from './caveat-text.js';
import { listJoin, nounFor, pluralNoun } from './grammar.js';

/** Changes smaller than this read as "held flat" in plain words (a rule of thumb; the number is still given). */
export const FLAT_BAND = 0.01;

export type Direction = 'up' | 'down' | 'flat' | 'none';

export function directionOf(relative: number | null): Direction {
  if (relative === null || !Number.isFinite(relative)) return 'none';
  if (Math.abs(relative) < FLAT_BAND) return 'flat';
  return relative > 0 ? 'up' : 'down';
}

/** "grew 8.1%", "fell 5.0%", "held flat"; "changed by an unknown amount" when undefined. */
export function movedBy(relative: number | null, locale: string): string {
  switch (directionOf(relative)) {
    case 'up':
      return `grew ${unsignedPercent(relative!, locale)}`;
    case 'down':
      return `fell ${unsignedPercent(relative!, locale)}`;
    case 'flat':
      return 'held flat';
    case 'none':
      return 'has no comparable base';
  }
}

/** "8.1%" without a sign, the magnitude of a relative change. */
export function unsignedPercent(relative: number, locale: string): string {
  return formatChange(Math.abs(relative), locale).replace(/^[+\u2212]/, '');
}

/** A fraction difference in percentage points, signed: 0.021 → "+2.1 pts" (see formatPointChange). */
export function formatPoints(diff: number | null, locale: string): string {
  return formatPointChange(diff, locale, { signed: true });
}

/** A move of a rate in points, unsigned: a slope of 0.00042 a month is "0.042 pts", never "0.0 pts". */
export function formatSmallPoints(diff: number, locale: string): string {
  return formatPointChange(diff, locale, { slope: true });
}

/** A share (0–1) as a percentage with one decimal: "40.0%". */
export function formatShare(share: number | null, locale: string): string {
  return formatValue(share, { unit: 'percent', decimals: 1, locale });
}

/** A metric's value; signed, a change in its units (a rate's in points: see formatUnitChange). */
export function valueText(value: number | null, metric: Metric, locale: string, signed = false): string {
  return signed ? formatUnitChange(value, valueFormatOf(metric, locale), { compact: true, signed }) : formatValue(value, valueFormatOf(metric, locale), { compact: true });
}

export function yearText(iso: string, locale: string): string {
  return formatPeriod(iso, 'year', locale);
}

export function periodText(iso: string, grain: Grain, locale: string, style: 'short' | 'long' = 'short'): string {
  return formatPeriod(iso, grain, locale, style);
}

/** A half-open span of dates in words: "2024", "Jun 2024 to Aug 2024", "1 Jun 2025 to 18 Jun 2025". */
export function spanText(span: GrowthSpan, locale: string): string {
  const last = addDays(span.end, -1);
  if (span.start >= span.end) return 'no dates';
  if (span.start.slice(5) === '01-01' && span.end.slice(5) === '01-01') {
    const from = formatPeriod(span.start, 'year', locale);
    const to = formatPeriod(last, 'year', locale);
    return from === to ? from : `${from} to ${to}`;
  }
  // Ends that share a year (or a month) say it once: "1 Jan – 18 Jun 2025" reads inside "from … to …".
  if (span.start.slice(8) === '01' && span.end.slice(8) === '01') {
    // A calendar quarter is named as one ("Q1 2001"), as the quarter grain names it.
    if (['01', '04', '07', '10'].includes(span.start.slice(5, 7)) && addMonths(span.start, 3) === span.end) return formatPeriod(span.start, 'quarter', locale);
    return formatPeriodRange(span.start, addMonths(span.end, -1), 'month', locale);
  }
  return formatPeriodRange(span.start, last, 'day', locale);
}

/** A segment's display name: booleans of a comparison group's column read as its labels; a missing value as "(not recorded)". */
export function segmentText(segment: string | null, dimensionName: string, dataset: DatasetConfig): string {
  if (segment === null) return '(not recorded)';
  const dim = dataset.dimensions.find((d) => d.name === dimensionName);
  if (segment === 'true' || segment === 'false') {
    const group = dataset.comparison_groups.find((g) => g.column === dim?.column);
    if (group) return segment === 'true' ? group.members_label : group.others_label;
    return segment === 'true' ? 'Yes' : 'No';
  }
  return segment;
}

export function dimensionLabel(dimensionName: string, dataset: DatasetConfig): string {
  return dataset.dimensions.find((d) => d.name === dimensionName)?.label ?? dimensionName;
}

import { capitalise } from './grammar.js';
export { capitalise };

import { inSentence as lower } from './grammar.js';
export { lower };

/** A noun for n of it (n null: the plural). */
export function plural(noun: string, n: number | null = 2): string {
  return n === null ? pluralNoun(noun) : nounFor(n, noun);
}

/**
 * Caveat notes for growth answers: the growth family's own wording where the shared one would
 * mislead (a partial period here is left out of every rate, not drawn dashed), the shared wording otherwise.
 */
export function growthNotes(answer: Answer, locale: string, dataset: DatasetConfig): string[] {
  const dimension = answer.subQuestion.dimension ?? '';
  const opened = answer.caveats.filter((c) => c.code === 'late_segment');
  const gone = answer.caveats.filter((c) => c.code === 'segment_gap' && c.data.window === 'current');
  // Many segments new or gone between the two spans (airports opening through a half-year) make
  // one note each a wall of notes: past a few, one note lists them.
  const grouped = new Set<Caveat>([...(opened.length > GROUP_NOTES_ABOVE ? opened : []), ...(gone.length > GROUP_NOTES_ABOVE ? gone : [])]);
  const notes = answer.caveats.filter((c) => !grouped.has(c)).map((c) => growthNote(c, locale, dimension, dataset));
  if (opened.length > GROUP_NOTES_ABOVE) notes.push(openedNote(opened, locale, dimension, dataset));
  if (gone.length > GROUP_NOTES_ABOVE) notes.push(goneNote(gone, locale, dimension, dataset));
  return [...new Set(notes)];
}

/** Up to this many new-or-gone segments get a note each. */
const GROUP_NOTES_ABOVE = 2;
/** Segments named in a grouped note before "and N more". */
const NAMED_IN_GROUP = 6;

function namedList(names: readonly string[]): string {
  const shown = names.slice(0, NAMED_IN_GROUP);
  return names.length > shown.length ? `${shown.join(', ')} and ${names.length - shown.length} more` : listJoin(shown);
}

/** "4 origin airports have no data in Jan 2001 and count as zero there: MQT (first seen 3 March 2001), AKN and DLG (14 April 2001), …" */
function openedNote(cs: readonly Caveat[], locale: string, dimension: string, dataset: DatasetConfig): string {
  const label = lower(dimensionLabel(dimension, dataset));
  const byDay = new Map<string, string[]>();
  for (const c of [...cs].sort((a, b) => String(a.data.firstPeriod).localeCompare(String(b.data.firstPeriod)))) {
    const day = typeof c.data.firstPeriod === 'string' ? formatPeriod(c.data.firstPeriod, 'day', locale, 'long') : 'a later date';
    byDay.set(day, [...(byDay.get(day) ?? []), String(c.data.segment)]);
  }
  const parts = [...byDay].map(([day, names], i) => `${listJoin(names)} (${i === 0 ? 'first seen ' : ''}${day})`);
  const shown = parts.slice(0, NAMED_IN_GROUP);
  const rest = cs.length - [...byDay.values()].slice(0, NAMED_IN_GROUP).reduce((n, names) => n + names.length, 0);
  return `${cs.length} ${plural(label, cs.length)} have no data ${earlierText(cs[0]!.data, locale)} and count as zero there: ${shown.join(', ')}${rest > 0 ? ` and ${rest} more` : ''}.`;
}

/** "3 origin airports had data in Jan 2001 but none in the window asked for: APF, DRO and EGE." */
function goneNote(cs: readonly Caveat[], locale: string, dimension: string, dataset: DatasetConfig): string {
  const label = lower(dimensionLabel(dimension, dataset));
  return `${cs.length} ${plural(label, cs.length)} had data ${earlierText(cs[0]!.data, locale)} but none in the window asked for: ${namedList(cs.map((c) => String(c.data.segment)))}.`;
}

/**
 * The earlier span a new-or-gone note names: "a year earlier" when it is the same dates a year
 * before (or the caveat does not say), else the span itself ("in February 2015").
 */
function earlierText(d: Caveat['data'], locale: string): string {
  if (d.yearEarlier !== false || typeof d.earlierStart !== 'string' || typeof d.earlierEnd !== 'string') return 'a year earlier';
  return `in ${spanText({ start: d.earlierStart, end: d.earlierEnd }, locale)}`;
}

export function growthNote(c: Caveat, locale: string, dimension: string, dataset: DatasetConfig): string {
  const d = c.data;
  const day = (v: unknown) => (typeof v === 'string' ? formatPeriod(v, 'day', locale, 'long') : 'n/a');
  const seg = (v: unknown) => segmentText(typeof v === 'string' ? v : null, dimension, dataset);
  switch (c.code) {
    case 'partial_period_excluded':
      if (typeof d.period === 'string') {
        const grain = (d.grain as Grain | undefined) ?? 'month';
        return `${capitalise(formatPeriod(d.period, grain, locale, 'long'))} is partial (data from ${day(d.coveredFrom)} to ${day(d.coveredTo)}), so it is left out of every growth rate.`;
      }
      break;
    case 'partial_period':
      if (d.window === 'current') {
        return `Data only covers ${day(d.coveredFrom)} to ${day(d.coveredTo)} of the window asked for, so both years are compared over those same dates.`;
      }
      break;
    case 'no_data':
      if (d.window === 'prior') {
        const span = spanText({ start: String(d.start), end: String(d.end) }, locale);
        return d.yearEarlier === false
          ? `There is no data for the earlier period, ${span}, so there is nothing to compare with.`
          : `There is no data for the same dates a year earlier (${span}), so there is nothing to compare with.`;
      }
      if (d.window === 'current') return 'There is no data in the window asked for, only in the year before.';
      break;
    case 'late_segment':
      return `${seg(d.segment)} has no data ${earlierText(d, locale)}; it first appears on ${day(d.firstPeriod)}, so it counts as zero in the earlier window.`;
    case 'segment_gap':
      if (d.window === 'current') return `${seg(d.segment)} had data ${earlierText(d, locale)} but none in the window asked for.`;
      if (typeof d.periods === 'number' && typeof d.firstGap === 'string') break;
      return `${seg(d.segment)} has no data for part of the window.`;
    case 'series_gap':
      if (typeof d.firstGap === 'string' && typeof d.periods === 'number') {
        const grain = (d.grain as Grain | undefined) ?? 'month';
        if (d.zero === true) return `${d.periods} ${plural(grain, d.periods)} in the window have no rows at all (the first is ${formatPeriod(d.firstGap, grain, locale, 'long')}); between the filter's first and last rows they count as 0.`;
        return `${d.periods} ${plural(grain, d.periods)} in the window have no data at all (the first is ${formatPeriod(d.firstGap, grain, locale, 'long')}); no rate is given next to them.`;
      }
      break;
    case 'base_zero':
      if (d.reason === 'signed_days') return 'This measure reaches zero or goes below it on some days of the data (as a whole or for one breakdown value), so no percentage change of it is given; changes are in its units.';
      if (d.reason === 'signed') return 'This measure reaches zero or goes below it in this window, so no percentage change of it is given; changes are in its units.';
      if (d.reason === 'tiny') return `Some growth rates are left out: the earlier value is zero, missing or under ${baseFractionWords()} of the usual (median) level, where a percentage would mislead.`;
      return 'Some growth rates cannot be worked out because the earlier value is zero, negative or missing, so those rates are left out.';
    case 'single_period':
      if (d.rates === 0) return 'There are no two comparable periods, so there is no growth rate to summarise.';
      if (d.periods === 0) return 'There is no complete period yet, so there is no growth to measure.';
      return 'Only one complete period is available, so there is no growth to measure yet.';
    case 'small_sample':
      return `Only ${d.n} growth rates: read the spread with care.`;
    default:
      break;
  }
  return caveatNote(c, locale);
}

/** Plain-words and analyst wording switch on this; managers get plain words with detail. */
export function isAnalyst(audience: Audience): boolean {
  return audience === 'analysts';
}

/** A level, or a quantity signed in the window asked about, grows in its units, never in percent. */
export function growthInUnits(metric: Metric, series: GrowthSeriesFinding | undefined): boolean {
  // A rate or share moves in points, never in percent of itself (issue: rates and shares move in points).
  return changesInUnits(metric) || metric.unit === 'percent' || series?.inUnits === true;
}

/** The tiny-base cut-off in words, not as a percentage figure a reader would look for in the table ("a tenth"). */
function baseFractionWords(): string {
  const parts: Record<number, string> = { 2: 'half', 4: 'a quarter', 5: 'a fifth', 10: 'a tenth', 20: 'a twentieth' };
  return parts[Math.round(1 / TINY_BASE_FRACTION)] ?? `${TINY_BASE_FRACTION * 100} per cent`;
}
