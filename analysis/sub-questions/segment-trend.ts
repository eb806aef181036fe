// Sub-question "segment_trend": the trend request's breakdown lens.
import { presentSegmentTrend } from '../present/trend-segment-trend.js';
import { segmentTrendTemplate } from '../templates/segments-trend.js';
import { defineSubQuestion } from './definition.js';
import { capitalise } from './plan-words.js';

export const segmentTrendSubQuestion = defineSubQuestion({
  name: 'segment_trend',
  kind: 'trend',
  lens: 'breakdown',
  rollup: {},
  template: segmentTrendTemplate,
  present: presentSegmentTrend,
  describe: (w) => `${capitalise(w.metric)} by ${w.dim} over time, with each ${w.dim}'s own trend.`,
});
