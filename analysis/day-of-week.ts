// Days of the week as a filter ("on Fridays", "weekend orders", "business days"): the one place
// the concept is defined. A day set rides in a sub-question's filters like any other segment
// filter, under a dimension name no catalog can hold (catalog names are plain identifiers), so it
// reaches every statement, title, caption and subtitle the other filters reach. Its values are
// ISO day numbers (1 = Monday ... 7 = Sunday) of the time column's local date in the dataset's
// time zone.
import type { SegmentFilter } from './types.js';

/** The filter's dimension: never a catalog name (those match /^[A-Za-z_][A-Za-z0-9_]*$/). */
export const DAY_OF_WEEK = '@day_of_week';

const DAY_NAMES = ['Monday', 'Tuesday', 'Wednesday', 'Thursday', 'Friday', 'Saturday', 'Sunday'] as const;

export const WEEKEND: readonly number[] = [6, 7];
export const WORKING_WEEK: readonly number[] = [1, 2, 3, 4, 5];

export function isDayFilter(f: Pick<SegmentFilter, 'dimension'>): boolean {
  return f.dimension === DAY_OF_WEEK;
}

/** The ISO days a filter keeps (an excluding filter keeps the others), sorted, without repeats. */
export function daysKept(f: SegmentFilter): number[] {
  const named = new Set(f.values.map(Number).filter((d) => Number.isInteger(d) && d >= 1 && d <= 7));
  return [1, 2, 3, 4, 5, 6, 7].filter((d) => (f.exclude ? !named.has(d) : named.has(d)));
}

export function dayFilter(days: readonly number[]): SegmentFilter {
  return { dimension: DAY_OF_WEEK, values: [...new Set(days)].sort((a, b) => a - b) };
}

/** "Fridays", "weekends", "weekdays", "Tuesdays to Thursdays", "Mondays and Fridays". */
export function daySetWords(days: readonly number[]): string {
  const set = [...new Set(days)].sort((a, b) => a - b);
  const key = set.join(',');
  if (key === WEEKEND.join(',')) return 'weekends';
  if (key === WORKING_WEEK.join(',')) return 'weekdays';
  if (set.length === 7) return 'every day';
  const plural = set.map((d) => `${DAY_NAMES[d - 1]}s`);
  const run = set.length >= 3 && set[set.length - 1]! - set[0]! === set.length - 1;
  if (run) return `${plural[0]} to ${plural[plural.length - 1]}`;
  if (plural.length <= 2) return plural.join(' and ');
  return `${plural.slice(0, -1).join(', ')} and ${plural[plural.length - 1]}`;
}

/** "Fridays only", "weekends only" (as said after a title, at the head of a caption, under a chart). */
export function dayScopeWords(f: SegmentFilter): string {
  const days = daysKept(f);
  return days.length === 0 ? 'no day of the week' : `${daySetWords(days)} only`;
}

/** How the day-of-week "dimension" is named where a catalog dimension's label would be. */
export const DAY_OF_WEEK_LABEL = 'Days of the week';

/** A day set as a contrast keeps it ("6,7"): its words ("weekends"). */
export function daySetValueWords(value: string): string {
  return daySetWords(value.split(',').map(Number));
}
