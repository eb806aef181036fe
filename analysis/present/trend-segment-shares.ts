// Presenter for "segment_shares": a Pareto chart (bars largest first, running share, 80% mark);
// for a metric that has no shares (an average, a ratio), plain bars of each segment's value.
import { buildBars } from '../charts/build-bars.js';
import { buildLine } from '../charts/build-line.js';
import { buildPareto } from '../charts/build-pareto.js';
import { segmentSharesWords } from '../captions/trend-segments-caption.js';
import { dimensionPlural, segmentLabel } from '../captions/trend-words.js';
import { rowNoun } from '../captions/performance-words.js';
import { inSentence, pluralNoun } from '../captions/grammar.js';
import { dimensionByName, metricByName } from '../catalog.js';
import type { SegmentSharesFinding } from '../findings/segments.js';
import { valueFormatOf } from '../format.js';
import { grainAdjective } from '../grains.js';
import { caveatNotes, chartFooter, chartSubtitle } from './header.js';
import type { Presenter } from './presenter.js';

export const presentSegmentShares: Presenter = (answer, ctx) => {
  const sq = answer.subQuestion;
  const metric = metricByName(ctx.dataset, sq.metrics[0]!);
  const dim = dimensionByName(ctx.dataset, sq.dimension ?? '');
  const f = answer.findings.find((x): x is SegmentSharesFinding => x.type === 'segment_shares' && x.metric === metric.name);
  const words = segmentSharesWords(metric, dim, answer.findings, ctx.audience, ctx.locale, rowNoun(ctx.dataset), { ranking: sq.answersAsked === true, dataset: ctx.dataset, ...(sq.contrast ? { contrast: sq.contrast.values } : {}) });
  // A summed metric asked per row: the bars are each value's mean per row, and the subtitle says so.
  const perRow = f?.perRow
    ? `Mean ${metric.label} per ${f.perRow} (over the ${pluralNoun(f.perRow)} with a value)`
    : f?.perDay
      ? `${metric.label} per day (each ${dim.label.toLowerCase()}'s total over its days)`
      : null;
  const subtitle = chartSubtitle(answer, metric, ctx, { grain: false, ...(perRow ? { definition: perRow } : {}) });
  const header = { title: words.title, chip: metric.label, subtitle, footer: chartFooter(answer, ctx), ...ctx.chart };
  let chart = null;
  if (f?.focus && f.additive && f.focus.series.length > 0) {
    // "What share of flights does ATL have": its share period by period, the answer's own course.
    const focus = f.focus;
    // The line is the segment's share of the total each period, not the metric's own rows.
    const shareDefinition = `${focus.segment}'s share of all ${inSentence(metric.label)} (every ${inSentence(dim.label)}), ${grainAdjective(focus.grain)}`;
    chart = buildLine({
      ...header,
      subtitle: chartSubtitle(answer, metric, ctx, { grain: false, definition: shareDefinition }),
      seriesLabel: `${focus.segment}'s share of ${inSentence(metric.label)}`,
      grain: focus.grain,
      points: focus.series.map((p) => ({ period: p.period, value: p.share, partial: p.partial })),
      format: { unit: 'percent', decimals: 1, locale: ctx.locale },
    });
  } else if (f) {
    // The template folded the tail in SQL: the fold comes last, drawn as the tail, and nothing is folded again.
    const fold = f.rows.find((r) => r.other && r.value !== null);
    const folded = fold ? { label: segmentLabel(fold), value: fold.value! } : null;
    const items = f.rows.flatMap((r) => (r.value === null || r.other ? [] : [{ label: segmentLabel(r), value: r.value }]));
    const format = valueFormatOf(metric, ctx.locale);
    const sharesApply = f.rows.some((r) => r.share !== null);
    if (items.length + (folded ? 1 : 0) > 0) {
      chart = sharesApply
        ? buildPareto({ ...header, items, folded, format, valueLabel: metric.label, threshold: f.threshold, reach: f.countToThreshold !== null && f.folded > 0 ? { count: f.countToThreshold, of: f.segmentCount, noun: dimensionPlural(dim) } : null })
        : buildBars({ ...header, items, folded, format });
    }
  }
  return {
    title: words.title,
    caption: words.caption,
    notes: caveatNotes(answer, ctx),
    chart,
    takeaway: chart ? { importance: 60, text: words.title } : null,
  };
};
