// Findings of the period table: several metrics side by side, period by period, each with its
// change on the period before and on the same period a year earlier, its best and worst periods,
// and the cross-metric facts the takeaway is written from. Numbers and ISO dates only.
import type { MetricKind } from '../../config/schema.js';
import type { DateWindow, Grain } from '../types.js';

/** How a change is stated: relative (percent), a difference of fractions (points), or in the metric's own units. */
export type ChangeBasis = 'percent' | 'points' | 'units';

/** What the totals row holds for a metric: the sum, the metric over the whole window, or the mean of its periods. */
export type TotalRule = 'sum' | 'overall' | 'mean';

export interface PeriodTableCell {
  value: number | null;
  /** Change on the period before, in the column's basis (a fraction for percent and points); null when not comparable. */
  vsPrevious: number | null;
  /** Change on the same period a year earlier, likewise. */
  vsYearEarlier: number | null;
  /** The metric's best or worst complete period in the window. */
  mark: 'best' | 'worst' | null;
}

export interface PeriodTableRow {
  /** ISO date the period starts on. */
  period: string;
  /** Only part of the period is covered: shown, never ranked, and no change is stated for or against it. */
  partial: boolean;
  /** For a partial period, the first and last days it holds (inclusive, ISO). */
  covered?: { from: string; to: string };
  /** One per column, in column order. */
  cells: PeriodTableCell[];
}

export interface PeriodExtreme {
  period: string;
  value: number;
}

export interface PeriodTableColumn {
  metric: string;
  /** The metric's kind of quantity (analysis/catalog.ts metricKind): it sets the change's basis and the total's rule. */
  kind: MetricKind;
  basis: ChangeBasis;
  higherIsBetter: boolean | null;
  total: { rule: TotalRule; value: number | null };
  /** Highest and lowest complete periods (ties keep the earliest); null with fewer than two distinct values. */
  high: PeriodExtreme | null;
  low: PeriodExtreme | null;
}

export interface PeriodTableFinding {
  type: 'period_table';
  grain: Grain;
  /** The window the rows cover (the asked window cut to the data). */
  span: DateWindow;
  /** How the year-earlier period is found: a calendar year back, the same ISO week, or 52 weeks back for days. */
  yearEarlier: 'calendar' | 'iso_week' | 'weeks_52';
  columns: PeriodTableColumn[];
  rows: PeriodTableRow[];
}

/** The latest complete period's changes across the metrics: the recent direction the takeaway states. */
export interface TableLatestFinding {
  type: 'table_latest';
  period: string;
  against: 'year_earlier' | 'previous';
  /** The period compared with. */
  base: string;
  changes: { metric: string; basis: ChangeBasis; change: number }[];
}

/**
 * One metric of the table is another divided by a third in every complete period (the average fare
 * is revenue over bookings): its change is then explained by theirs.
 */
export interface TableQuotientFinding {
  type: 'table_quotient';
  ratio: string;
  numerator: string;
  denominator: string;
  /** Complete periods where all three have values and the identity was checked. */
  periods: number;
}

export type TableFinding = PeriodTableFinding | TableLatestFinding | TableQuotientFinding;
