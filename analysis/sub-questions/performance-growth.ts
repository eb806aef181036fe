// Sub-question "performance_growth": "did the members grow faster than the others?".
import { presentPerformanceGrowth } from '../present/performance-growth.js';
import { performanceGrowthTemplate } from '../templates/performance-growth.js';
import { defineSubQuestion } from './definition.js';
import { capitalise } from './plan-words.js';

export const performanceGrowthSubQuestion = defineSubQuestion({
  name: 'performance_growth',
  kind: 'performance',
  lens: 'summary',
  template: performanceGrowthTemplate,
  present: presentPerformanceGrowth,
  describe: (w) => `${capitalise(w.metric)}: growth of ${w.vs} against the same dates a year earlier (${w.span}), in total and like for like.`,
});
