// The plain values that flow one way through the analysis:
// sub-question -> compiled query -> result table -> findings.
// Nothing here knows about chat platforms or prose.
import type { SharedScan } from './rollup/rollup.js';
import type { FamilyFinding } from './findings/index.js';
import type { TemplateName } from './sub-questions/registry.js';

export const GRAINS = ['day', 'week', 'month', 'quarter', 'year'] as const;
export type Grain = (typeof GRAINS)[number];

export const REQUEST_KINDS = ['trend', 'growth', 'performance', 'kpi'] as const;
export type RequestKind = (typeof REQUEST_KINDS)[number];

/** Who will read the answer; it sets the wording (plain words, or tests and intervals). */
export const AUDIENCES = ['leadership', 'managers', 'analysts'] as const;
export type Audience = (typeof AUDIENCES)[number];

export const LENSES = ['time_pattern', 'breakdown', 'summary', 'distribution'] as const;
export type Lens = (typeof LENSES)[number];

/** A half-open date window [start, end), ISO dates (YYYY-MM-DD) in the dataset's time zone. */
/** The unit a change over a named stretch is measured in, from its first whole one to its last. */
export type SpanEndsUnit = 'year' | 'quarter' | 'month';

export interface DateWindow {
  start: string;
  end: string;
}

/** A filter on a catalog dimension; its values are always bound parameters. */
export interface SegmentFilter {
  dimension: string;
  values: (string | number | boolean)[];
  /** Every value but these ("excluding kiosk"). */
  exclude?: boolean;
}

/**
 * The direction a ranking by value was asked in: highest and lowest literally, best and worst
 * through the metric's higher_is_better.
 */
export const RANK_ORDERS = ['highest', 'lowest', 'best', 'worst'] as const;
export type RankOrder = (typeof RANK_ORDERS)[number];

/**
 * "Which channel is growing fastest", "the slowest-growing shop": segments ranked by their own
 * growth rate, not by how much they added to the total (which "what drove it" asks).
 */
export const GROWTH_RANKS = ['fastest', 'slowest'] as const;
export type GrowthRank = (typeof GROWTH_RANKS)[number];

/** One small answerable question. Plain data: compiling and charting it are pure functions. */
export interface SubQuestion {
  id: string;
  kind: RequestKind;
  lens: Lens;
  /** Which registered sub-question answers it (analysis/sub-questions/registry.ts). */
  template: TemplateName;
  metrics: string[];
  dimension?: string;
  grain: Grain;
  window: DateWindow;
  filters: SegmentFilter[];
  comparisonGroup?: string;
  /** The window the question compares with, when the request names one ("Q2 vs Q1"); like for like. */
  compareWindow?: DateWindow;
  /**
   * "since 2001", "over the last 10 years": a change is measured from the window's first whole
   * period of this unit to its last (the stretch's two ends), not between its last two.
   */
  spanEnds?: SpanEndsUnit;
  /** The date a before/after turns on, when the request states one (else the group's launch date). */
  launchDate?: string;
  /** The two periods are either side of launchDate with no group to set against: said as a before/after, not as an effect. */
  beforeAfter?: boolean;
  /** growth_periods for a named period whose comparison period lies before the data's start: its figure is given alone. */
  priorOutsideData?: boolean;
  /** "bookings per day by month": per-day averages at the grain. */
  /** The request asked a summed metric per row ("gross per film"): compare its mean and median per row, not its total. */
  perRow?: string;
  perDay?: boolean;
  /** "top 5 routes": how many segments to rank. */
  rankLimit?: number;
  /** "worst 10", "lowest 5": segments ranked by the metric's value in this direction (see rankDescending). */
  rankOrder?: RankOrder;
  /** "what's the busiest day of the week?": the days of the week lead the seasonal pattern's title, chart and caption. */
  weekdaysAsked?: boolean;
  /** "which channel is growing fastest": segments ranked by their own growth rate (see GrowthRank). */
  growthRank?: GrowthRank;
  /** This item answers the question as it was asked (a ranking asked with "which … the most"): the summary leads with it. */
  answersAsked?: boolean;
  /** "how fast per decade": the unit a rate of change is stated in. */
  rateUnit?: 'year' | 'decade';
  /** Two values of one dimension set against each other ("did phone grow faster than kiosk"). */
  contrast?: { dimension: string; values: [string, string] };
  /** "What share of flights does ATL have": the one value of `dimension` whose share of the total the answer leads with (its rank, its share's course by period). */
  focus?: { dimension: string; value: string };
  /** "median delay", "p90 delay": a quantile of an averaged metric's column instead of its mean (analysis/statistic.ts). */
  statistic?: { quantile: number };
}

export type CellValue = string | number | boolean | null;

export interface ResultColumn {
  name: string;
  type: 'date' | 'text' | 'number' | 'boolean';
}

/** Aggregated rows from the database, already converted to plain JS values. */
export interface ResultTable {
  columns: ResultColumn[];
  rows: Record<string, CellValue>[];
  /** True when the database returned more rows than the cap and the tail was cut. */
  truncated: boolean;
}

/** SQL with positional parameters, ready for one dialect; shown to users as it ran. */
export interface CompiledQuery {
  sql: string;
  params: (string | number | boolean)[];
  /** The query reads the rows themselves (a median over rows), never a day-level rollup of them. */
  readsRows?: true;
  /**
   * Set when the query reads the run's rollup: `sql` then carries the rollup as a CTE (runnable
   * as shown), and an engine that keeps rollups runs `scan.body` over its own copy instead.
   */
  scan?: SharedScan;
  /**
   * What the compiler knows of the dates the query reads (see QueryBuilder.datesRead): every row
   * it reads falls in this window, or null when it may read any date. Lets a day-level rollup put
   * in front of the query read only those dates; never shown.
   */
  datesRead?: DateWindow | null;
}

/** One of the queries a template runs for a sub-question; `name` keys its result table. */
export interface NamedQuery extends CompiledQuery {
  name: string;
}

/** One value at one period of a time series. `period` is the ISO date the period starts on. */
export interface PeriodPoint {
  period: string;
  value: number | null;
  /** The period is only partly covered by data (first or last period of the window). */
  partial: boolean;
}

export type CaveatCode =
  | 'partial_period'
  | 'partial_period_excluded'
  | 'thin_period'
  | 'null_share'
  | 'duplicate_keys'
  | 'negative_amounts'
  | 'series_gap'
  | 'empty_period'
  | 'outlier'
  | 'stale_data'
  | 'small_sample'
  | 'too_few_cycles'
  | 'no_data'
  | 'all_null'
  | 'single_period'
  | 'truncated'
  | 'observational'
  | 'segments_folded'
  | 'segment_gap'
  | 'late_segment'
  | 'mixed_levels'
  | 'base_zero'
  | 'suppressed_small_groups';

/** A data-quality or method caveat; prose is written later, from `code` and `data`. */
export interface Caveat {
  code: CaveatCode;
  data: Record<string, string | number | boolean | null>;
}

/** Structured facts found in one result; captions and chart titles are written from these. */
export type Finding = CoreFinding | FamilyFinding;

export type CoreFinding =
  | { type: 'peak'; metric: string; period: string; value: number }
  | { type: 'trough'; metric: string; period: string; value: number }
  | { type: 'latest'; metric: string; period: string; value: number; partial: boolean }
  | {
      type: 'change';
      metric: string;
      from: { period: string; value: number };
      to: { period: string; value: number };
      /** Relative change, undefined (null) where the base is zero or missing. */
      relative: number | null;
      absolute: number;
    }
  /** `perDay`: each point is its period's total over its days ("orders per day, monthly"). */
  | { type: 'series'; metric: string; grain: Grain; points: PeriodPoint[]; perDay?: true };

export interface Answer {
  subQuestion: SubQuestion;
  /** Every query that ran, in order; each result is in `tables` under the query's name. */
  queries: NamedQuery[];
  tables: Record<string, ResultTable>;
  findings: Finding[];
  caveats: Caveat[];
  /** Set when the first try failed for resources and this answer comes from a smaller plan (analysis/smaller-plan.ts). */
  retry?: SmallerPlanRetry;
}

/** What failed and what the retry changed, in words for the thread. */
export interface SmallerPlanRetry {
  /** "ran out of memory", "ran past the 60000 ms limit and was stopped". */
  failure: string;
  /** "the period cut to its latest half, 1 July to 31 December 2024 (instead of …)", "a weekly grain instead of daily". */
  change: string;
}
