// Sub-question "trend_test": the trend request's time pattern lens.
import { presentTrendTest } from '../present/trend-test.js';
import { trendTestTemplate } from '../templates/trend-test.js';
import { defineSubQuestion } from './definition.js';

export const trendTestSubQuestion = defineSubQuestion({
  name: 'trend_test',
  kind: 'trend',
  lens: 'time_pattern',
  rollup: {},
  template: trendTestTemplate,
  present: presentTrendTest,
  drawsSeriesLine: true,
  describe: (w) => `${w.is === 'are' ? 'Are' : 'Is'} ${w.metric} trending up or down (${w.span})? Direction, strength and the change since the peak.`,
});
