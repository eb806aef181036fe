// Sub-question "performance_before_after": the performance request's time pattern lens.
import { metricByName } from '../catalog.js';
import { comparableFromDays, measureShape } from '../templates/performance-measure.js';
import { presentPerformanceBeforeAfter } from '../present/performance-before-after.js';
import { performanceBeforeAfterTemplate } from '../templates/performance-before-after.js';
import { defineSubQuestion } from './definition.js';
import { capitalise } from './plan-words.js';

export const performanceBeforeAfterSubQuestion = defineSubQuestion({
  name: 'performance_before_after',
  kind: 'performance',
  lens: 'time_pattern',
  // Per group and period: counts, sums and sums of squares add up from a day-level rollup (a
  // distinct count does not: it needs the rows).
  rollup: { when: (sq, ds) => comparableFromDays(measureShape(ds, metricByName(ds, sq.metrics[0]!))), moments: (sq) => sq.metrics.slice(0, 1) },
  template: performanceBeforeAfterTemplate,
  present: presentPerformanceBeforeAfter,
  describe: (w) => `${capitalise(w.metric)} before and after the ${w.groupLabel || 'programme'} launch, for ${w.vs}.`,
});
