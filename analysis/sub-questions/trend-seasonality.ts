// Sub-question "trend_seasonality": the trend request's time pattern lens.
import { presentTrendSeasonality } from '../present/trend-seasonality.js';
import { trendSeasonalityTemplate } from '../templates/trend-seasonality.js';
import { defineSubQuestion } from './definition.js';

export const trendSeasonalitySubQuestion = defineSubQuestion({
  name: 'trend_seasonality',
  kind: 'trend',
  lens: 'time_pattern',
  rollup: {},
  template: trendSeasonalityTemplate,
  present: presentTrendSeasonality,
  describe: (w, sq) =>
    sq.weekdaysAsked
      ? `Which days of the week ${w.flow ? 'are busiest and quietest' : 'run highest and lowest'} for ${w.metric}, then the calendar months.`
      : `Which calendar months ${w.flow ? 'are busiest and quietest' : 'run highest and lowest'} for ${w.metric}, and how consistently across years.`,
});
