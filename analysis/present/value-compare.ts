// Presenter for "value_compare": the two values' series on one chart (the first as the line, the
// second as the overlay), the growth of each and the gap in the words.
import { filterSubtitleParts } from '../captions/scope-words.js';
import { segmentText, spanText } from '../captions/growth-words.js';
import { valueCompareWords } from '../captions/value-compare-caption.js';
import { buildLine } from '../charts/build-line.js';
import { metricByName } from '../catalog.js';
import type { ValueCompareFinding, ValueCompareSeriesFinding } from '../findings/contrast.js';
import { valueFormatOf } from '../format.js';
import type { Finding } from '../types.js';
import { caveatNotes, chartFooter, metricDefinition } from './header.js';
import type { Presenter } from './presenter.js';

export const presentValueCompare: Presenter = (answer, ctx) => {
  const metric = metricByName(ctx.dataset, answer.subQuestion.metrics[0]!);
  const f = answer.findings.find((x): x is ValueCompareFinding => x.type === 'value_compare');
  const words = valueCompareWords(f, metric, ctx.dataset, ctx.locale, ctx.audience);
  const series = answer.findings.filter((x: Finding): x is ValueCompareSeriesFinding => x.type === 'value_compare_series');
  const [first, second] = series;
  const hasValues = series.some((s) => s.points.some((p) => p.value !== null));
  const name = (v: string) => segmentText(v, f?.dimension ?? '', ctx.dataset);
  const chart =
    f && first && second && hasValues
      ? buildLine({
          title: words.title,
          chip: metric.label,
          subtitle: [
            metricDefinition(metric, ctx),
            `${spanText(f.current, ctx.locale)} against ${spanText(f.prior, ctx.locale)}`,
            ...filterSubtitleParts(answer.subQuestion.filters, ctx.dataset),
          ]
            .filter((p) => p !== '')
            .join(' · '),
          footer: chartFooter(answer, ctx),
          ...ctx.chart,
          seriesLabel: name(first.value),
          grain: first.grain,
          points: first.points,
          format: valueFormatOf(metric, ctx.locale),
          overlay: { label: name(second.value), values: second.points.map((p) => p.value) },
        })
      : null;
  return {
    title: words.title,
    caption: words.caption,
    notes: caveatNotes(answer, ctx),
    chart,
    takeaway: f ? { importance: words.clear ? 70 : 50, text: `${words.title}.` } : null,
  };
};
