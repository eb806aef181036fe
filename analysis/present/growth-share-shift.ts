// Presenter for "growth_share_shift": a Pareto chart of the current span's shares, each bar's
// label carrying its share change in points against a year earlier.
import { buildPareto } from '../charts/build-pareto.js';
import type { ParetoSpec } from '../charts/spec.js';
import { growthShareShiftWords } from '../captions/growth-share-shift-caption.js';
import { formatPoints, growthNotes, segmentText } from '../captions/growth-words.js';
import { metricByName } from '../catalog.js';
import type { GrowthShareShiftFinding } from '../findings/growth.js';
import { formatValue, valueFormatOf } from '../format.js';
import type { Answer, Finding } from '../types.js';
import { twoSpanSubtitle } from './growth-header.js';
import { chartFooter } from './header.js';
import type { PresentContext, Presenter } from './presenter.js';

const OTHERS_LABEL = 'All others';

export const presentGrowthShareShift: Presenter = (answer, ctx) => {
  const metric = metricByName(ctx.dataset, answer.subQuestion.metrics[0]!);
  const f = answer.findings.find(
    (x): x is Extract<Finding, { type: 'growth_share_shift' }> => x.type === 'growth_share_shift' && x.metric === metric.name,
  );
  const words = growthShareShiftWords(metric, f, ctx.dataset, ctx.locale, ctx.audience);
  const chart = f ? shareChart(answer, f, words.title, ctx) : null;
  return {
    title: words.title,
    caption: words.caption,
    notes: growthNotes(answer, ctx.locale, ctx.dataset),
    chart,
    takeaway: chart ? { importance: 45, text: `${words.title}.` } : null,
  };
};

function shareChart(answer: Answer, f: GrowthShareShiftFinding, title: string, ctx: PresentContext): ParetoSpec | null {
  const metric = metricByName(ctx.dataset, f.metric);
  const label = (name: string, change: number | null) => (change === null ? name : `${name} (${formatPoints(change, ctx.locale)})`);
  const items = f.segments
    .filter((s) => s.after !== null)
    .map((s) => ({ label: label(segmentText(s.segment, f.dimension, ctx.dataset), s.shareChange), value: s.after! }));
  const othersLabel = f.others ? label(`${OTHERS_LABEL} (${f.others.count})`, f.others.shareChange) : null;
  if (f.others && f.others.after !== null) items.push({ label: othersLabel!, value: f.others.after });
  if (items.length === 0 || !items.some((i) => i.value > 0)) return null;
  const spec = buildPareto({
    title,
    subtitle: twoSpanSubtitle(answer, metric, f.current, f.prior, ctx),
    footer: chartFooter(answer, ctx),
    ...ctx.chart,
    items,
    format: valueFormatOf(metric, ctx.locale),
    valueLabel: metric.label,
    topN: items.length,
    threshold: f.threshold,
  });
  // The finding already folded the tail; keep its bar last and drawn as the tail.
  const others = spec.bars.filter((b) => b.label === othersLabel);
  const named = spec.bars.filter((b) => b.label !== othersLabel);
  if (others.length === 0) return spec;
  const bars = [...named, ...others.map((b) => ({ ...b, other: true }))];
  let running = 0;
  const total = bars.reduce((a, b) => a + Math.max(0, b.value), 0);
  const fixed = bars.map((b) => {
    running += total > 0 ? Math.max(0, b.value) / total : 0;
    const cumulative = Math.min(1, running);
    return { ...b, cumulative, cumulativeText: formatValue(cumulative, { unit: 'percent', decimals: 0, locale: ctx.locale }) };
  });
  return { ...spec, bars: fixed, thresholdIndex: fixed.findIndex((b) => b.cumulative >= f.threshold - 1e-9) };
}
