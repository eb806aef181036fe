// Sub-question "growth_periods": the two periods a request named, side by side (growth × summary).
import { presentGrowthPeriods } from '../present/growth-periods.js';
import { growthPeriodsTemplate } from '../templates/growth-periods.js';
import { defineSubQuestion } from './definition.js';
import { capitalise } from './plan-words.js';

export const growthPeriodsSubQuestion = defineSubQuestion({
  name: 'growth_periods',
  kind: 'growth',
  lens: 'summary',
  template: growthPeriodsTemplate,
  present: presentGrowthPeriods,
  describe: (w, sq) =>
    sq.beforeAfter
      ? `${capitalise(w.metric)} before and after ${w.span.split(' to ')[0]}: ${w.span} against as many days before it (${w.base}), and the change between them.`
      : sq.priorOutsideData
        ? `${capitalise(w.metric)}, ${w.span}: its figure (${w.base}, to compare with, is before the data starts).`
        : `${capitalise(w.metric)}, ${w.span} against ${w.base}: each period's figure and the change between them.`,
});
