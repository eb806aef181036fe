// Presenter for "kpi_snapshot": a KPI card (arrows and colours by higher_is_better) and a
// caption stating the latest complete period against a year earlier (first: it shares the season)
// and the period before.
import { buildKpiCard } from '../charts/build-kpi-card.js';
import { kpiSnapshotWords } from '../captions/kpi-snapshot-caption.js';
import { metricByName, metricDirection } from '../catalog.js';
import type { KpiSnapshotFinding } from '../findings/kpi.js';
import { valueFormatOf } from '../format.js';
import { comparedText, findingOf, kpiHeader, kpiNotes, kpiSubtitle } from './kpi-header.js';
import type { Presenter } from './presenter.js';
import { inSentence, labelAtStart } from '../captions/grammar.js';

export const presentKpiSnapshot: Presenter = (answer, ctx) => {
  const metric = metricByName(ctx.dataset, answer.subQuestion.metrics[0]!);
  const f = findingOf<KpiSnapshotFinding>(answer, 'kpi_snapshot', metric.name);
  if (!f) {
    const title = `${labelAtStart(metric.label)}: no complete ${answer.subQuestion.grain} to report`;
    return { title, caption: `There is no complete ${answer.subQuestion.grain} of ${inSentence(metric.label)} in the period asked for.`, notes: kpiNotes(answer, ctx, []), chart: null, takeaway: null };
  }
  const words = kpiSnapshotWords(f, metric, ctx.dataset, ctx.audience, ctx.locale, answer.caveats);
  const subtitle = kpiSubtitle(answer, metric, ctx, comparedText(f.period, [f.lastYear?.period ?? null, f.previous.period], f.grain, ctx.locale));
  const chart = buildKpiCard({
    ...kpiHeader(answer, metric, words.title, subtitle, ctx),
    metricLabel: metric.label,
    format: valueFormatOf(metric, ctx.locale),
    higherIsBetter: metricDirection(metric),
    grain: f.grain,
    current: { period: f.period, value: f.value },
    previous: { period: f.previous.period, value: f.previous.value },
    ...(f.lastYear ? { lastYear: { period: f.lastYear.period, value: f.lastYear.value } } : {}),
  });
  return {
    title: words.title,
    caption: words.caption,
    notes: kpiNotes(answer, ctx, ['partial_period_excluded']),
    chart,
    takeaway: { importance: 70, text: words.title },
  };
};
