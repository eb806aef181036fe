// The words a plan line is built from, worked out once from a sub-question and its catalog, so
// each sub-question's description is one sentence over them.
import type { DatasetConfig } from '../../config/schema.js';
import { formatPeriod } from '../format.js';
import { addDays, addMonths } from '../periods.js';
import type { Grain, SubQuestion } from '../types.js';

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
}

const GRAIN_ADJECTIVE: Record<Grain, string> = { day: 'daily', week: 'weekly', month: 'monthly', quarter: 'quarterly', year: 'yearly' };

export function planWords(sq: SubQuestion, ds: DatasetConfig, locale: string): PlanWords {
  const label = (m: string) => ds.metrics.find((x) => x.name === m)?.label ?? m;
  const group = ds.comparison_groups.find((g) => g.name === sq.comparisonGroup);
  return {
    metric: listJoin(sq.metrics.map(label)).toLowerCase(),
    dim: (sq.dimension ? ds.dimensions.find((d) => d.name === sq.dimension)?.label ?? sq.dimension : '').toLowerCase(),
    span: `${formatPeriod(sq.window.start, 'month', locale, 'long')} to ${formatPeriod(addDays(sq.window.end, -1), 'month', locale, 'long')}`,
    grain: GRAIN_ADJECTIVE[sq.grain],
    vs: group ? `${group.members_label.toLowerCase()} vs ${group.others_label.toLowerCase()}` : '',
    groupLabel: group?.label ?? '',
  };
}

import { capitalise, listJoin } from '../captions/grammar.js';
export { capitalise };

/** A window a year-earlier comparison would overlap. */
export function longerThanAYear(w: { start: string; end: string }): boolean {
  return addMonths(w.start, 12) < w.end;
}
