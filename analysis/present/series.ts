// Presenter for the "series" template: a line with the high and low marked.
import { buildLine } from '../charts/build-line.js';
import { seriesWords } from '../captions/series-caption.js';
import { metricByName } from '../catalog.js';
import { valueFormatOf } from '../format.js';
import type { Finding } from '../types.js';
import { caveatNotes, chartHeader } from './header.js';
import type { Presenter } from './presenter.js';

export const presentSeries: Presenter = (answer, ctx) => {
  const sq = answer.subQuestion;
  const metric = metricByName(ctx.dataset, sq.metrics[0]!);
  const words = seriesWords(metric, sq.grain, answer.findings, ctx.locale);
  const series = answer.findings.find((f): f is Extract<Finding, { type: 'series' }> => f.type === 'series' && f.metric === metric.name);
  const chart =
    series && series.points.some((p) => p.value !== null)
      ? buildLine({
          ...chartHeader(answer, metric, words.title, ctx),
          seriesLabel: metric.label,
          grain: sq.grain,
          points: series.points,
          format: valueFormatOf(metric, ctx.locale),
        })
      : null;
  return {
    title: words.title,
    caption: words.caption,
    notes: caveatNotes(answer, ctx),
    chart,
    takeaway: chart ? { importance: 50, text: words.caption } : null,
  };
};
