// Presenter for "kpi_by_segment": bars of the latest complete period's value per segment, each
// label carrying its change on the same period a year earlier.
import { buildBars } from '../charts/build-bars.js';
import { kpiBySegmentWords, rowLabel } from '../captions/kpi-by-segment-caption.js';
import { signedChange } from '../captions/kpi-words.js';
import { metricByName } from '../catalog.js';
import type { KpiBySegmentFinding } from '../findings/kpi.js';
import { valueFormatOf } from '../format.js';
import { comparedText, findingOf, kpiHeader, kpiNotes, kpiSubtitle } from './kpi-header.js';
import type { Presenter } from './presenter.js';
import { inSentence, labelAtStart } from '../captions/grammar.js';

export const presentKpiBySegment: Presenter = (answer, ctx) => {
  const metric = metricByName(ctx.dataset, answer.subQuestion.metrics[0]!);
  const f = findingOf<KpiBySegmentFinding>(answer, 'kpi_by_segment', metric.name);
  if (!f) {
    const title = `${labelAtStart(metric.label)}: no complete ${answer.subQuestion.grain} to break down`;
    return { title, caption: `There is no complete ${answer.subQuestion.grain} of ${inSentence(metric.label)} in the period asked for.`, notes: kpiNotes(answer, ctx, []), chart: null, takeaway: null };
  }
  const words = kpiBySegmentWords(f, metric, ctx.dataset, ctx.audience, ctx.locale);
  const ly = f.total.lastYear?.period ?? null;
  const rows = f.segments.filter((r) => r.value !== null);
  const labelOf = (r: (typeof rows)[number]) => {
    const name = rowLabel(r, f, ctx.dataset, ctx.locale);
    if (!ly) return name;
    const change = r.lastYear && r.lastYear.value !== null ? `${signedChange(r.lastYear, metric, ctx.locale)} YoY` : 'new';
    return `${name} (${change})`;
  };
  const what = comparedText(f.period, ly ? [ly] : [], f.grain, ctx.locale) + ' (YoY: change on the same period a year earlier)';
  const other = rows.find((r) => r.other);
  const chart = rows.length
    ? buildBars({
        ...kpiHeader(answer, metric, words.title, kpiSubtitle(answer, metric, ctx, ly ? what : comparedText(f.period, [], f.grain, ctx.locale)), ctx),
        items: rows.filter((r) => !r.other).map((r) => ({ label: labelOf(r), value: r.value! })),
        // The template already combined the tail in the database: drawn last and neutral, nothing folded again.
        folded: other ? { label: labelOf(other), value: other.value! } : null,
        format: valueFormatOf(metric, ctx.locale),
      })
    : null;
  return { title: words.title, caption: words.caption, notes: kpiNotes(answer, ctx, []), chart, takeaway: chart ? { importance: 55, text: words.title } : null };
};
