// Sub-question "growth_drivers": the growth request's breakdown lens.
import { presentGrowthDrivers } from '../present/growth-drivers.js';
import { growthDriversTemplate } from '../templates/growth-drivers.js';
import { defineSubQuestion } from './definition.js';
import { pluralNoun } from '../captions/grammar.js';
import { longerThanAYear } from './plan-words.js';

export const growthDriversSubQuestion = defineSubQuestion({
  name: 'growth_drivers',
  kind: 'growth',
  lens: 'breakdown',
  rollup: {},
  template: growthDriversTemplate,
  present: presentGrowthDrivers,
  // A window longer than a year is compared as its last complete year (or 12 months) against the one before: never overlapping.
  describe: (w, sq) =>
    sq.growthRank
      ? `Which ${pluralNoun(w.dim)} ${sq.growthRank === 'fastest' ? 'grew fastest' : 'grew slowest'} in ${w.metric}, each by its own growth rate: ${w.ends || (longerThanAYear(sq.window) && !sq.compareWindow ? `the last complete year in ${w.span} against the one before` : `${w.span} against ${w.base}`)}.`
      : w.ends
      ? `Which ${pluralNoun(w.dim)} drove the change in ${w.metric}: ${w.ends}.`
      : longerThanAYear(sq.window) && !sq.compareWindow
      ? `Which ${pluralNoun(w.dim)} drove the change in ${w.metric}: the last complete year in ${w.span} against the one before.`
      : `Which ${pluralNoun(w.dim)} drove the change in ${w.metric}, ${w.span} against ${w.base}.`,
});
