// Sub-question "growth_summary": the growth request's summary lens.
import { presentGrowthSummary } from '../present/growth-summary.js';
import { growthSummaryTemplate } from '../templates/growth-summary.js';
import { defineSubQuestion } from './definition.js';

export const growthSummarySubQuestion = defineSubQuestion({
  name: 'growth_summary',
  kind: 'growth',
  lens: 'summary',
  rollup: {},
  template: growthSummaryTemplate,
  present: presentGrowthSummary,
  describe: (w) => `Summary of ${w.grain} growth rates of ${w.metric}: highest, lowest, typical.`,
});
