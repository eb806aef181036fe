// The words a plan line is built from, worked out once from a sub-question and its catalog, so
// each sub-question's description is one sentence over them.
import type { DatasetConfig } from '../../config/schema.js';
import { formatPeriod } from '../format.js';
import { grainAdjective } from '../grains.js';
import { addDays, addMonths } from '../periods.js';
import type { SubQuestion } from '../types.js';
import { describeWindow } from '../window-words.js';
import { spanEnds } from '../templates/span-ends.js';

export interface PlanWords {
  /** The metric labels, lower case, as a list: "revenue", "revenue and bookings", "revenue, bookings and average fare". */
  metric: string;
  /** The breakdown dimension's label, lower case ('' when none). */
  dim: string;
  /** "January 2022 to June 2025". */
  span: string;
  /** "monthly". */
  grain: string;
  /** "pass holders vs other customers" ('' without a comparison group). */
  vs: string;
  /** The comparison group's label ('' without one). */
  groupLabel: string;
  /** What the window is compared with: "a year earlier", or the period the request named. */
  base: string;
  /**
   * "since 2001": the stretch's two ends, as compared ("the first whole year of January 2001 to
   * December 2017 against the last"); '' when the request named no such stretch.
   */
  ends: string;
  /** Every metric adds up over time (bookings, revenue): its highs and lows read as busy and quiet; a reading or a rate's as high and low. */
  flow: boolean;
  /** The verb agreeing with the measures: "bookings are", "revenue is". */
  is: 'is' | 'are';
  /** What one unit of the comparison group is called ("customer"; "unit" without a distinct count of it). */
  unit: string;
}


export function planWords(sq: SubQuestion, ds: DatasetConfig, locale: string): PlanWords {
  const label = (m: string) => ds.metrics.find((x) => x.name === m)?.label ?? m;
  const group = ds.comparison_groups.find((g) => g.name === sq.comparisonGroup);
  return {
    metric: listJoin(sq.metrics.map((m) => inSentence(label(m)))),
    dim: inSentence(sq.dimension ? ds.dimensions.find((d) => d.name === sq.dimension)?.label ?? sq.dimension : ''),
    span: spanWords(sq, locale),
    grain: grainAdjective(sq.grain),
    vs: group ? `${inSentence(group.members_label)} vs ${inSentence(group.others_label)}` : '',
    groupLabel: group?.label ?? '',
    base: sq.compareWindow ? windowWords(sq.compareWindow, locale) : 'a year earlier',
    ends: endsWords(sq, locale),
    is: sq.metrics.length > 1 ? 'are' : (verbFor(label(sq.metrics[0] ?? '')) as 'is' | 'are'),
    unit: group ? unitNoun(ds, group).singular : 'unit',
    flow: sq.metrics.every((m) => { const metric = ds.metrics.find((x) => x.name === m); return !metric || quantityKind(metric) === 'flow'; }),
  };
}

function endsWords(sq: SubQuestion, locale: string): string {
  if (!sq.spanEnds || sq.compareWindow || !spanEnds(sq.window, sq.spanEnds, undefined)) return '';
  return `the first whole ${sq.spanEnds} of ${spanWords(sq, locale)} against the last`;
}

/** Whole months read as months ("January 2022 to June 2025"); anything else as its days ("1 June to 18 June 2025"). */
function spanWords(sq: SubQuestion, locale: string): string {
  return windowWords(sq.window, locale);
}

function windowWords(w: SubQuestion['window'], locale: string): string {
  if (w.start.endsWith('-01') && w.end.endsWith('-01')) return `${formatPeriod(w.start, 'month', locale, 'long')} to ${formatPeriod(addDays(w.end, -1), 'month', locale, 'long')}`;
  return describeWindow(w, { firstDate: null, lastDate: null, rows: 0 }, locale);
}

import { capitalise, inSentence, listJoin, verbFor } from '../captions/grammar.js';
import { unitNoun } from '../captions/performance-words.js';
import { quantityKind } from '../catalog.js';
export { capitalise };

/** A window a year-earlier comparison would overlap. */
export function longerThanAYear(w: { start: string; end: string }): boolean {
  return addMonths(w.start, 12) < w.end;
}
