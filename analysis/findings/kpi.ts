// Findings of the KPI snapshot family: where a metric stands in its latest complete period,
// against the period before and the same period a year earlier. Numbers only; no prose.
import type { OutlierRule } from '../quality/series-outliers.js';
import type { Grain } from '../types.js';

/** A comparison point and the latest value's change against it. */
export interface KpiDelta {
  /** Start of the period compared against. */
  period: string;
  /** The metric in that period; null when the period has no rows or no value. */
  value: number | null;
  /** latest − base; null when either is missing. */
  absolute: number | null;
  /** (latest − base) / base; null when the base is zero, negative or missing. */
  relative: number | null;
  /** True when the move is in the metric's good direction (higher_is_better), false when against it, null when nil or unknown. */
  improved: boolean | null;
}

/** A segment key as the database returned it; null is the rows where the dimension is missing. */
export type SegmentKey = string | number | boolean | null;

export interface KpiSnapshotFinding {
  type: 'kpi_snapshot';
  metric: string;
  grain: Grain;
  /** Start of the latest complete period. */
  period: string;
  value: number | null;
  /** Rows behind the latest value. */
  rows: number;
  previous: KpiDelta;
  /** Null at the year grain, where `previous` already is last year. */
  lastYear: KpiDelta | null;
}

export interface KpiSegmentRow {
  key: SegmentKey;
  /** The "All others" row: segments past the top N, combined in the database. */
  other: boolean;
  /** Distinct segment values in this row (1 for a named segment). */
  segments: number;
  value: number | null;
  rows: number;
  previous: KpiDelta;
  lastYear: KpiDelta | null;
}

export interface KpiBySegmentFinding {
  type: 'kpi_by_segment';
  metric: string;
  grain: Grain;
  dimension: string;
  period: string;
  /** Named segments ranked by rows in the latest period (then in all three periods), then "All others". */
  segments: KpiSegmentRow[];
  /** All segments together: the same figure a snapshot gives. */
  total: Omit<KpiSegmentRow, 'key' | 'other' | 'segments'>;
  /** How many named segments were kept before folding the rest. */
  topN: number;
}

export interface KpiContextFinding {
  type: 'kpi_context';
  metric: string;
  grain: Grain;
  period: string;
  value: number;
  /** Complete periods in the history, the latest included. */
  n: number;
  firstPeriod: string;
  min: number;
  max: number;
  minPeriod: string;
  maxPeriod: string;
  mean: number;
  median: number;
  /** Sample standard deviation; null with fewer than two periods. */
  sd: number | null;
  /** 1 is the highest value in the history; ties share the better rank. */
  rank: number;
  /** Share of complete periods whose value is at or below the latest, 0–1. */
  percentile: number;
  /**
   * Modified z-score of the latest (Iglewicz & Hoaglin) as the series screen scores it (quality/series-outliers.ts):
   * of its remainder after season and trend, or of the value; null when it cannot be computed.
   */
  robustZ: number | null;
  /** The series screen calls the latest period unusual (the same call as the `outlier` caveat). */
  outlier: boolean;
  /** Which rule judged the history (absent: too short to screen). */
  outlierRule?: OutlierRule;
  /** What the latest would have been by its season and trend (rules `seasonal*` only). */
  usual?: number;
}

export interface KpiMixRow {
  key: SegmentKey;
  /** The "All others" row: segments below the dataset's minimum group size, combined in the database. */
  other?: boolean;
  /** The measure the shares are of, in the latest period. */
  value: number;
  share: number | null;
  lastYearValue: number | null;
  lastYearShare: number | null;
  /** share − lastYearShare, as a fraction (0.013 is 1.3 points); null when either is missing. */
  shareChange: number | null;
  /** The KPI itself within the segment, in the latest period. */
  metricValue: number | null;
}

export interface KpiMixFinding {
  type: 'kpi_mix';
  metric: string;
  /** The metric whose shares are shown (the KPI itself when additive, else its base); null means shares of rows. */
  shareOf: string | null;
  grain: Grain;
  dimension: string;
  period: string;
  lastYearPeriod: string | null;
  /** Largest share first. */
  segments: KpiMixRow[];
  total: number;
  lastYearTotal: number | null;
  /** Fewest segments reaching `threshold` of the total; null when shares are undefined. */
  countToThreshold: number | null;
  /** The share those `countToThreshold` largest segments carry together (named rows only, largest first). */
  shareToThreshold?: number | null;
  threshold: number;
  /** Herfindahl–Hirschman index, 0–10,000; null when shares are undefined. */
  hhi: number | null;
  lastYearHhi: number | null;
}

export type KpiFinding = KpiSnapshotFinding | KpiBySegmentFinding | KpiContextFinding | KpiMixFinding;
