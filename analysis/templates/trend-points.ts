// Small helpers the trend and segment templates share: the window the data actually covers,
// which of its periods are partial, and the complete points of a series.
import type { Coverage } from '../coverage.js';
import { dataEnd as coveredEnd } from '../coverage.js';
import { addDays, nextPeriod, parseIsoDate, periodsBetween, periodsPerYear } from '../periods.js';
import type { Metric } from '../../config/schema.js';
import { percentsApplyTo } from '../catalog.js';
import { seasonalIndices, type SeasonalModel } from '../stats/index.js';
import type { DateWindow, Finding, Grain, PeriodPoint, ResultTable } from '../types.js';

export const EMPTY_TABLE: ResultTable = { columns: [], rows: [], truncated: false };

/** The asked window cut to the dates the data covers; null when they do not overlap. */
export function coveredWindow(window: DateWindow, coverage: Coverage): DateWindow | null {
  if (coverage.firstDate === null || coverage.lastDate === null) return null;
  const start = window.start > coverage.firstDate ? window.start : coverage.firstDate;
  const dataEnd = coveredEnd({ ...coverage, lastDate: coverage.lastDate });
  const end = window.end < dataEnd ? window.end : dataEnd;
  return start < end ? { start, end } : null;
}

/** Period starts over a covered window, with the first and last marked partial when the window cuts them. */
export function windowPeriods(covered: DateWindow, grain: Grain): { starts: string[]; partial: Set<string> } {
  const starts = periodsBetween(covered.start, covered.end, grain);
  const partial = new Set<string>();
  const first = starts[0];
  const last = starts[starts.length - 1];
  if (first !== undefined && first < covered.start) partial.add(first);
  if (last !== undefined && nextPeriod(last, grain) > covered.end) partial.add(last);
  return { starts, partial };
}

export interface IndexedValue {
  /** Position in the series' points, so a gap keeps its spacing in slopes. */
  index: number;
  period: string;
  value: number;
}

/** Points that are neither partial nor missing, with their positions. */
export function completePoints(points: readonly PeriodPoint[]): IndexedValue[] {
  const out: IndexedValue[] = [];
  points.forEach((p, index) => {
    if (!p.partial && typeof p.value === 'number' && Number.isFinite(p.value)) out.push({ index, period: p.period, value: p.value });
  });
  return out;
}

/** Periods in a year at a grain; a day-grain year counts its mean length in the Gregorian calendar. */
export function periodsInYear(grain: Grain): number {
  return periodsPerYear(grain) ?? 365.2425;
}

/**
 * Two years are the fewest from which a yearly season can be estimated (two of each month); over
 * fewer periods than that a rise or fall cannot be told from the season, whatever its p-value.
 */
export function seasonUnresolvedOver(grain: Grain, spannedPeriods: number): boolean {
  return grain !== 'year' && spannedPeriods < 2 * periodsInYear(grain) - 1e-9;
}

/**
 * Whether a yearly rate relative to the level means anything for these complete values: every one
 * is above zero (a percentage of a level that touches or crosses zero has no base: an average delay
 * of 0.4 min rising 1 min a year would be "+250% a year"), and they span a whole year or more (a
 * quarter's slope times four is no year's growth), on a metric the one rule allows percentages of
 * (catalog.ts metricPercentScale: never a temperature). Otherwise the change is said in the metric's
 * units per period.
 */
export function relativeYearlyRateApplies(metric: Metric, values: readonly number[], grain: Grain): boolean {
  return spansAYear(values.length, grain) && percentsApplyTo(metric, values, false);
}

/** Whether `periods` complete periods make a year or more: a slope over fewer is said per period, never "a year". */
export function spansAYear(periods: number, grain: Grain): boolean {
  return periods >= periodsInYear(grain) - 1e-9;
}

export function mean(values: readonly number[]): number | null {
  if (values.length === 0) return null;
  return values.reduce((a, b) => a + b, 0) / values.length;
}

export function numberOrNull(v: unknown): number | null {
  return typeof v === 'number' && Number.isFinite(v) ? v : null;
}

export function seriesFinding(findings: readonly Finding[], metric: string): Extract<Finding, { type: 'series' }> | undefined {
  return findings.find((f): f is Extract<Finding, { type: 'series' }> => f.type === 'series' && f.metric === metric);
}

export function isoYear(period: string): number {
  return Number(period.slice(0, 4));
}

export function isoMonth(period: string): number {
  return Number(period.slice(5, 7));
}

/** The cycle a grain repeats over, where its seasons are calendar positions (months of a year, quarters, weekdays). */
const SEASONAL_PERIOD: Partial<Record<Grain, number>> = { month: 12, quarter: 4, day: 7 };

/**
 * Mann–Kendall and Sen's slope assume no seasonal cycle; a strong one (July at 1.7 times
 * January) buries a modest trend in noise, and a series that starts at a peak looks like a fall.
 * With two full cycles or more, each complete value is divided by its season's classical
 * multiplicative index (the same indices trend_seasonality reports), or for a level has its
 * season's additive deviation taken off; with fewer, or when the
 * indices are undefined, null tells the caller to use the raw values.
 */
export function seasonallyAdjusted(
  grain: Grain,
  points: readonly PeriodPoint[],
  complete: readonly IndexedValue[],
  model: SeasonalModel = 'multiplicative',
): number[] | null {
  const period = SEASONAL_PERIOD[grain];
  if (period === undefined || complete.length === 0) return null;
  const first = complete[0]!.index;
  const last = complete[complete.length - 1]!.index;
  const span = points.slice(first, last + 1);
  const season = (p: PeriodPoint) => seasonOf(p.period, grain);
  const result = seasonalIndices(
    span.map((p) => ({ season: season(p), value: p.partial ? null : p.value })),
    period,
    model,
  );
  if (result.kind !== 'ok') return null;
  const index = (c: IndexedValue) => result.indices[season(points[c.index]!) - 1]!;
  if (model === 'additive') return complete.map((c) => c.value - index(c));
  if (result.indices.some((v) => !(v > 0))) return null;
  return complete.map((c) => c.value / index(c));
}

function seasonOf(period: string, grain: Grain): number {
  if (grain === 'month') return isoMonth(period);
  if (grain === 'quarter') return Math.floor((isoMonth(period) - 1) / 3) + 1;
  // Day grain: ISO weekday, Monday = 1.
  return ((parseIsoDate(period).getUTCDay() + 6) % 7) + 1;
}
