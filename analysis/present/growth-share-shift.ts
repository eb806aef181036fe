// Presenter for "growth_share_shift": a Pareto chart of the current span's shares, each bar's
// label carrying its share change in points against a year earlier.
import { buildPareto } from '../charts/build-pareto.js';
import type { ParetoSpec } from '../charts/spec.js';
import { growthShareShiftWords } from '../captions/growth-share-shift-caption.js';
import { formatPoints, growthNotes, segmentText } from '../captions/growth-words.js';
import { metricByName } from '../catalog.js';
import type { GrowthShareShiftFinding } from '../findings/growth.js';
import { valueFormatOf } from '../format.js';
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
  // The bracket is one unit: no-break spaces keep "(+1.0 pts)" from wrapping as "(+1.0" / "pts)".
  const label = (name: string, change: number | null) => (change === null ? name : `${name} (${formatPoints(change, ctx.locale).replace(/ /g, '\u00A0')})`);
  const items = f.segments
    .filter((s) => s.after !== null)
    .map((s) => ({ label: label(segmentText(s.segment, f.dimension, ctx.dataset), s.shareChange), value: s.after! }));
  // The finding already folded the tail: its bar stays last, drawn as the tail.
  const folded = f.others && f.others.after !== null ? { label: label(`${OTHERS_LABEL} (${f.others.count})`, f.others.shareChange), value: f.others.after } : null;
  if (![...items, ...(folded ? [folded] : [])].some((i) => i.value > 0)) return null;
  return buildPareto({
    title,
    chip: metric.label,
    subtitle: twoSpanSubtitle(answer, metric, f.current, f.prior, ctx),
    footer: chartFooter(answer, ctx),
    ...ctx.chart,
    items,
    format: valueFormatOf(metric, ctx.locale),
    valueLabel: metric.label,
    folded,
    threshold: f.threshold,
  });
}
