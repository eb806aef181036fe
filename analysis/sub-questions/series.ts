// Sub-question "series": the trend request's time pattern lens.
import { presentSeries } from '../present/series.js';
import { seriesTemplate } from '../templates/series.js';
import { defineSubQuestion } from './definition.js';
import { capitalise } from './plan-words.js';

export const seriesSubQuestion = defineSubQuestion({
  name: 'series',
  kind: 'trend',
  lens: 'time_pattern',
  rollup: {},
  template: seriesTemplate,
  present: presentSeries,
  drawsSeriesLine: true,
  describe: (w, sq) => `${capitalise(w.grain)} ${w.metric}, ${w.span}, with the highest and lowest ${sq.grain}s marked.`,
});
