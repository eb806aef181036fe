// Sub-question "period_table": several metrics side by side, period by period (a view of the
// metrics over time, so trend × time pattern); the plan opens with it when a question names two or
// more metrics at a grain. Every number is a metric per period or over the window, so it reads the
// run's rollup whenever its metrics can be rebuilt from it.
import { presentPeriodTable } from '../present/period-table.js';
import { periodTableTemplate } from '../templates/period-table.js';
import { defineSubQuestion } from './definition.js';

export const periodTableSubQuestion = defineSubQuestion({
  name: 'period_table',
  kind: 'trend',
  lens: 'time_pattern',
  rollup: {},
  template: periodTableTemplate,
  present: presentPeriodTable,
  describe: (w, sq) =>
    `A table of ${w.metric} ${sq.grain} by ${sq.grain} (${w.span}): each with its change on the ${sq.grain} before and on a year earlier, a totals row, and the best and worst ${sq.grain}s marked.`,
});
