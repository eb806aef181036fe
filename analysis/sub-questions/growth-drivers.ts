// Sub-question "growth_drivers": the growth request's breakdown lens.
import { presentGrowthDrivers } from '../present/growth-drivers.js';
import { growthDriversTemplate } from '../templates/growth-drivers.js';
import { defineSubQuestion } from './definition.js';

export const growthDriversSubQuestion = defineSubQuestion({
  name: 'growth_drivers',
  kind: 'growth',
  lens: 'breakdown',
  rollup: {},
  template: growthDriversTemplate,
  present: presentGrowthDrivers,
  describe: (w) => `Which ${w.dim}s drove the change in ${w.metric}, ${w.span} against a year earlier.`,
});
