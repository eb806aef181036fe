// Sub-question "growth_share_shift": the growth request's distribution lens.
import { presentGrowthShareShift } from '../present/growth-share-shift.js';
import { growthShareShiftTemplate } from '../templates/growth-share-shift.js';
import { defineSubQuestion } from './definition.js';
import { longerThanAYear } from './plan-words.js';

export const growthShareShiftSubQuestion = defineSubQuestion({
  name: 'growth_share_shift',
  kind: 'growth',
  lens: 'distribution',
  rollup: {},
  template: growthShareShiftTemplate,
  present: presentGrowthShareShift,
  describe: (w, sq) =>
    w.ends
      ? `How each ${w.dim}'s share of ${w.metric} shifted: ${w.ends}.`
      : longerThanAYear(sq.window) && !sq.compareWindow
      ? `How each ${w.dim}'s share of ${w.metric} shifted: the last complete year in ${w.span} against the one before.`
      : `How each ${w.dim}'s share of ${w.metric} shifted, ${w.span} against ${w.base}.`,
});
