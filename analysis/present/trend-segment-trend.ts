// Presenter for "segment_trend": one bar per segment (its total over the window) with its
// growth in the label; the title names the fastest-growing segment.
import { buildBars } from '../charts/build-bars.js';
import { segmentGrowthText, segmentTrendWords } from '../captions/trend-segments-caption.js';
import { segmentLabel } from '../captions/trend-words.js';
import { dimensionByName, metricByName } from '../catalog.js';
import type { SegmentTrendFinding } from '../findings/segments.js';
import { valueFormatOf } from '../format.js';
import { caveatNotes, chartFooter, chartSubtitle } from './header.js';
import type { Presenter } from './presenter.js';

export const presentSegmentTrend: Presenter = (full, ctx) => {
  // The chart is bars of window totals: nothing is drawn dashed, and growth rates already skip a
  // partial period, so its note would only mislead here.
  const answer = { ...full, caveats: full.caveats.filter((c) => c.code !== 'partial_period') };
  const sq = answer.subQuestion;
  const metric = metricByName(ctx.dataset, sq.metrics[0]!);
  const dim = dimensionByName(ctx.dataset, sq.dimension ?? '');
  const words = segmentTrendWords(metric, dim, answer.findings, ctx.audience, ctx.locale);
  const trends = answer.findings.filter((f): f is SegmentTrendFinding => f.type === 'segment_trend' && f.metric === metric.name);
  const items = trends.flatMap((t) => {
    if (t.total === null || t.other) return [];
    const growth = segmentGrowthText(t, ctx.locale, false);
    return [{ label: growth ? `${segmentLabel(t)} · ${growth}` : segmentLabel(t), value: t.total }];
  });
  // Already folded in SQL: the fold comes last, drawn as the tail, and nothing is folded again.
  const fold = trends.find((t) => t.other && t.total !== null);
  const folded = fold ? { label: segmentLabel(fold), value: fold.total! } : null;
  const chart =
    items.length + (folded ? 1 : 0) > 0
      ? buildBars({
          title: words.title,
          chip: metric.label,
          subtitle: chartSubtitle(answer, metric, ctx, { grain: false }),
          footer: chartFooter(answer, ctx),
          ...ctx.chart,
          items,
          folded,
          format: valueFormatOf(metric, ctx.locale),
        })
      : null;
  return {
    title: words.title,
    caption: words.caption,
    notes: caveatNotes(answer, ctx),
    chart,
    takeaway: chart ? { importance: 55, text: words.title } : null,
  };
};
