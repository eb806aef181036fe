// Presenter for "segment_trend": one bar per segment, its yearly growth; the title names the
// fastest-growing segment (or the two too close to tell apart), so the bars compare what it says.
import { buildBars } from '../charts/build-bars.js';
import { segmentTrendWords } from '../captions/trend-segments-caption.js';
import { segmentLabel } from '../captions/trend-words.js';
import { inSentence } from '../captions/grammar.js';
import { dimensionByName, metricByName, metricDirection } from '../catalog.js';
import type { SegmentTrendFinding, SegmentTrendOverviewFinding } from '../findings/segments.js';
import { caveatNotes, chartFooter, chartSubtitle } from './header.js';
import type { Presenter } from './presenter.js';
import { POINTS, valueFormatOf } from '../format.js';
import { tableToCsv } from '../table-csv.js';
import type { ResultColumn } from '../types.js';

export const presentSegmentTrend: Presenter = (full, ctx) => {
  // The chart is bars of window totals: nothing is drawn dashed, and growth rates already skip a
  // partial period, so its note would only mislead here.
  const answer = { ...full, caveats: full.caveats.filter((c) => c.code !== 'partial_period') };
  const sq = answer.subQuestion;
  const metric = metricByName(ctx.dataset, sq.metrics[0]!);
  const dim = dimensionByName(ctx.dataset, sq.dimension ?? '');
  const words = segmentTrendWords(metric, dim, answer.findings, ctx.audience, ctx.locale);
  const trends = answer.findings.filter((f): f is SegmentTrendFinding => f.type === 'segment_trend' && f.metric === metric.name);
  const overview = answer.findings.find((f): f is SegmentTrendOverviewFinding => f.type === 'segment_trend_overview' && f.metric === metric.name);
  // The title is about growth, so the bars are the growth rates it compares (on the one measure the
  // fastest was chosen by), not the segments' totals; a segment without a rate is said in the caption.
  const measure = overview?.fastest?.measure ?? 'cagr';
  const rateOf = (t: SegmentTrendFinding) => (measure === 'cagr' ? t.growth?.cagr ?? null : measure === 'slope' ? t.slopePerYearRelative : t.slopePerPeriod);
  // Each segment's growth runs between its own first and last full years: when they differ, each
  // bar says its years and the subtitle does not claim one span for all.
  const spans = new Set(trends.flatMap((t) => (measure === 'cagr' && t.growth?.cagr != null ? [`${t.growth.fromYear}–${t.growth.toYear}`] : [])));
  const ownYears = (t: SegmentTrendFinding) => (spans.size > 1 && t.growth?.cagr != null ? ` (${t.growth.fromYear}–${t.growth.toYear})` : '');
  // A rate's slope is drawn in points, as the title says it ("+0.13 pts a month"), not as a percentage.
  const inPoints = measure === 'units' && metric.unit === 'percent';
  const drawn = (t: SegmentTrendFinding) => (inPoints ? rateOf(t)! * 100 : rateOf(t)!);
  const items = trends.flatMap((t) => (t.other || rateOf(t) === null ? [] : [{ label: `${segmentLabel(t)}${ownYears(t)}`, value: drawn(t) }]));
  const fold = trends.find((t) => t.other && rateOf(t) !== null);
  const folded = fold ? { label: `${segmentLabel(fold)}${ownYears(fold)}`, value: drawn(fold) } : null;
  const years = trends.find((t) => !t.other && t.growth?.cagr != null)?.growth;
  const grain = trends[0]?.grain ?? sq.grain;
  const rateWords =
    measure === 'cagr' && years
      ? spans.size > 1
        ? 'growth a year between each one\'s first and last full calendar years'
        : `growth a year, ${years.fromYear} to ${years.toYear} (full calendar years)`
      : measure === 'units'
        ? `change a ${grain} along the trend (Sen's slope), in ${inPoints ? `points of ${inSentence(metric.label)}` : metric.unit_label ?? inSentence(metric.label)}`
        : 'growth a year along the trend (Sen\'s slope)';
  const chart =
    items.length > 0
      ? buildBars({
          title: words.title,
          chip: metric.label,
          subtitle: `${rateWords} · ${chartSubtitle(answer, metric, ctx, { grain: false })}`,
          footer: chartFooter(answer, ctx),
          ...ctx.chart,
          items,
          folded,
          format: inPoints ? { unit: 'number', decimals: 2, label: POINTS, locale: ctx.locale } : measure === 'units' ? valueFormatOf(metric, ctx.locale) : { unit: 'percent', decimals: 1, locale: ctx.locale },
          signed: true,
          // Coloured by the metric's good direction; without one, one colour for every bar.
          ...(metricDirection(metric) === null ? {} : { higherIsBetter: metricDirection(metric)! }),
        })
      : null;
  return {
    title: words.title,
    caption: words.caption,
    notes: caveatNotes(answer, ctx),
    chart,
    // Asked per day: each segment's figures per day, as the words state them (the query's rows are totals).
    ...(trends.some((t) => t.perDay) ? { csv: perDaySegmentsCsv(trends, metric.name) } : {}),
    takeaway: chart ? { importance: 55, text: words.title } : null,
  };
};

function perDaySegmentsCsv(trends: readonly SegmentTrendFinding[], metric: string): string {
  const v = `${metric}_per_day`;
  const columns: ResultColumn[] = [{ name: 'segment', type: 'text' }, { name: 'other', type: 'boolean' }, { name: 'period', type: 'text' }, { name: v, type: 'number' }, { name: 'partial', type: 'boolean' }];
  const rows = trends.flatMap((t) => [
    { segment: t.segment, other: t.other, period: 'whole period', [v]: t.total, partial: false },
    ...t.points.map((p) => ({ segment: t.segment, other: t.other, period: p.period, [v]: p.value, partial: p.partial })),
  ]);
  return tableToCsv({ columns, rows, truncated: false });
}
