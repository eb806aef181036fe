// A chart spec is plain, serialisable data: builders compute every number and label in it,
// and the renderer only draws it. No functions, no dates, no class instances.
import type { ValueFormat } from '../format.js';
import type { Grain } from '../types.js';

export const CHART_KINDS = [
  'line',
  'bars',
  'pareto',
  'growth_grid',
  'kpi_card',
  'group_compare',
  'seasonal_profile',
  'period_table',
] as const;
export type ChartKind = (typeof CHART_KINDS)[number];

/** Texts and size every chart carries. */
export interface ChartHeader {
  title: string;
  /** Names what the chart measures ("Revenue"), drawn as a chip before the subtitle. */
  chip?: string;
  subtitle: string;
  /** Small print: dataset, "data as of …", caveat flags; one entry per fact. */
  footer: string[];
  width: number;
  height: number;
  /** Device pixels per layout pixel: 2 for sharp images on high-density screens. */
  scale: 1 | 2;
}

// ---- line -------------------------------------------------------------------------------

export interface LinePoint {
  /** Axis label of the period, already formatted ("Aug 2024"). */
  label: string;
  /** ISO date the period starts on; the renderer aligns axis labels to calendar boundaries. */
  period: string;
  value: number | null;
  /** The period is only partly covered; drawn with a dashed segment and a hollow marker. */
  partial: boolean;
}

export interface LineMark {
  role: 'high' | 'low';
  /** Index into `points`. */
  index: number;
  /** "High: €1.93M, Aug 2024". */
  text: string;
}

/** A period the outlier screen calls unusual (quality/series-outliers.ts), drawn as a ring on the line. */
export interface LineUnusual {
  /** Index into `points`. */
  index: number;
  /** "Dec 2015: 284.5"; drawn only when `labelled`. */
  text: string;
  /** Above what was usual for it (its label goes above the point), or below. */
  above: boolean;
  /** The few furthest out carry a label; a period that is also the high or low keeps that label alone. */
  labelled: boolean;
}

export interface LineOverlay {
  /** Legend text, e.g. "Same month last year". */
  label: string;
  /** Aligned with `points` by index. */
  values: (number | null)[];
}

/** A dated event drawn as a thin vertical rule with a short label, e.g. a programme launch. */
export interface LineEvent {
  /** Index into `points`: the period the event falls in. */
  index: number;
  /** Short text beside the rule, e.g. "SkerryPass launch". */
  label: string;
}

export interface LineSpec extends ChartHeader {
  kind: 'line';
  /** Legend text of the main series (shown only when there is an overlay). */
  seriesLabel: string;
  grain: Grain;
  points: LinePoint[];
  format: ValueFormat;
  marks: LineMark[];
  overlay?: LineOverlay;
  events?: LineEvent[];
  /** Unusual periods, ringed; `legend` says what the ring means ("Unusual for its season"). */
  unusual?: { legend: string; points: LineUnusual[] };
}

// ---- bars -------------------------------------------------------------------------------

export interface Bar {
  label: string;
  value: number;
  /** Formatted value written at the end of the bar. */
  text: string;
  /** The "All others" bar folding the tail; drawn in a neutral colour. */
  other: boolean;
}

export interface BarsSpec extends ChartHeader {
  kind: 'bars';
  format: ValueFormat;
  /** Sorted by value, descending, with any "All others" bar last. */
  bars: Bar[];
  /**
   * When set, bars are coloured by sign: the good direction in blue, the bad in vermillion
   * (true: rises are good). Absent: one colour for every bar.
   */
  higherIsBetter?: boolean;
}

// ---- pareto -----------------------------------------------------------------------------

export interface ParetoBar extends Bar {
  /** Share of the total, 0–1. */
  share: number;
  /** Running share up to and including this bar, 0–1. */
  cumulative: number;
  /** Cumulative share written beside the line point ("71%"). */
  cumulativeText: string;
}

export interface ParetoSpec extends ChartHeader {
  kind: 'pareto';
  format: ValueFormat;
  bars: ParetoBar[];
  /** The reference share (0.8). */
  threshold: number;
  /** First bar at which the cumulative share reaches the threshold; -1 when none does. */
  thresholdIndex: number;
  /** Words on the reference line: "80% of total", or "80% of total: 47 of 229 airports" when the count is known. */
  thresholdText: string;
  /**
   * The fold ("All others") dwarfs the named bars: the value axis is scaled to the named bars and
   * the fold's bar is drawn broken at the top, its value written on it.
   */
  foldBroken: boolean;
  /** Axis title of the bars' axis, e.g. "Revenue". */
  valueLabel: string;
}

// ---- growth grid ------------------------------------------------------------------------

/**
 * What a grid cell shows: `value` a coloured change; `not_comparable` "n/a" (the month has data
 * but no year-earlier base); `partial` a hatched cell (the month is only partly covered);
 * `no_data` a blank cell (before the data starts or after it ends).
 */
export type GrowthCellState = 'value' | 'not_comparable' | 'partial' | 'no_data';

export interface GrowthGridRow {
  /** "2024". */
  label: string;
  /** Relative change per column; null where there is no comparable value. */
  cells: (number | null)[];
  /** "+8.1%", "n/a", "partial", or "" for a blank cell. */
  texts: string[];
  /** One per column. */
  states: GrowthCellState[];
}

export interface GrowthGridSpec extends ChartHeader {
  kind: 'growth_grid';
  /** Column headers, e.g. "Jan" … "Dec". */
  columns: string[];
  rows: GrowthGridRow[];
  /** Colour scale runs from −domain (full "worse" colour) to +domain (full "better" colour). */
  domain: number;
  /** Decides which direction is coloured as good (blue) and which as bad (vermillion); null: neither (sky blue and orange). */
  higherIsBetter: boolean | null;
  /** Legend caption, e.g. "Change vs same month a year earlier". */
  legendLabel: string;
  /** Texts of the legend's two ends and middle, e.g. ["−20%", "0%", "+20%"]. */
  legendTexts: [string, string, string];
}

// ---- KPI card ---------------------------------------------------------------------------

export interface KpiComparison {
  /** "vs April 2025", "vs May 2024". */
  label: string;
  /** "+8.1%" or "n/a". */
  changeText: string;
  /** The value compared against, formatted: "€23.10". */
  baseText: string;
  direction: 'up' | 'down' | 'flat' | 'none';
  sentiment: 'good' | 'bad' | 'neutral';
}

export interface KpiCardSpec extends ChartHeader {
  kind: 'kpi_card';
  /** "Average fare per passenger". */
  metricLabel: string;
  /** "€23.45". */
  valueText: string;
  /** "May 2025". */
  periodText: string;
  comparisons: KpiComparison[];
}

// ---- group comparison -------------------------------------------------------------------

export interface GroupEstimate {
  label: string;
  estimate: number;
  /** Confidence interval bounds; null when the interval could not be computed. */
  low: number | null;
  high: number | null;
  n: number;
  /** "€23.45". */
  estimateText: string;
  /** "95% CI €22.90 – €24.00", or "" without an interval. */
  intervalText: string;
  /** "n = 12,345". */
  nText: string;
}

export interface GroupCompareSpec extends ChartHeader {
  kind: 'group_compare';
  format: ValueFormat;
  groups: GroupEstimate[];
  /** Confidence level of the whiskers, e.g. 0.95. */
  level: number;
  /** Axis title, e.g. "Bookings per customer". */
  valueLabel: string;
}

// ---- seasonal profile -------------------------------------------------------------------

export interface SeasonalMonth {
  /** "Jan". */
  label: string;
  /** Mean seasonal index; 1.0 is an average month. */
  index: number | null;
  /** Lowest and highest index of that month across the years. */
  min: number | null;
  max: number | null;
  /** "1.32"; a deviation in units without the unit's name ("+5.71"), which the axis title gives once. */
  text: string;
}

export interface SeasonalProfileSpec extends ChartHeader {
  kind: 'seasonal_profile';
  months: SeasonalMonth[];
  /** Locale of the axis numbers. */
  locale: string;
  /** Reference drawn as a line: 1.0 for an index, 0 for a deviation in units. */
  reference: number;
  /**
   * Present when the bars are deviations in the metric's units (a level's additive pattern): the
   * axis runs through zero in units, never from 0 to an index.
   */
  units?: { format: ValueFormat; axisTitle: string };
  /**
   * Legend words of the two bar colours and the reference line, in the metric's terms: a flow is
   * "busier" or "quieter" than an average month, a level or ratio "higher" or "lower".
   */
  legend: { above: string; below: string; reference: string };
  /** Legend text of the whiskers, e.g. "Range 2022–2024". */
  rangeLabel: string;
  /** The index axis's title when it is not the default: a flow's index is of monthly totals. */
  indexTitle?: string;
}

// ---- period table ---------------------------------------------------------------------

/**
 * One cell of the period table. A change cell carries `tone`: its place on the diverging scale,
 * −1 (full "worse" colour) to +1 (full "better"), already signed by the metric's good direction;
 * null leaves the cell unfilled. `direction` is drawn as an arrow so the cell reads in grey too.
 */
export interface TableCell {
  text: string;
  tone: number | null;
  direction: 'up' | 'down' | 'flat' | null;
  /** The metric's best or worst period: a symbol and an outline as well as the colour. */
  mark: 'best' | 'worst' | null;
}

export interface TableColumn {
  /** Second header line: "EUR", "vs prev. month", "vs a year earlier". */
  label: string;
  /** Index into `groups`: the metric the column belongs to. */
  group: number;
  role: 'value' | 'change';
}

export interface TableRow {
  /** "Jan 2024"; "Total" on the totals row. */
  label: string;
  /** Small text under the label: "partial: to 18 Jun". */
  note: string;
  kind: 'period' | 'partial' | 'total';
  /** One per column. */
  cells: TableCell[];
}

export interface PeriodTableSpec extends ChartHeader {
  kind: 'period_table';
  /** Header of the period column: "Month". */
  periodLabel: string;
  /** Metric names over their columns. */
  groups: string[];
  columns: TableColumn[];
  rows: TableRow[];
  /** Legend words: the colour scale's two ends and the two marks. */
  legend: { better: string; worse: string; best: string; worst: string; partial: string | null };
  /** Small print above the footer: what the totals row holds, how a year earlier is found. */
  notes: string[];
}

export type ChartSpec =
  | PeriodTableSpec
  | LineSpec
  | BarsSpec
  | ParetoSpec
  | GrowthGridSpec
  | KpiCardSpec
  | GroupCompareSpec
  | SeasonalProfileSpec;
