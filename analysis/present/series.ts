// Presenter for the "series" template: a line with the high and low marked.
import { seriesWords } from '../captions/series-caption.js';
import { metricByName } from '../catalog.js';
import { caveatNotes, seriesLineChart } from './header.js';
import type { Presenter } from './presenter.js';

export const presentSeries: Presenter = (answer, ctx) => {
  const sq = answer.subQuestion;
  const metric = metricByName(ctx.dataset, sq.metrics[0]!);
  const words = seriesWords(metric, sq.grain, answer.findings, ctx.locale);
  const chart = seriesLineChart(answer, metric, words.title, ctx);
  return {
    title: words.title,
    caption: words.caption,
    notes: caveatNotes(answer, ctx),
    chart,
    takeaway: chart ? { importance: 50, text: words.caption } : null,
  };
};
