// The words of each time grain, in one place: how a grain is labelled in a plan, a caption or a
// chart, and how a request writes it ("monthly", "by month", "month by month").
import type { StampGranularity } from './stamps.js';
import { GRAINS, type Grain } from './types.js';

/** How a grain is written when read: "monthly", "by month", "per month", "month by month", "each month". */
export const GRAIN_WORDS: Record<Grain, { adjective: string; noun: string; plural: string; extra: string[] }> = {
  day: { adjective: 'daily', noun: 'day', plural: 'days', extra: ['day by day', 'day-by-day', 'day on day', 'dod'] },
  week: { adjective: 'weekly', noun: 'week', plural: 'weeks', extra: ['week by week', 'week-by-week', 'week on week', 'week-on-week', 'week over week', 'wow', 'wk'] },
  month: { adjective: 'monthly', noun: 'month', plural: 'months', extra: ['month by month', 'month-by-month', 'month on month', 'month-on-month', 'month over month', 'mom', 'monthwise'] },
  quarter: { adjective: 'quarterly', noun: 'quarter', plural: 'quarters', extra: ['quarter by quarter', 'quarter-by-quarter', 'quarter on quarter', 'quarter-on-quarter', 'qoq', 'qtr', 'qtrly'] },
  year: { adjective: 'yearly', noun: 'year', plural: 'years', extra: ['annual', 'annually', 'year by year', 'year-by-year', 'per annum'] },
};

/** "monthly", "Monthly". */
export function grainAdjective(g: Grain, capital = false): string {
  const a = GRAIN_WORDS[g].adjective;
  return capital ? a.charAt(0).toUpperCase() + a.slice(1) : a;
}

/** The finest grain data stamped this often can show: data stamped monthly has no daily or weekly figures. */
export function finestGrain(stamps: StampGranularity | undefined): Grain {
  switch (stamps) {
    case 'weekly':
      return 'week';
    case 'monthly':
      return 'month';
    case 'quarterly':
      return 'quarter';
    case 'yearly':
      return 'year';
    default:
      return 'day';
  }
}

/** Whether grain `a` is finer than `b` (day < week < month < quarter < year). */
export function isFinerGrain(a: Grain, b: Grain): boolean {
  return GRAINS.indexOf(a) < GRAINS.indexOf(b);
}
