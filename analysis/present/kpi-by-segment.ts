// Presenter for "kpi_by_segment": bars of the latest complete period's value per segment, each
// label carrying its change on the same period a year earlier.
import { buildBars } from '../charts/build-bars.js';
import type { BarsSpec } from '../charts/spec.js';
import { kpiBySegmentWords, rowLabel } from '../captions/kpi-by-segment-caption.js';
import { signedChange } from '../captions/kpi-words.js';
import { metricByName } from '../catalog.js';
import type { KpiBySegmentFinding } from '../findings/kpi.js';
import { valueFormatOf } from '../format.js';
import { comparedText, findingOf, kpiHeader, kpiNotes, kpiSubtitle } from './kpi-header.js';
import type { Presenter } from './presenter.js';

export const presentKpiBySegment: Presenter = (answer, ctx) => {
  const metric = metricByName(ctx.dataset, answer.subQuestion.metrics[0]!);
  const f = findingOf<KpiBySegmentFinding>(answer, 'kpi_by_segment', metric.name);
  if (!f) {
    const title = `${metric.label}: no complete ${answer.subQuestion.grain} to break down`;
    return { title, caption: `There is no complete ${answer.subQuestion.grain} of ${metric.label.toLowerCase()} in the period asked for.`, notes: kpiNotes(answer, ctx, []), chart: null, takeaway: null };
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
  const otherLabels = new Set(rows.filter((r) => r.other).map(labelOf));
  const what = comparedText(f.period, ly ? [ly] : [], f.grain, ctx.locale) + ' (YoY: change on the same period a year earlier)';
  const chart = rows.length
    ? markOthers(
        buildBars({
          ...kpiHeader(answer, words.title, kpiSubtitle(answer, metric, ctx, ly ? what : comparedText(f.period, [], f.grain, ctx.locale)), ctx),
          items: rows.map((r) => ({ label: labelOf(r), value: r.value! })),
          format: valueFormatOf(metric, ctx.locale),
          // The template already combined the tail in the database; the builder must not fold again.
          topN: rows.length,
        }),
        otherLabels,
      )
    : null;
  return { title: words.title, caption: words.caption, notes: kpiNotes(answer, ctx, []), chart, takeaway: chart ? { importance: 55, text: words.title } : null };
};

/** The database-combined "All others" bar is drawn neutral and last, like the builder's own. */
function markOthers(spec: BarsSpec, labels: Set<string>): BarsSpec {
  const bars = spec.bars.map((b) => (labels.has(b.label) ? { ...b, other: true } : b));
  return { ...spec, bars: [...bars.filter((b) => !b.other), ...bars.filter((b) => b.other)] };
}
