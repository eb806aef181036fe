// The words a plan line is built from, worked out once from a sub-question and its catalog, so
// each sub-question's description is one sentence over them.
import type { DatasetConfig } from '../../config/schema.js';
import { formatPeriod } from '../format.js';
import { grainAdjective } from '../grains.js';
import { addDays, addMonths } from '../periods.js';
import type { SubQuestion } from '../types.js';
import { describeWindow } from '../window-words.js';

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
}


export function planWords(sq: SubQuestion, ds: DatasetConfig, locale: string): PlanWords {
  const label = (m: string) => ds.metrics.find((x) => x.name === m)?.label ?? m;
  const group = ds.comparison_groups.find((g) => g.name === sq.comparisonGroup);
  return {
    metric: listJoin(sq.metrics.map(label)).toLowerCase(),
    dim: (sq.dimension ? ds.dimensions.find((d) => d.name === sq.dimension)?.label ?? sq.dimension : '').toLowerCase(),
    span: spanWords(sq, locale),
    grain: grainAdjective(sq.grain),
    vs: group ? `${group.members_label.toLowerCase()} vs ${group.others_label.toLowerCase()}` : '',
    groupLabel: group?.label ?? '',
    base: sq.compareWindow ? describeWindow(sq.compareWindow, { firstDate: null, lastDate: null, rows: 0 }, locale) : 'a year earlier',
  };
}

/** Whole months read as months ("January 2022 to June 2025"); anything else as its days ("1 June to 18 June 2025"). */
function spanWords(sq: SubQuestion, locale: string): string {
  const w = sq.window;
  if (w.start.endsWith('-01') && w.end.endsWith('-01')) return `${formatPeriod(w.start, 'month', locale, 'long')} to ${formatPeriod(addDays(w.end, -1), 'month', locale, 'long')}`;
  return describeWindow(w, { firstDate: null, lastDate: null, rows: 0 }, locale);
}

import { capitalise, listJoin } from '../captions/grammar.js';
export { capitalise };

/** A window a year-earlier comparison would overlap. */
export function longerThanAYear(w: { start: string; end: string }): boolean {
  return addMonths(w.start, 12) < w.end;
}
