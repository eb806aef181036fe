// Presenter for "kpi_mix": a Pareto chart of the latest complete period's shares, each label
// carrying its share change in points on a year earlier.
import { buildPareto } from '../charts/build-pareto.js';
import { kpiMixWords, mixRowLabel, shareOfLabel } from '../captions/kpi-mix-caption.js';
import { periodName, points } from '../captions/kpi-words.js';
import { metricByName } from '../catalog.js';
import type { KpiMixFinding } from '../findings/kpi.js';
import { valueFormatOf } from '../format.js';
import { findingOf, kpiHeader, kpiNotes, kpiSubtitle } from './kpi-header.js';
import type { Presenter } from './presenter.js';
import { inSentence, labelAtStart } from '../captions/grammar.js';

export const presentKpiMix: Presenter = (answer, ctx) => {
  const metric = metricByName(ctx.dataset, answer.subQuestion.metrics[0]!);
  const f = findingOf<KpiMixFinding>(answer, 'kpi_mix', metric.name);
  if (!f) {
    const title = `${labelAtStart(metric.label)}: no complete ${answer.subQuestion.grain} to split`;
    return { title, caption: `There is no complete ${answer.subQuestion.grain} of ${inSentence(metric.label)} in the period asked for.`, notes: kpiNotes(answer, ctx, []), chart: null, takeaway: null };
  }
  const words = kpiMixWords(f, metric, ctx.dataset, ctx.audience, ctx.locale);
  const base = f.shareOf ? metricByName(ctx.dataset, f.shareOf) : null;
  const ly = f.lastYearPeriod ? periodName(f.lastYearPeriod, f.grain, ctx.locale) : null;
  const items = f.segments
    .filter((r) => r.value > 0)
    .map((r) => {
      const name = mixRowLabel(r, f, ctx.dataset, ctx.locale);
      // The change in points in its one form ("+1.3 pts", formatPointChange), as in the caption.
      const change = ly && r.lastYearValue === 0 ? 'new' : r.shareChange === null ? null : points(r.shareChange, ctx.locale);
      return { label: change ? `${name} (${change})` : name, value: r.value };
    });
  const what = `Shares of ${shareOfLabel(f, ctx.dataset)}, ${periodName(f.period, f.grain, ctx.locale)}${ly ? `; in brackets, the change in share on ${ly} in points` : ''}`;
  const chart =
    items.length && f.countToThreshold !== null
      ? buildPareto({
          ...kpiHeader(answer, metric, words.title, kpiSubtitle(answer, metric, ctx, what), ctx),
          items,
          format: base ? valueFormatOf(base, ctx.locale) : { unit: 'count', locale: ctx.locale },
          valueLabel: base?.label ?? 'Rows',
          threshold: f.threshold,
        })
      : null;
  return { title: words.title, caption: words.caption, notes: kpiNotes(answer, ctx, []), chart, takeaway: chart ? { importance: 50, text: words.title } : null };
};
