// Presenter for "growth_drivers": bars of each segment's change between the two spans, the
// largest driver named in the title.
import { buildBars } from '../charts/build-bars.js';
import type { BarsSpec } from '../charts/spec.js';
import { growthDriversWords, spansVerdict } from '../captions/growth-drivers-caption.js';
import { growthNotes, segmentText } from '../captions/growth-words.js';
import { metricByName, metricDirection } from '../catalog.js';
import type { GrowthDriverSegment, GrowthDriversFinding } from '../findings/growth.js';
import { valueFormatOf } from '../format.js';
import type { Answer, Finding } from '../types.js';
import { twoSpanSubtitle } from './growth-header.js';
import { chartFooter, statedMetric } from './header.js';
import { withVerdict, type PresentContext, type Presenter } from './presenter.js';

const OTHERS_LABEL = 'All others';

export const presentGrowthDrivers: Presenter = (answer, ctx) => {
  const metric = metricByName(ctx.dataset, answer.subQuestion.metrics[0]!);
  const f = answer.findings.find((x): x is Extract<Finding, { type: 'growth_drivers' }> => x.type === 'growth_drivers' && x.metric === metric.name);
  const words = growthDriversWords(metric, f, ctx.dataset, ctx.locale, ctx.audience);
  const chart = f ? driversChart(answer, f, words.title, ctx) : null;
  return {
    title: words.title,
    caption: words.caption,
    notes: growthNotes(answer, ctx.locale, ctx.dataset),
    chart,
    // A comparison the request named is answered here, on the spans it named (the year-so-far
    // verdict of growth_series answers only a request that named none).
    takeaway: chart ? withVerdict({ importance: 55, text: `${words.title}.` }, f && answer.subQuestion.compareWindow ? spansVerdict(statedMetric(answer, metric), f, ctx.locale) : null) : null,
  };
};

function driversChart(answer: Answer, f: GrowthDriversFinding, title: string, ctx: PresentContext): BarsSpec | null {
  const metric = metricByName(ctx.dataset, f.metric);
  if (f.byRate) return ratesChart(answer, f, title, ctx);
  const items = f.segments
    .filter((s) => s.change !== null)
    .map((s) => ({ label: `${segmentText(s.segment, f.dimension, ctx.dataset)}${presenceMark(f, s.segment)}`, value: s.change! }));
  // The finding already folded the tail by size of change: its bar stays last, in the neutral colour.
  const folded = f.others && f.others.change !== null ? { label: `${OTHERS_LABEL} (${f.others.count})`, value: f.others.change } : null;
  if (items.length === 0 && !folded) return null;
  return buildBars({
    title,
    chip: statedMetric(answer, metric).label,
    subtitle: twoSpanSubtitle(answer, metric, f.current, f.prior, ctx, f.perDay !== undefined),
    footer: chartFooter(answer, ctx),
    ...ctx.chart,
    items,
    folded,
    format: valueFormatOf(metric, ctx.locale),
    // A change reads with its sign ("+€32.9K", "−€19.2K"), a rise in the metric's good colour.
    signed: true,
    higherIsBetter: metricDirection(metric) ?? undefined,
  });
}

/** " (new)" or " (closed)" beside a bar whose segment is left out of like-for-like growth. */
function presenceMark(f: GrowthDriversFinding, segment: string | null): string {
  const changed = f.likeForLike?.excluded.find((x) => x.segment === segment);
  if (!changed) return '';
  return changed.opened && changed.closed ? ' (not throughout)' : changed.opened ? ' (new)' : ' (closed)';
}

/**
 * "Which channel is growing fastest": each segment's own growth rate (in points for a rate or
 * share), in the ranking's order; a segment without a like-for-like rate has no bar.
 */
function ratesChart(answer: Answer, f: GrowthDriversFinding, title: string, ctx: PresentContext): BarsSpec | null {
  const metric = metricByName(ctx.dataset, f.metric);
  const points = metric.unit === 'percent';
  const items = f.byRate!.segments
    .map((seg) => f.segments.find((s) => s.segment === seg))
    .filter((s): s is GrowthDriverSegment => s !== undefined && (points ? s.change : s.relative) !== null)
    .map((s) => ({ label: segmentText(s.segment, f.dimension, ctx.dataset), value: (points ? s.change : s.relative)! }));
  if (items.length === 0) return null;
  return buildBars({
    title,
    chip: `${statedMetric(answer, metric).label}: growth rate`,
    subtitle: twoSpanSubtitle(answer, metric, f.current, f.prior, ctx, f.perDay !== undefined),
    footer: chartFooter(answer, ctx),
    ...ctx.chart,
    items,
    folded: null,
    format: points ? valueFormatOf(metric, ctx.locale) : { unit: 'percent', decimals: 1, locale: ctx.locale },
    signed: true,
    higherIsBetter: metricDirection(metric) ?? undefined,
  });
}
