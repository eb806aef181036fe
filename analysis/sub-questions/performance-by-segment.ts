// Sub-question "performance_by_segment": the performance request's breakdown lens.
import { presentPerformanceBySegment } from '../present/performance-by-segment.js';
import { performanceBySegmentTemplate } from '../templates/performance-by-segment.js';
import { comparedFromDays } from '../templates/performance-measure.js';
import { defineSubQuestion } from './definition.js';
import { capitalise } from './plan-words.js';

export const performanceBySegmentSubQuestion = defineSubQuestion({
  name: 'performance_by_segment',
  kind: 'performance',
  lens: 'breakdown',
  rollup: { when: (sq, ds) => comparedFromDays(sq, ds), moments: (sq) => sq.metrics.slice(0, 1) },
  template: performanceBySegmentTemplate,
  present: presentPerformanceBySegment,
  describe: (w) => `${capitalise(w.metric)}: ${w.vs} within each ${w.dim}.`,
});
