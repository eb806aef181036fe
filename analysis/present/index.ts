// Presenters by template name.
import type { Presenter } from './presenter.js';
import { presentSeries } from './series.js';
import { presentKpiBySegment } from './kpi-by-segment.js';
import { presentKpiContext } from './kpi-context.js';
import { presentKpiMix } from './kpi-mix.js';
import { presentKpiSnapshot } from './kpi-snapshot.js';
import { presentSegmentShares } from './trend-segment-shares.js';
import { presentSegmentTrend } from './trend-segment-trend.js';
import { presentTrendSeasonality } from './trend-seasonality.js';
import { presentTrendSummary } from './trend-summary.js';
import { presentTrendTest } from './trend-test.js';
import { presentGrowthDrivers } from './growth-drivers.js';
import { presentGrowthSeries } from './growth-series.js';
import { presentGrowthShareShift } from './growth-share-shift.js';
import { presentGrowthSummary } from './growth-summary.js';

import { presentPerformanceBeforeAfter } from './performance-before-after.js';
import { presentPerformanceBySegment } from './performance-by-segment.js';
import { presentPerformanceCompare } from './performance-compare.js';
import { presentPerformanceFrequency } from './performance-frequency.js';

export type { PresentContext, Presented, Presenter, Takeaway } from './presenter.js';

export const PRESENTERS: Record<string, Presenter> = {
  performance_compare: presentPerformanceCompare,
  performance_frequency: presentPerformanceFrequency,
  performance_before_after: presentPerformanceBeforeAfter,
  performance_by_segment: presentPerformanceBySegment,
  series: presentSeries,
  kpi_snapshot: presentKpiSnapshot,
  kpi_by_segment: presentKpiBySegment,
  kpi_context: presentKpiContext,
  kpi_mix: presentKpiMix,
  trend_test: presentTrendTest,
  trend_seasonality: presentTrendSeasonality,
  trend_summary: presentTrendSummary,
  segment_trend: presentSegmentTrend,
  segment_shares: presentSegmentShares,
  growth_series: presentGrowthSeries,
  growth_drivers: presentGrowthDrivers,
  growth_summary: presentGrowthSummary,
  growth_share_shift: presentGrowthShareShift,
};

export function presenterFor(template: string): Presenter {
  const p = PRESENTERS[template];
  if (!p) throw new Error(`no presenter for template ${template}`);
  return p;
}
