// Findings of the growth family: how fast a metric grows, period over period and year over year.
// Numbers and ISO dates only; every rate is a finite number or null (undefined growth), never NaN.
import type { DecadeSlope } from '../stats/decades.js';
import type { Grain, GrowthRank } from '../types.js';

/** A half-open span of calendar dates [start, end), ISO. */
export interface GrowthSpan {
  start: string;
  end: string;
}

export interface GrowthPoint {
  /** ISO date the period starts on. */
  period: string;
  /** The metric in the period as measured, partial or not. */
  value: number | null;
  /** Only part of the period has data; it takes no part in any growth rate. */
  partial: boolean;
  /** Change against the period before. */
  pop: number | null;
  /** Change against the same period a year earlier. */
  yoy: number | null;
  /** Change of the trailing-year sum (e.g. 12 months) against the trailing-year sum a year earlier. */
  trailing: number | null;
}

export interface GrowthSeriesFinding {
  type: 'growth_series';
  metric: string;
  grain: Grain;
  points: GrowthPoint[];
  /** Periods between a period and the same period a year earlier; null for days (no year-over-year). */
  yoyLag: number | null;
  /** Periods in the trailing sum; null when not computed (a metric whose values do not add up, or no yearly lag). */
  trailingWindow: number | null;
  /** The quantity is signed in this window (stats/growth percentScale): no rate is a percentage; its changes are told in units. */
  inUnits?: boolean;
}

export interface GrowthYear {
  /** ISO date of 1 January. */
  year: string;
  value: number | null;
  /** The whole calendar year is inside the window and the data. */
  complete: boolean;
  /** Against the year before; null unless both years are complete. */
  yoy: number | null;
}

export interface GrowthYearsFinding {
  type: 'growth_years';
  metric: string;
  years: GrowthYear[];
}

/** The latest year so far against the same dates a year earlier. */
export interface GrowthYtdFinding {
  type: 'growth_ytd';
  metric: string;
  /** Last day counted in the current year; the prior year is counted to the same day and month. */
  through: string;
  current: { year: string; value: number | null };
  prior: { year: string; value: number | null };
  relative: number | null;
  absolute: number | null;
}

/** Compound annual growth between the first and last complete years of the window. */
export interface GrowthCagrFinding {
  type: 'growth_cagr';
  metric: string;
  from: { year: string; value: number };
  to: { year: string; value: number };
  years: number;
  rate: number | null;
}

/**
 * A level's rate of change (a reading such as a concentration does not compound): Sen's slope of
 * its complete years' values in units a year, and decade by decade when they reach into two or more.
 */
export interface GrowthLevelRateFinding {
  type: 'growth_level_rate';
  metric: string;
  from: string;
  to: string;
  perYear: number;
  byDecade: DecadeSlope[];
}

export interface GrowthDriverSegment {
  /** The dimension's value as text; null for rows where the dimension is missing. */
  segment: string | null;
  before: number | null;
  after: number | null;
  change: number | null;
  relative: number | null;
  /** change / total change: the share of the total change; null for metrics that do not add up or a zero total change. */
  shareOfChange: number | null;
  /** change / total before: points of the total's growth rate this segment accounts for; null when not additive. */
  contribution: number | null;
  /** Its share of the earlier span's base (the value for a sum or count, the rows otherwise); small bases are flagged. */
  baseShare?: number | null;
}

/** The segments ranked by their own growth rate, when the request asked which grew fastest (or slowest). */
export interface GrowthRateRanking {
  order: GrowthRank;
  /** Segments with a rate, in that order (the named ones and the folded tail alike). */
  segments: (string | null)[];
  /** The answer: the first segment of some size and those about the same as it, within the noise. */
  leaders: (string | null)[];
  /** Segments ranked above the answer on a small base (flagged, not named as the answer). */
  aheadOnSmallBase: (string | null)[];
  /** False when every segment of some size is within the noise of the first: none stands out. */
  standsOut: boolean;
  /** How "about the same" was judged: Poisson counting noise (two standard errors) or a lead under CLEAR_LEAD. */
  noise: 'poisson' | 'lead';
}

/** A segment that was not there through both spans, so like-for-like growth leaves it out. */
export interface ChangedSegment {
  segment: string | null;
  /** Its first record in the whole table comes after the earlier span began (a new site or channel). */
  opened: boolean;
  /** Its last record in the whole table comes before the later span ended (a closed site, a discontinued product). */
  closed: boolean;
  /** Its first and last record in the whole table. */
  firstDay: string | null;
  lastDay: string | null;
}

export interface GrowthDriversFinding {
  type: 'growth_drivers';
  metric: string;
  dimension: string;
  /** The spans actually compared (the window and the same dates a year earlier, cut to the data). */
  current: GrowthSpan;
  prior: GrowthSpan;
  /** The metric adds up across segments (a sum or a count); otherwise contributions are not given. */
  additive: boolean;
  total: { before: number | null; after: number | null; change: number | null; relative: number | null };
  /** The largest absolute changes first (for a metric that does not add up, weighted by the segment's share of current rows), at most the top N. */
  segments: GrowthDriverSegment[];
  /** The remaining segments folded together; values are null when the metric does not add up. */
  others: (Omit<GrowthDriverSegment, 'segment'> & { count: number }) | null;
  /**
   * Like-for-like growth: the total over the segments there through both spans, and the segments
   * left out; null when every segment was there throughout (the total is then like for like).
   */
  likeForLike: { before: number | null; after: number | null; change: number | null; relative: number | null; excluded: ChangedSegment[] } | null;
  /** "Which channel is growing fastest": the ranking by rate the headline answers with; absent for "what drove it". */
  byRate?: GrowthRateRanking;
  /** Every segment's rises and falls added up, when a sum or count moved both ways (templates/growth-drivers.ts offsetOf). */
  offset?: { rises: number; falls: number };
  /**
   * Asked per day of a total that adds up over days ("flights per day"): `total` (and every other
   * figure) is each span's total divided by its days, and here are the days and the plain totals.
   */
  perDay?: PerDayTotals;
}

/**
 * Two periods the request named ("2009 vs 2008"), the metric's figure over each: a flow's total,
 * a level's mean reading, a ratio over the whole span. No breakdown: the figures themselves.
 */
export interface GrowthPeriodsFinding {
  type: 'growth_periods';
  metric: string;
  /** The spans compared, cut to the data. */
  current: GrowthSpan;
  prior: GrowthSpan;
  additive: boolean;
  total: { before: number | null; after: number | null; change: number | null; relative: number | null };
  /**
   * Asked per day of a total that adds up over days ("flights per day"): `total` (and every other
   * figure) is each span's total divided by its days, and here are the days and the plain totals.
   */
  perDay?: PerDayTotals;
}

/** A per-day comparison's days of each span (cut to the data) and the totals it divided. */
export interface PerDayTotals {
  days: { before: number; after: number };
  totals: { before: number | null; after: number | null; change: number | null; relative: number | null };
}

export interface GrowthRateSummaryFinding {
  type: 'growth_rate_summary';
  metric: string;
  grain: Grain;
  /** Which rates were summarised: against the same period a year earlier, or against the period before. */
  basis: 'yoy' | 'pop';
  /** 'units' for a level: each rate is a difference in the metric's units, not a relative change. */
  measure: 'relative' | 'units';
  rates: { period: string; value: number | null }[];
  n: number;
  min: { period: string; value: number } | null;
  max: { period: string; value: number } | null;
  mean: number | null;
  median: number | null;
  /** Sample standard deviation; null below two rates. */
  sd: number | null;
  /** The middle half of the rates (linear-interpolation quartiles); the spread told to managers, which one tiny base cannot blow up. */
  quartiles: { lower: number; upper: number } | null;
}

export interface GrowthShareSegment {
  segment: string | null;
  before: number | null;
  after: number | null;
  shareBefore: number | null;
  shareAfter: number | null;
  /** shareAfter − shareBefore, as a fraction (0.021 is 2.1 percentage points). */
  shareChange: number | null;
}

export interface GrowthConcentration {
  total: number | null;
  segments: number;
  /** Herfindahl–Hirschman index, 0–10,000. */
  hhi: number | null;
  /** Fewest segments whose combined share reaches the threshold. */
  countToThreshold: number | null;
}

export interface GrowthShareShiftFinding {
  type: 'growth_share_shift';
  metric: string;
  dimension: string;
  current: GrowthSpan;
  prior: GrowthSpan;
  threshold: number;
  /** Largest current share first, at most the top N. */
  segments: GrowthShareSegment[];
  others: (Omit<GrowthShareSegment, 'segment'> & { count: number }) | null;
  before: GrowthConcentration;
  after: GrowthConcentration;
}

export type GrowthFinding =
  | GrowthSeriesFinding
  | GrowthYearsFinding
  | GrowthYtdFinding
  | GrowthCagrFinding
  | GrowthLevelRateFinding
  | GrowthDriversFinding
  | GrowthPeriodsFinding
  | GrowthRateSummaryFinding
  | GrowthShareShiftFinding;
