// Sub-question "performance_frequency": the performance request's distribution lens.
import { presentPerformanceFrequency } from '../present/performance-frequency.js';
import { performanceFrequencyTemplate } from '../templates/performance-frequency.js';
import { defineSubQuestion } from './definition.js';

export const performanceFrequencySubQuestion = defineSubQuestion({
  name: 'performance_frequency',
  kind: 'performance',
  lens: 'distribution',
  template: performanceFrequencyTemplate,
  present: presentPerformanceFrequency,
  describe: (w) => `How many ${w.metric} each ${w.unit} has: ${w.vs} (${w.span}).`,
});
