// Sub-question "trend_summary": the trend request's summary lens.
import { presentTrendSummary } from '../present/trend-summary.js';
import { trendSummaryTemplate } from '../templates/trend-summary.js';
import { defineSubQuestion } from './definition.js';

export const trendSummarySubQuestion = defineSubQuestion({
  name: 'trend_summary',
  kind: 'trend',
  lens: 'summary',
  rollup: {},
  template: trendSummaryTemplate,
  present: presentTrendSummary,
  drawsSeriesLine: true,
  describe: (w) => `Summary statistics of ${w.grain} ${w.metric} (${w.span}): range, mean, median, spread and outliers.`,
});
