// Sub-question "growth_series": the growth request's time pattern lens.
import { presentGrowthSeries } from '../present/growth-series.js';
import { growthSeriesTemplate } from '../templates/growth-series.js';
import { defineSubQuestion } from './definition.js';

export const growthSeriesSubQuestion = defineSubQuestion({
  name: 'growth_series',
  kind: 'growth',
  lens: 'time_pattern',
  rollup: {},
  template: growthSeriesTemplate,
  present: presentGrowthSeries,
  describe: (w) => `How fast ${w.metric} ${w.is} growing: ${w.grain} change on the previous period and on the same period last year.`,
});
