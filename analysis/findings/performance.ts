// Findings of the performance family: a comparison group (members vs others) on one metric.
// Numbers, dates and codes only; every sentence is written later by the presenters.
import type { DateWindow, Grain, PeriodPoint } from '../types.js';
import type { ChangedSegment, GrowthSpan } from './growth.js';

export type GroupRole = 'members' | 'others';

/**
 * What is compared for a metric:
 * - `mean`: the mean of a per-row value (an average metric, or a sum metric per row);
 * - `proportion`: the share of rows that pass a condition (a rate);
 * - `ratio`: a ratio of two per-row sums (tested by the delta method);
 * - `total`: a plain total with no per-row model, so no test.
 */
export type MeasureKind = 'mean' | 'proportion' | 'ratio' | 'total';

/**
 * `metric`: the catalog metric itself; `per_row`: a sum metric compared per row (revenue per
 * booking); `per_day`: a count (plain or filtered) compared as its mean per calendar day, days
 * without a row counting as 0, so a count is never compared as a share of rows; `per_unit_day`: a
 * count between groups of named units (sites), as each unit's count per calendar day, one
 * observation per unit (the finding's `unit` names the dimension); `per_unit_month`: a sum or a
 * count per customer (the group's unit_column) per month, over the same customers before and after
 * a launch, months without a row counting as 0 (the finding's `unit` is the unit column).
 */
export type Quantity = 'metric' | 'per_row' | 'per_day' | 'per_unit_day' | 'per_unit_month';

export type TestName = 'welch_t' | 'two_proportion_z' | 'delta_ratio_z' | 'did_t' | 'did_z';

/**
 * Why no test was run: a group has no rows, too few rows, no spread at all, the measure has no
 * test, or a group is below the dataset's minimum group size (`suppressed`: too few to show).
 */
export type NoTestReason = 'empty_group' | 'too_few' | 'no_variation' | 'not_testable' | 'suppressed';

/**
 * `better` / `worse`: a clear difference on a quantity with a good direction (the metric's
 * higher_is_better); `clear_difference`: a clear difference on a quantity with none (two groups'
 * daily volumes, which differ by the groups' sizes), said as higher or lower only.
 */
export type Verdict = 'better' | 'worse' | 'clear_difference' | 'no_clear_difference';

/** Which two estimates a difference is between: members − others, or after − before within one group. */
export type Comparison = 'members_vs_others' | 'others_after_vs_before' | 'members_after_vs_before';

export type Direction = 'higher' | 'lower' | 'equal';

/** The window the comparison actually used, after clipping to the launch date and the data. */
export interface PerformanceWindowFinding {
  type: 'performance_window';
  group: string;
  start: string;
  /** Exclusive end (ISO date). */
  end: string;
  launchDate: string | null;
  /** The asked window started before the launch and was moved to the launch date. */
  clippedToLaunch: boolean;
}

/** One group's estimate with its interval. */
export interface PerformanceGroupFinding {
  type: 'performance_group';
  metric: string;
  group: GroupRole;
  measure: MeasureKind;
  quantity: Quantity;
  /** Rows behind the estimate (for a mean, rows with a value). */
  n: number;
  estimate: number | null;
  low: number | null;
  high: number | null;
  confidence: number;
  /** Sample sd of the per-row value (mean measures only). */
  sd: number | null;
  /** Median of the per-row value, from SQL over all rows (currency means only). */
  median: number | null;
  /** The catalog metric over the group (e.g. total revenue), whatever the measure. */
  metricValue: number | null;
  /** Fewer rows than the dataset's minimum group size: every number above is withheld (n is 0). */
  suppressed?: boolean;
  /** With quantity `per_unit_day`: the dimension whose values are the units (n counts them). */
  unit?: string;
}

/** A tested difference of two estimates (first − second, as `comparison` names them). */
/** The outcome of one significance test of a difference between two estimates. */
export interface DifferenceTest {
  test: TestName;
  /** The two estimates compared. */
  first: number;
  second: number;
  difference: number;
  /** difference / second estimate; null when that is 0. */
  relative: number | null;
  ci: [number, number];
  confidence: number;
  /** t or z. */
  statistic: number;
  /** Degrees of freedom for t tests; null for z tests. */
  df: number | null;
  pValue: number;
  /** Hedges' g (Welch only). */
  effectSize: number | null;
}

export interface PerformanceDifferenceFinding extends DifferenceTest {
  type: 'performance_difference';
  metric: string;
  comparison: Comparison;
  measure: MeasureKind;
  nFirst: number;
  nSecond: number;
}

/** A difference that could not be tested, with the two estimates where they exist. */
export interface PerformanceNoTestFinding {
  type: 'performance_no_test';
  metric: string;
  comparison: Comparison;
  reason: NoTestReason;
  first: number | null;
  second: number | null;
  nFirst: number;
  nSecond: number;
  /** With reason `suppressed`: which side is below the minimum group size, and the minimum. */
  suppressedFirst?: boolean;
  suppressedSecond?: boolean;
  minimum?: number;
}

/** Seeded bootstrap interval for the difference in medians (members − others) of a money value. */
export interface PerformanceMedianFinding {
  type: 'performance_median_difference';
  metric: string;
  /** Medians over all rows (from SQL). */
  medianMembers: number;
  medianOthers: number;
  difference: number;
  /** Percentile bootstrap interval, from a bounded deterministic sample of each group. */
  ci: [number, number];
  confidence: number;
  resamples: number;
  seed: number;
  sampleMembers: number;
  sampleOthers: number;
}

/** The plain-words verdict: is the members' value better, worse or not clearly different? */
export interface PerformanceVerdictFinding {
  type: 'performance_verdict';
  metric: string;
  comparison: Comparison;
  verdict: Verdict;
  direction: Direction;
  /** `test`: p-value against alpha; `exact`: no spread in either group, so the difference is exact; `none`: no test. */
  basis: 'test' | 'exact' | 'none';
  pValue: number | null;
  alpha: number;
  /** The compared quantity's good direction; null when it has none (see `goodDirection`). */
  higherIsBetter: boolean | null;
  relative: number | null;
}

/** Per-unit (customer) frequency summary of one group. */
export interface PerformanceFrequencyGroupFinding {
  type: 'performance_frequency_group';
  metric: string;
  group: GroupRole;
  units: number;
  /** Sum of the per-unit values (e.g. bookings). */
  total: number;
  mean: number;
  sd: number | null;
  low: number | null;
  high: number | null;
  confidence: number;
  median: number | null;
  p90: number | null;
  /** Share of units per bucket of the per-unit value; empty when the metric is not a count. */
  buckets: { min: number; max: number | null; units: number; share: number }[];
}

/** Members' mean per unit over others' mean per unit, with a delta-method interval on the log scale. */
export interface PerformanceFrequencyRatioFinding {
  type: 'performance_frequency_ratio';
  metric: string;
  ratio: number;
  low: number | null;
  high: number | null;
  confidence: number;
}

/** The compared quantity per period for one group (before/after chart). */
export interface PerformanceGroupSeriesFinding {
  type: 'performance_group_series';
  metric: string;
  group: GroupRole;
  grain: Grain;
  /** What each point is (a count's points are its mean per day in the period); absent means `metric`. */
  quantity?: Quantity;
  /** For `per_unit_day`: the dimension whose values are the units (a shop). */
  unit?: string;
  points: PeriodPoint[];
}

/** One group's own growth over the compared spans, in total and over its units there through both. */
export interface GroupGrowth {
  group: GroupRole;
  /** The group's units with data in either span. */
  units: number;
  total: { before: number; after: number; relative: number | null };
  /** Over the units there through both spans; equal to `total` when every unit was. */
  likeForLike: { before: number; after: number; relative: number | null; units: number } | null;
  /** Units new or gone between the spans (a shop that opened), left out of like-for-like. */
  changed: ChangedSegment[];
}

/**
 * "Did the members grow faster?": each group's own growth over one span against the same dates
 * a year earlier (growth-compare.ts), in total and like for like, with the units that set the two
 * apart. Two growth rates side by side: a description, not a test.
 */
export interface PerformanceGroupGrowthFinding {
  type: 'performance_group_growth';
  metric: string;
  /** The dimension whose values are the groups' units (a shop); '' when the groups have no named units (each is one). */
  unit: string;
  current: GrowthSpan;
  prior: GrowthSpan;
  groups: GroupGrowth[];
}

/** The equal-length windows either side of the launch. */
export interface PerformancePeriodsFinding {
  type: 'performance_periods';
  launchDate: string;
  before: DateWindow;
  after: DateWindow;
  months: number;
}

/**
 * Named units (sites) not there throughout the compared window (opened or closed inside it), left
 * out of both groups so neither group's make-up changes between before and after.
 */
export interface PerformanceUnitsLeftOutFinding {
  type: 'performance_units_left_out';
  dimension: string;
  units: { unit: string; group: GroupRole; first: string; last: string }[];
}

/** Difference in differences: (members after − members before) − (others after − others before). */
export interface PerformanceDidFinding {
  type: 'performance_did';
  metric: string;
  measure: MeasureKind;
  membersBefore: number;
  membersAfter: number;
  othersBefore: number;
  othersAfter: number;
  estimate: number;
  /** estimate / (members after − DiD), the members' after value without the effect; null when that is 0. */
  relative: number | null;
  ci: [number, number] | null;
  confidence: number;
  test: 'did_t' | 'did_z' | null;
  /**
   * The change in relative terms from a log-linear model of the four cells: (members after /
   * members before) / (others after / others before) − 1, with its interval by the delta method
   * on the log scale. Null unless all four estimates are positive with a variance.
   */
  ratio?: { estimate: number; ci: [number, number]; pValue: number } | null;
  statistic: number | null;
  df: number | null;
  pValue: number | null;
}

/** `suppressed`: a month of a group in the compared windows is below the minimum group size, so its pools are withheld. */
export type DidNotApplicableReason = 'no_launch_date' | 'members_empty_before' | 'window_too_short' | 'group_empty' | 'not_poolable' | 'suppressed';

export interface PerformanceDidNotApplicableFinding {
  type: 'performance_did_not_applicable';
  metric: string;
  reason: DidNotApplicableReason;
}

/** The group comparison within one segment of a dimension. */
export interface PerformanceSegmentFinding {
  type: 'performance_segment';
  metric: string;
  dimension: string;
  /** Null for rows where the dimension is missing, or for the folded "All others" row. */
  segment: string | null;
  folded: boolean;
  /** Segments folded into this row (1 for a plain segment). */
  segmentCount: number;
  nMembers: number;
  nOthers: number;
  members: number | null;
  others: number | null;
  difference: number | null;
  relative: number | null;
  ci: [number, number] | null;
  pValue: number | null;
  /** Either group has fewer rows than the small-sample threshold. */
  small: boolean;
  /** A side below the dataset's minimum group size: its numbers (and the difference) are withheld. */
  suppressedMembers?: boolean;
  suppressedOthers?: boolean;
}

/** How consistently the members' difference points the same way as the overall difference. */
export interface PerformanceConsistencyFinding {
  type: 'performance_consistency';
  metric: string;
  dimension: string;
  overallDirection: Direction;
  /** Segments compared (both groups present). */
  segments: number;
  sameDirection: number;
  oppositeDirection: number;
  significantSame: number;
  significantOpposite: number;
  /** How the segments shown were picked (absent in answers kept from before it was recorded). */
  pick?: SegmentPick;
}

/**
 * The rule that picked a breakdown's segments: those the request named, or the first `shown` by
 * the metric asked over both groups (its total for a sum or a count, 'largest'; its value for an
 * average or a rate, among segments with at least `floorRows` rows), `folded` more combined.
 */
export interface SegmentPick {
  rule: 'named' | 'ranked';
  shown: number;
  folded: number;
  order: 'largest' | 'highest' | 'lowest';
  floorRows: number | null;
}

export type PerformanceFinding =
  | PerformanceWindowFinding
  | PerformanceGroupFinding
  | PerformanceDifferenceFinding
  | PerformanceNoTestFinding
  | PerformanceMedianFinding
  | PerformanceVerdictFinding
  | PerformanceFrequencyGroupFinding
  | PerformanceFrequencyRatioFinding
  | PerformanceGroupSeriesFinding
  | PerformanceGroupGrowthFinding
  | PerformanceUnitsLeftOutFinding
  | PerformancePeriodsFinding
  | PerformanceDidFinding
  | PerformanceDidNotApplicableFinding
  | PerformanceSegmentFinding
  | PerformanceConsistencyFinding
  | PerformanceUnitDidFinding;

/** One group's customers in a per-customer before/after (performance_unit_did). */
export interface UnitPanelGroup {
  /** Customers with a row both before and after the launch: the ones compared. */
  panel: number;
  /** Customers whose first row in the windows is after the launch (they entered): left out. */
  enteredAfter: number;
  /** Customers with rows before the launch only (they left): left out. */
  leftBefore: number;
  /** The panel's mean per customer per month before and after; null without a panel. */
  before: number | null;
  after: number | null;
  /** The panel is below the dataset's minimum group size: its figures are withheld. */
  suppressed?: boolean;
}

/**
 * "Are pass holders travelling more since launch?": the metric per customer per month over the
 * same customers before and after the launch (equal windows, `performance_periods`), members
 * against others, and the difference in differences in the metric's units and relative to the
 * members' counterfactual (their before plus the others' change), with percentile-bootstrap
 * intervals over customers. Null estimates when a group has no panel.
 */
export interface PerformanceUnitDidFinding {
  type: 'performance_unit_did';
  metric: string;
  /** The unit column (customer_id): captions call it by its distinct count's label. */
  unit: string;
  /** The months in each window. */
  months: number;
  groups: Record<GroupRole, UnitPanelGroup>;
  estimate: number | null;
  ci: [number, number] | null;
  relative: number | null;
  relativeCi: [number, number] | null;
  confidence: number;
  resamples: number;
  seed: number;
}
