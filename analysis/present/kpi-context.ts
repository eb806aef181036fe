// Presenter for "kpi_context": the history as a line (the builder marks its high and low) and a
// caption stating where the latest complete period sits in it.
import { grainAdjective } from '../grains.js';
import { buildLine } from '../charts/build-line.js';
import { kpiContextWords } from '../captions/kpi-context-caption.js';
import { periodName } from '../captions/kpi-words.js';
import { metricByName } from '../catalog.js';
import type { KpiContextFinding } from '../findings/kpi.js';
import { valueFormatOf } from '../format.js';
import type { Finding } from '../types.js';
import { caveatNotes, unusualOnChart } from './header.js';
import { findingOf, kpiHeader, kpiNotes, kpiSubtitle } from './kpi-header.js';

import type { Presenter } from './presenter.js';
import { inSentence, labelAtStart } from '../captions/grammar.js';

export const presentKpiContext: Presenter = (answer, ctx) => {
  const sq = answer.subQuestion;
  const metric = metricByName(ctx.dataset, sq.metrics[0]!);
  const f = findingOf<KpiContextFinding>(answer, 'kpi_context', metric.name);
  const series = answer.findings.find((x): x is Extract<Finding, { type: 'series' }> => x.type === 'series' && x.metric === metric.name);
  if (!f || !series) {
    const title = `${labelAtStart(metric.label)}: no complete ${sq.grain} to place in context`;
    return { title, caption: `There is no complete ${sq.grain} of ${inSentence(metric.label)} in the period asked for.`, notes: kpiNotes(answer, ctx, []), chart: null, takeaway: null };
  }
  const words = kpiContextWords(f, metric, ctx.dataset, ctx.audience, ctx.locale);
  const what = `${periodName(f.firstPeriod, f.grain, ctx.locale)} to ${periodName(f.period, f.grain, ctx.locale)}, ${grainAdjective(f.grain)}; latest complete: ${periodName(f.period, f.grain, ctx.locale)}`;
  const unusual = unusualOnChart(answer, metric);
  const chart = buildLine({
    ...kpiHeader(answer, metric, words.title, kpiSubtitle(answer, metric, ctx, what), ctx),
    seriesLabel: metric.label,
    grain: sq.grain,
    points: series.points,
    format: valueFormatOf(metric, ctx.locale),
    ...(unusual ? { unusual } : {}),
  });
  // The caption already says when the latest period is an outlier; other unusual periods stay in the notes.
  const notes = caveatNotes({ ...answer, caveats: answer.caveats.filter((c) => !(c.code === 'outlier' && c.data.period === f.period && f.outlier)) }, ctx);
  return { title: words.title, caption: words.caption, notes, chart, takeaway: { importance: f.outlier ? 75 : 45, text: words.title } };
};
