// Presenter for "growth_periods": the two named periods as two bars, earlier first.
import { buildBars } from '../charts/build-bars.js';
import type { BarsSpec } from '../charts/spec.js';
import { spansVerdict } from '../captions/growth-drivers-caption.js';
import { growthPeriodsWords } from '../captions/growth-periods-caption.js';
import { growthNotes, spanText } from '../captions/growth-words.js';
import { metricByName } from '../catalog.js';
import type { GrowthPeriodsFinding } from '../findings/growth.js';
import { valueFormatOf } from '../format.js';
import type { Answer, Finding } from '../types.js';
import { twoSpanSubtitle } from './growth-header.js';
import { chartFooter, statedMetric } from './header.js';
import { withVerdict, type PresentContext, type Presenter } from './presenter.js';

export const presentGrowthPeriods: Presenter = (answer, ctx) => {
  const metric = metricByName(ctx.dataset, answer.subQuestion.metrics[0]!);
  const f = answer.findings.find((x): x is Extract<Finding, { type: 'growth_periods' }> => x.type === 'growth_periods' && x.metric === metric.name);
  const words = growthPeriodsWords(metric, f, ctx.locale);
  const chart = f ? periodsChart(answer, f, words.title, ctx) : null;
  // A before/after with no group to set against: anything else that changed over the same months
  // (the season among them) moves the figures too.
  const caution = answer.subQuestion.beforeAfter && f ? ' A before/after comparison is not an experiment: the season and anything else that changed over the same months can account for part of the difference.' : '';
  return {
    title: words.title,
    caption: `${words.caption}${caution}`,
    // The caption already says the earlier period has no figure: its note would say it again.
    notes: growthNotes(f && (f.total.before === null) ? { ...answer, caveats: answer.caveats.filter((c) => !(c.code === 'no_data' && c.data.window === 'prior')) } : answer, ctx.locale, ctx.dataset),
    chart,
    // The comparison the request named: its verdict is this answer's.
    takeaway: f ? withVerdict({ importance: 65, text: `${words.title}.` }, spansVerdict(statedMetric(answer, metric), f, ctx.locale)) : null,
  };
};

function periodsChart(answer: Answer, f: GrowthPeriodsFinding, title: string, ctx: PresentContext): BarsSpec | null {
  const metric = metricByName(ctx.dataset, f.metric);
  const sides = [
    { span: f.prior, value: f.total.before },
    { span: f.current, value: f.total.after },
  ].sort((a, b) => (a.span.start < b.span.start ? -1 : 1));
  const items = sides.filter((s) => s.value !== null).map((s) => ({ label: spanText(s.span, ctx.locale), value: s.value! }));
  if (items.length === 0) return null;
  return buildBars({
    title,
    chip: statedMetric(answer, metric).label,
    subtitle: twoSpanSubtitle(answer, metric, f.current, f.prior, ctx, f.perDay !== undefined),
    footer: chartFooter(answer, ctx),
    ...ctx.chart,
    items,
    format: valueFormatOf(metric, ctx.locale),
    signed: items.some((i) => i.value < 0),
    // The bars are the two periods' own figures, not changes: no rise/fall colours or legend
    // (the chart had labelled both periods' bars "Increase").
  });
}
