// Findings of a value-against-value comparison ("did phone grow faster than kiosk"): the two
// values of one dimension, each in the span asked about and the span it is compared with, their
// growth, the gap between them, and the tests the data allows. Numbers and ISO dates only.
import type { MetricKind } from '../../config/schema.js';
import type { DifferenceShift, LogShift } from '../stats/log-shift.js';
import type { ChangeBasis } from './table.js';
import type { DateWindow, Grain, PeriodPoint, SpanEndsUnit } from '../types.js';
import type { DifferenceTest, NoTestReason } from './performance.js';

export interface ContrastSide {
  /** The dimension's value, as text. */
  value: string;
  /** The metric over the span asked about and over the span it is compared with. */
  current: number | null;
  prior: number | null;
  /** current / prior − 1 (null on a missing or non-positive base, or where no percentage of the metric applies: `basis`). */
  growth: number | null;
  /** current − prior, in the metric's units (points for a rate). */
  change: number | null;
  rowsCurrent: number;
  rowsPrior: number;
  /** Fewer rows than the dataset's minimum group size: its numbers are withheld. */
  suppressed: boolean;
}

/** One value's total per day of each span, and the change per day (null on a missing or non-positive base). */
export interface PerDaySide {
  current: number | null;
  prior: number | null;
  growth: number | null;
}

export interface ValueCompareFinding {
  type: 'value_compare';
  metric: string;
  dimension: string;
  /** How the metric adds up: growth of a flow is a percentage, of a rate a change in points. */
  metricKind: MetricKind;
  /**
   * How each value's change and the gap between them are stated (catalog.ts changeBasisOf, the one
   * rule): percent for a flow, points for a rate, units for a temperature or a metric whose values
   * reach or cross zero (an average delay). Absent in findings written before it: percent.
   */
  basis?: ChangeBasis;
  current: DateWindow;
  prior: DateWindow;
  /**
   * The compared span is the one the request named, the same dates a year earlier, or (`span_ends`,
   * "since 2001") the first whole period of the stretch asked about, set against its last.
   */
  priorBasis: 'asked' | 'year_earlier' | 'span_ends';
  /** With `span_ends`: the unit of the two periods compared. */
  spanUnit?: SpanEndsUnit;
  first: ContrastSide;
  second: ContrastSide;
  /**
   * The two spans' lengths in days when they differ (a 29-day February against a 31-day January):
   * a flow's totals then differ by the days alone, so each value is also given per day.
   */
  lengths: { current: number; prior: number; perDay: { first: PerDaySide; second: PerDaySide } | null } | null;
  /** first − second over the span asked about, and over the span compared with. */
  gapCurrent: number | null;
  gapPrior: number | null;
  /** first's growth − second's growth (a fraction: 0.089 is 8.9 points). */
  growthGap: number | null;
  /** The first value's change minus the second's, in the metric's units (a rate's in points). */
  changeGap?: number | null;
  /**
   * The ratio first / second, current against prior: how much faster first grew than second, as a
   * relative change, tested over per-period log ratios (analysis/stats/log-shift.ts).
   */
  relativeGrowth: (LogShift & { periods: Grain }) | null;
  /**
   * With `basis` units or points: first − second, current against prior, as a difference in the
   * metric's units, tested over per-period differences (analysis/stats/log-shift.ts differenceShift).
   */
  gapShift?: (DifferenceShift & { periods: Grain }) | null;
  /** Why there is no growth test, when there is none. */
  noGrowthTest: 'too_few_periods' | 'not_positive' | 'not_poolable' | 'missing_side' | null;
  /** first against second over the span asked about, for a mean, share or ratio (none for a flow). */
  level: DifferenceTest | null;
  noLevelTest: NoTestReason | null;
}

export interface ValueCompareSeriesFinding {
  type: 'value_compare_series';
  metric: string;
  grain: Grain;
  value: string;
  points: PeriodPoint[];
}

export type ContrastFinding = ValueCompareFinding | ValueCompareSeriesFinding;
