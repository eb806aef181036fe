// Findings of the trend family's extra lenses (trend test, seasonality, summary) and of the
// segment machinery (segment trends, segment shares). Numbers, periods and segment keys only.
import type { OutlierRule } from '../quality/series-outliers.js';
import type { StableSeasonalityTest } from '../stats/stable-seasonality.js';
import type { DecadeSlope } from '../stats/decades.js';
import type { SeasonalModel } from '../stats/decomposition.js';
import type { HhiBand } from '../stats/concentration.js';
import type { Grain, PeriodPoint, RankOrder } from '../types.js';

/** Mann–Kendall and Sen's slope on the complete periods of one metric's series. */
export interface TrendTestFinding {
  type: 'trend_test';
  metric: string;
  grain: Grain;
  /** Complete periods tested. */
  n: number;
  firstPeriod: string;
  lastPeriod: string;
  /** The values were divided by their season's multiplicative index before testing (two full cycles or more). */
  seasonallyAdjusted: boolean;
  /**
   * The tested span is shorter than two years at a grain under a year: a yearly season could not be
   * estimated and removed, so a rise or fall cannot be told apart from it (issue 17 item 8).
   */
  seasonUnresolved?: boolean;
  /** The complete periods tested span less than a year: the slope is said per period, never "a year". */
  underAYear?: boolean;
  s: number;
  z: number;
  pValue: number;
  /** The same test on the unadjusted values, for transparency (equals pValue when not adjusted). */
  rawPValue: number;
  /** Kendall's tau-b: the strength of the monotonic trend, −1..1; null when every value ties. */
  tau: number | null;
  /** Significance level the direction is judged at. */
  alpha: number;
  /** 'up' or 'down' only when p < alpha; 'none' otherwise. */
  direction: 'up' | 'down' | 'none';
  /** Sen's slope in metric units per period (of the adjusted values when adjusted), and per year. */
  slopePerPeriod: number;
  slopePerYear: number;
  /** Sen's slope per year relative to the mean of the tested periods; null when that mean is not positive. */
  slopePerYearRelative: number | null;
  /** Trend line value = intercept + slopePerPeriod × i, where i indexes the series finding's points. */
  intercept: number;
  smallSample: boolean;
  /** Sen's slope per year within each calendar decade the values span five years or more of (on the adjusted values); empty with fewer than two such decades. */
  byDecade: DecadeSlope[];
}

export interface CalendarMonthPattern {
  /** 1 = January. */
  month: number;
  index: number;
  /** Lowest and highest detrended ratio (additive: difference) of this month across the years; null when no year has one. */
  min: number | null;
  max: number | null;
  /** Over full calendar years, by the raw monthly value: how often this month was the highest, in the top two... */
  highestIn: number;
  topTwoIn: number;
  lowestIn: number;
  bottomTwoIn: number;
}

/**
 * Classical seasonal indices of the monthly series (period 12): multiplicative for flows and
 * ratios (an index, 1 = an average month), additive for levels (a deviation in the metric's units,
 * 0 = the yearly mean; see analysis/catalog.ts seasonalModel).
 */
export interface TrendSeasonalityFinding {
  type: 'trend_seasonality';
  metric: string;
  model: SeasonalModel;
  /** Complete months used, first and last. */
  firstPeriod: string;
  lastPeriod: string;
  months: CalendarMonthPattern[];
  /** Calendar years with twelve complete months, over which the per-year counts run. */
  fullYears: number[];
  /** Calendar years whose detrended ratios feed the min–max range. */
  rangeFromYear: number | null;
  rangeToYear: number | null;
  /** The two months with the highest and the two with the lowest index, highest (or lowest) first. */
  busiest: [number, number];
  quietest: [number, number];
  /** An additive pattern's swing within the year: the highest month's deviation less the lowest's, in the metric's units. */
  swing?: number;
  /** X-11's F-test for stable seasonality over the detrended values by month; absent when too few to test. */
  stable?: StableSeasonalityTest;
  /**
   * A flow's months by total and by the day (months differ in length: February has 28 or 29
   * days), over the full calendar years; absent for levels and ratios, or without a full year.
   */
  perDay?: MonthTotalsPerDay;
}

export interface MonthTotalsPerDay {
  /** Mean total of each calendar month over the full years, January first. */
  totals: number[];
  /** Each calendar month's total over the full years divided by its days in them, January first. */
  perDay: number[];
  /** Months in order by total and by the day, highest first. */
  byTotal: number[];
  byDay: number[];
  /** Pairs [a, b]: a is above b per day but below it by total. */
  swaps: [number, number][];
}

export interface WeekdayValue {
  /** ISO day of week: 1 = Monday … 7 = Sunday. */
  isoDay: number;
  value: number | null;
  /** Days of this weekday in the window the data covers. */
  dayCount: number;
  /** value / dayCount for additive metrics; the value itself otherwise. */
  level: number | null;
  /** level / mean level across the weekdays: 1.0 is an average day; null where no percentage of the metric applies (see TrendWeekdayFinding.inUnits). */
  index: number | null;
  /** level − mean level across the weekdays, in the metric's units (a fraction for a rate). */
  deviation?: number | null;
  /** Share of the window's total; null for non-additive metrics. */
  share: number | null;
}

export interface TrendWeekdayFinding {
  type: 'trend_weekday';
  metric: string;
  /** Sum and count metrics add up across days, so levels are per day and shares exist. */
  additive: boolean;
  /**
   * No percentage of the metric applies (catalog.ts metricPercentScale: an interval scale, values
   * that reach or cross zero) or it is a rate: each day is told by its difference from the average
   * weekday in units or points, and `index` is null.
   */
  inUnits?: boolean;
  days: WeekdayValue[];
}

export interface TrendSummaryFinding {
  type: 'trend_summary';
  metric: string;
  grain: Grain;
  n: number;
  min: number;
  max: number;
  mean: number;
  median: number;
  mode: number | null;
  modeCount: number;
  sd: number | null;
  minPeriod: string;
  maxPeriod: string;
  /** For an average of a column: its mean and median over the rows in the window (the statistics above are of the periods' values). */
  rows?: { n: number; mean: number; median: number };
  /** For a rate or a ratio: the metric over every row of the window (numerator's sum over denominator's), not a mean of the periods' values. */
  pooled?: number;
}

export interface TrendOutlierFinding {
  type: 'trend_outlier';
  metric: string;
  grain: Grain;
  period: string;
  value: number;
  /** Modified z-score (Iglewicz & Hoaglin): of the remainder after cycle and trend, or (rule `values`) of the value against the median. */
  score: number;
  /** Median of the complete periods' values. */
  median: number;
  threshold: number;
  /** Which screen judged it (quality/series-outliers.ts); absent reads as `values`. */
  rule?: OutlierRule;
  /** What trend and season alone would have given (rules `seasonal*`). */
  expected?: number;
}

/** A segment key: the dimension's value as text, null for rows where it is missing; the fold has `other`. */
export interface SegmentKey {
  segment: string | null;
  /** The "All others" fold of every segment past the top N. */
  other: boolean;
  /** Segments inside this row (1 unless folded). */
  members: number;
  /** 1-based rank by size over the window; the fold ranks after every named segment. */
  rank: number;
}

export interface SegmentYearGrowth {
  fromYear: number;
  toYear: number;
  from: number;
  to: number;
  relative: number | null;
  /** Compound yearly rate between the two years; null where undefined. */
  cagr: number | null;
}

export interface SegmentTrendFinding extends SegmentKey {
  type: 'segment_trend';
  metric: string;
  dimension: string;
  grain: Grain;
  /** The metric over the whole window for this segment (with `perDay`, over its days). */
  total: number | null;
  points: PeriodPoint[];
  /** Asked per day: `total`, the points and the yearly growth are figures per day. */
  perDay?: true;
  /** First period with any row of this segment. */
  firstPeriod: string | null;
  /** Sen's slope was taken on seasonally adjusted values (two full cycles or more), as in trend_test. */
  seasonallyAdjusted: boolean;
  slopePerPeriod: number | null;
  slopePerYear: number | null;
  slopePerYearRelative: number | null;
  /** First to last calendar year in which this segment has rows in all twelve months. */
  growth: SegmentYearGrowth | null;
  peak: { period: string; value: number } | null;
}

/**
 * How segment growth is measured: compound yearly growth between full calendar years, the Sen's
 * slope a year relative to the level, or (where a percentage has no base or the span is under a
 * year) the Sen's slope in the metric's own units per period.
 */
export type SegmentGrowthMeasure = 'cagr' | 'slope' | 'units';

export interface SegmentTrendOverviewFinding {
  type: 'segment_trend_overview';
  metric: string;
  dimension: string;
  grain: Grain;
  /** Distinct segments in the window, before folding. */
  segmentCount: number;
  folded: number;
  /** The named segment growing fastest: by compound yearly growth where it exists, else by relative Sen's slope, else by Sen's slope in units. */
  fastest: { segment: string | null; measure: SegmentGrowthMeasure; value: number } | null;
  /** The next fastest on the same measure, when there is one: a lead under CLEAR_LEAD is no lead. */
  runnerUp?: { segment: string | null; value: number } | null;
  /** The slopes span under two years (no compound growth between full years): each segment's rise or fall may be the season, so none is named fastest. */
  seasonUnresolved?: boolean;
}

/**
 * The smallest lead in yearly growth (as a fraction) that names one segment "fastest": one
 * percentage point. Common practice, not a test: yearly rates are shown to a tenth of a point and
 * a year of sampling noise in a segment's total moves them by more than that.
 */
export const CLEAR_LEAD = 0.01;

export interface SegmentShareRow extends SegmentKey {
  value: number | null;
  /** Null when shares do not apply (non-additive metric, negative or zero total). */
  share: number | null;
  cumulativeShare: number | null;
  /** With the finding's `perRow`: `value` is the mean per row with a value; these are that count and the median. */
  perRowN?: number;
  perRowMedian?: number | null;
  /** With the finding's `perDay`: `value` is the total over these days. */
  days?: SegmentDays;
}

/** The days a segment's per-day figure is over: the period's, or from its first day (`opened`) or to its last (`closed`). */
export interface SegmentDays {
  days: number;
  /** The segment's total over the period. */
  total: number | null;
  opened: boolean;
  closed: boolean;
  /** First and last day counted (ISO dates). */
  from: string | null;
  last: string | null;
}

export interface SegmentSharesFinding {
  type: 'segment_shares';
  metric: string;
  dimension: string;
  /** Shares exist only for sums and counts; other metrics carry per-segment values only. */
  additive: boolean;
  total: number | null;
  segmentCount: number;
  folded: number;
  /** Largest first, any "All others" fold last. */
  rows: SegmentShareRow[];
  threshold: number;
  /** Fewest segments (largest first, over every segment, folded or not) reaching the threshold; null when shares do not apply. */
  countToThreshold: number | null;
  /** The share those countToThreshold segments hold together (at least the threshold). */
  reachShare?: number | null;
  topN: number;
  /** How many the request asked for ("top 10"): topN is that number (up to MAX_NAMED_SEGMENTS) and the answer says that share. */
  topNAsked?: number | null;
  topNShare: number | null;
  /** Herfindahl–Hirschman index over every segment (0–10,000), computed before folding. */
  hhi: number | null;
  hhiBand: HhiBand | null;
  /** "worst 10": the segments were ranked by value in this direction, not by size. */
  ranking?: SegmentRanking;
  /** A summed metric asked per row, named by the request's word ("film"): each row's value is its mean per row. */
  perRow?: string;
  /** Asked per day ("which shops have the most orders per day"): each row's value is its total over its days; `changed` segments opened or closed inside the period. */
  perDay?: { changed: number };
  /** "What share of flights does ATL have": the one value asked about, its share, rank and the course of its share. */
  focus?: ShareFocusFinding;
}

/**
 * One named segment's share of the total over the window (every segment counted, none folded),
 * its rank among them (ties share a rank), and its share in each period of the grain with the
 * change in points from the first complete period to the last.
 */
export interface ShareFocusFinding {
  segment: string;
  /** Its own total over the window (0 when it has no rows there). */
  value: number;
  total: number;
  share: number | null;
  /** 1 for the largest; null when it has no rows in the window. */
  rank: number | null;
  /** How many segments have rows in the window. */
  of: number;
  /** The grain of `series`. */
  grain: Grain;
  series: { period: string; value: number; total: number; share: number | null; partial: boolean }[];
  /** From the first complete period to the last, in points of share (a difference of two shares, never a percent of one). */
  change: { from: string; to: string; fromShare: number; toShare: number; points: number } | null;
}

/** A ranking by value: its direction, and for an average or a rate the row floor a segment needs to be named. */
export interface SegmentRanking {
  order: RankOrder;
  /** The largest value first. */
  descending: boolean;
  /** Rows a segment needs to be ranked (null for a sum or count, whose size is its value). */
  minRows: number | null;
  /** Segments left out of the ranking for having fewer rows (in the fold). */
  thin: number;
  /** The rule minRows came from: this share of the window's rows, kept between least and most, and at most ofLargest of the largest segment's rows. */
  floorRule: { share: number; least: number; most: number; ofLargest: number };
}

export type SegmentFinding =
  | TrendTestFinding
  | TrendSeasonalityFinding
  | TrendWeekdayFinding
  | TrendSummaryFinding
  | TrendOutlierFinding
  | SegmentTrendFinding
  | SegmentTrendOverviewFinding
  | SegmentSharesFinding;
