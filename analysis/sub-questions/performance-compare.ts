// Sub-question "performance_compare": the performance request's summary lens.
import { presentPerformanceCompare } from '../present/performance-compare.js';
import { performanceCompareTemplate } from '../templates/performance-compare.js';
import { defineSubQuestion } from './definition.js';
import { capitalise } from './plan-words.js';

export const performanceCompareSubQuestion = defineSubQuestion({
  name: 'performance_compare',
  kind: 'performance',
  lens: 'summary',
  template: performanceCompareTemplate,
  present: presentPerformanceCompare,
  describe: (w) => `${capitalise(w.metric)}: ${w.vs} (${w.span}), with a significance test and a verdict.`,
});
