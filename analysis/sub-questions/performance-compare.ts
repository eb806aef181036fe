// Sub-question "performance_compare": the performance request's summary lens.
import { presentPerformanceCompare } from '../present/performance-compare.js';
import { performanceCompareTemplate } from '../templates/performance-compare.js';
import { comparedFromDays } from '../templates/performance-measure.js';
import { defineSubQuestion } from './definition.js';
import { capitalise } from './plan-words.js';

export const performanceCompareSubQuestion = defineSubQuestion({
  name: 'performance_compare',
  kind: 'performance',
  lens: 'summary',
  rollup: { when: (sq, ds) => comparedFromDays(sq, ds), moments: (sq) => sq.metrics.slice(0, 1) },
  template: performanceCompareTemplate,
  present: presentPerformanceCompare,
  describe: (w) => `${capitalise(w.metric)}: ${w.vs} (${w.span}), with a significance test and a verdict.`,
});
