// Sub-question "performance_before_after": the performance request's time pattern lens.
import { metricByName } from '../catalog.js';
import { measureShape, totalOfRows } from '../templates/performance-measure.js';
import { presentPerformanceBeforeAfter } from '../present/performance-before-after.js';
import { performanceBeforeAfterTemplate } from '../templates/performance-before-after.js';
import { defineSubQuestion } from './definition.js';
import { capitalise } from './plan-words.js';

export const performanceBeforeAfterSubQuestion = defineSubQuestion({
  name: 'performance_before_after',
  kind: 'performance',
  lens: 'time_pattern',
  // Groups' rows are compared (means, variances), except a plain count's before/after series
  // (bookings per group and period), which is a sum of counts.
  rollup: { when: (sq, ds) => totalOfRows(measureShape(ds, metricByName(ds, sq.metrics[0]!))) },
  template: performanceBeforeAfterTemplate,
  present: presentPerformanceBeforeAfter,
  describe: (w) => `${capitalise(w.metric)} before and after the ${w.groupLabel || 'programme'} launch, for ${w.vs}.`,
});
