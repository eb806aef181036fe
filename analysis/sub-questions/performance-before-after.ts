// Sub-question "performance_before_after": the performance request's time pattern lens.
import { metricByName } from '../catalog.js';
import { comparableFromDays, measureShape } from '../templates/performance-measure.js';
import { presentPerformanceBeforeAfter } from '../present/performance-before-after.js';
import { performanceBeforeAfterTemplate } from '../templates/performance-before-after.js';
import { defineSubQuestion } from './definition.js';
import { unitDidApplies } from '../templates/performance-unit-did.js';
import { capitalise } from './plan-words.js';

export const performanceBeforeAfterSubQuestion = defineSubQuestion({
  name: 'performance_before_after',
  kind: 'performance',
  lens: 'time_pattern',
  // Per group and period: counts, sums and sums of squares add up from a day-level rollup (a
  // distinct count does not: it needs the rows).
  // Per customer (a group with a unit column and a launch, performance-unit-did.ts) it needs the rows.
  rollup: {
    when: (sq, ds) => {
      const metric = metricByName(ds, sq.metrics[0]!);
      const group = sq.comparisonGroup ? ds.comparison_groups.find((g) => g.name === sq.comparisonGroup) : ds.comparison_groups.length === 1 ? ds.comparison_groups[0] : undefined;
      if (group && unitDidApplies(ds, sq, group, metric)) return false;
      return comparableFromDays(measureShape(ds, metric));
    },
    moments: (sq) => sq.metrics.slice(0, 1),
  },
  template: performanceBeforeAfterTemplate,
  present: presentPerformanceBeforeAfter,
  describe: (w) => `${capitalise(w.metric)} before and after the ${w.groupLabel || 'programme'} launch, for ${w.vs}.`,
});
