// Every sub-question template by name (one file per family beside this one).
import type { SubQuestion } from '../types.js';
import { seriesTemplate } from './series.js';
import { growthDriversTemplate } from './growth-drivers.js';
import { growthSeriesTemplate } from './growth-series.js';
import { growthShareShiftTemplate } from './growth-share-shift.js';
import { growthSummaryTemplate } from './growth-summary.js';
import { segmentSharesTemplate } from './segments-shares.js';
import { segmentTrendTemplate } from './segments-trend.js';
import { trendSeasonalityTemplate } from './trend-seasonality.js';
import { trendSummaryTemplate } from './trend-summary.js';
import { trendTestTemplate } from './trend-test.js';
import { kpiBySegmentTemplate } from './kpi-by-segment.js';
import { kpiContextTemplate } from './kpi-context.js';
import { kpiMixTemplate } from './kpi-mix.js';
import { kpiSnapshotTemplate } from './kpi-snapshot.js';
import { performanceBeforeAfterTemplate } from './performance-before-after.js';
import { performanceBySegmentTemplate } from './performance-by-segment.js';
import { performanceCompareTemplate } from './performance-compare.js';
import { performanceFrequencyTemplate } from './performance-frequency.js';
import type { Template } from './template.js';

export type { ReadContext, Reading, Template } from './template.js';

export const TEMPLATES: Record<string, Template> = {
  [performanceCompareTemplate.name]: performanceCompareTemplate,
  [performanceFrequencyTemplate.name]: performanceFrequencyTemplate,
  [performanceBeforeAfterTemplate.name]: performanceBeforeAfterTemplate,
  [performanceBySegmentTemplate.name]: performanceBySegmentTemplate,
  [seriesTemplate.name]: seriesTemplate,
  [kpiSnapshotTemplate.name]: kpiSnapshotTemplate,
  [kpiBySegmentTemplate.name]: kpiBySegmentTemplate,
  [kpiContextTemplate.name]: kpiContextTemplate,
  [kpiMixTemplate.name]: kpiMixTemplate,
  [growthSeriesTemplate.name]: growthSeriesTemplate,
  [growthDriversTemplate.name]: growthDriversTemplate,
  [growthSummaryTemplate.name]: growthSummaryTemplate,
  [growthShareShiftTemplate.name]: growthShareShiftTemplate,
  [trendTestTemplate.name]: trendTestTemplate,
  [trendSeasonalityTemplate.name]: trendSeasonalityTemplate,
  [trendSummaryTemplate.name]: trendSummaryTemplate,
  [segmentTrendTemplate.name]: segmentTrendTemplate,
  [segmentSharesTemplate.name]: segmentSharesTemplate,
};

export function templateFor(sq: SubQuestion): Template {
  const t = TEMPLATES[sq.template];
  if (!t) throw new Error(`no template named ${sq.template}`);
  return t;
}
