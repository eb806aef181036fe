// The header, subtitle and footer every chart carries, so an image forwarded alone still says what
// it shows: the metric's name on the chip; its meaning, the period, the grain and filters in the
// subtitle; the source, the data's date and the caveat flags in the footer.
import { filterSubtitleParts } from '../captions/scope-words.js';
import { grainAdjective } from '../grains.js';
import type { Metric, MetricKind } from '../../config/schema.js';
import { labelAtStart } from '../captions/grammar.js';
import { quantityKind } from '../catalog.js';
import { caveatFlag, caveatNote } from '../captions/caveat-text.js';
import { metricMeaning, perDayMetric } from '../captions/metric-words.js';
import { dataEnd } from '../coverage.js';
import { dataDateWords, shortWindow } from '../window-words.js';
import { buildLine } from '../charts/build-line.js';
import type { LineSpec } from '../charts/spec.js';
import { valueFormatOf } from '../format.js';
import type { Answer, Finding, PeriodPoint } from '../types.js';
import type { PresentContext } from './presenter.js';


// A formula that is still an expression ("mean of rate / 100"): arithmetic, brackets or a figure.
const EXPRESSION = /[/*+()=<>%]|\s-\s|\d/;

/**
 * What `metric` means, in the words its reader gets (no raw column names outside analysts). With
 * no description, a formula a reader would not say ("mean of rate / 100", or one naming a raw
 * column) gives way to the metric's label and kind in words: "Unemployment rate, a reading
 * averaged over each period".
 */
export function metricDefinition(metric: Metric, ctx: PresentContext): string {
  const meaning = metricMeaning(metric, ctx.dataset, ctx.audience);
  if (ctx.audience === 'analysts' || metric.description !== undefined) return meaning;
  return meaning !== '' && !EXPRESSION.test(meaning) ? meaning : `${labelAtStart(metric.label)}, ${KIND_WORDS[quantityKind(metric)]}`;
}

const KIND_WORDS: Record<MetricKind, string> = {
  flow: 'a total for each period',
  level: 'a reading averaged over each period',
  ratio: 'a ratio for each period',
};

export function chartSubtitle(answer: Answer, metric: Metric, ctx: PresentContext, opts: { grain?: boolean; definition?: string } = {}): string {
  const sq = answer.subQuestion;
  // A window that runs past the data ("2025" in June 2025) is said to the data's end: the chart
  // shows nothing after it, and a subtitle to 31 December would claim it does. Data stamped
  // monthly covers its last month whole and is said in months, as the thread's text says it.
  const end = ctx.dataAsOf ? dataEnd({ lastDate: ctx.dataAsOf.slice(0, 10), ...(ctx.stamps ? { stamps: ctx.stamps } : {}) }) : null;
  // A filtered series whose rows start late (a shop that opened part-way) is said from its first
  // period with rows, as the chart draws it, not from the window asked for.
  const firstMatch = answer.caveats.find((c) => c.code === 'empty_period' && c.data.leading === true && typeof c.data.firstMatch === 'string')?.data.firstMatch as string | undefined;
  const start = firstMatch !== undefined && firstMatch > sq.window.start && firstMatch < sq.window.end ? firstMatch : sq.window.start;
  const shown = { start, end: end !== null && end < sq.window.end ? end : sq.window.end };
  const parts = [opts.definition ?? metricDefinition(metric, ctx), shortWindow(shown, ctx.stamps, ctx.locale)];
  if (opts.grain !== false) parts.push(grainAdjective(sq.grain));
  parts.push(...filterSubtitleParts(sq.filters, ctx.dataset));
  return parts.filter((p) => p !== '').join(' · ');
}

export function chartFooter(answer: Answer, ctx: PresentContext): string[] {
  // Without a date for the data the line is left out rather than printed as a placeholder.
  const asOf = ctx.dataAsOf ? [`Data as of ${dataDateWords(ctx.dataAsOf.slice(0, 10), ctx.stamps, ctx.locale)}`] : [];
  const flags = [...new Set(answer.caveats.map(caveatFlag))];
  return [`Source: ${ctx.dataset.label}`, ...asOf, ...(flags.length ? [`Caveats: ${flags.join(' ')}`] : [])];
}

export function caveatNotes(answer: Answer, ctx: PresentContext): string[] {
  return [...new Set(answer.caveats.map((c) => caveatNote(c, ctx.locale)))];
}

export function chartHeader(answer: Answer, metric: Metric, title: string, ctx: PresentContext) {
  return { title, chip: metric.label, subtitle: chartSubtitle(answer, metric, ctx), footer: chartFooter(answer, ctx), ...ctx.chart };
}

/**
 * The metric as the answer's words state it: asked per day (its series is per day), "Bookings per
 * day", a daily average read like a ratio (no "a month" after it: it is not a total of the month).
 */
export function statedMetric(answer: Answer, metric: Metric): Metric {
  const perDay = answer.findings.some((f) => (f.type === 'series' || f.type === 'growth_periods' || f.type === 'growth_drivers') && f.metric === metric.name && f.perDay !== undefined);
  return perDay ? perDayMetric(metric) : metric;
}

/**
 * The periods of `metric` the outlier screen flagged (its `outlier` caveats, quality/series-outliers.ts), for rings on
 * the line, and what a ring means: unusual for its season when the season and trend judged, else among the values.
 */
export function unusualOnChart(answer: Answer, metric: Metric): { legend: string; periods: { period: string; score: number }[] } | undefined {
  const caveats = answer.caveats.filter((c) => c.code === 'outlier' && c.data.metric === metric.name);
  // A lone period's caveat carries it; several are said as one caveat (quality/thread-notes.ts) listing them in `flagged`.
  const periods = caveats.flatMap((c) => {
    if (typeof c.data.period === 'string' && typeof c.data.score === 'number') return [{ period: c.data.period, score: c.data.score }];
    if (typeof c.data.flagged !== 'string') return [];
    return c.data.flagged.split(',').flatMap((pair) => {
      const at = pair.lastIndexOf(':');
      const score = Number(pair.slice(at + 1));
      return at > 0 && Number.isFinite(score) ? [{ period: pair.slice(0, at), score }] : [];
    });
  });
  if (periods.length === 0) return undefined;
  const seasonal = caveats.every((c) => c.data.rule === 'seasonal' || c.data.rule === 'seasonal_and_values');
  return { legend: seasonal ? 'Unusual for its season' : 'Unusual among the values', periods };
}

/** The answer's series of `metric` as a line chart (high and low marked, unusual periods ringed), or null with no values. */
export function seriesLineChart(
  answer: Answer,
  metric: Metric,
  title: string,
  ctx: PresentContext,
  overlay?: (points: PeriodPoint[]) => { label: string; values: (number | null)[] } | undefined,
): LineSpec | null {
  const series = answer.findings.find((f): f is Extract<Finding, { type: 'series' }> => f.type === 'series' && f.metric === metric.name);
  if (!series || !series.points.some((p) => p.value !== null)) return null;
  const extra = overlay?.(series.points);
  const header = chartHeader(answer, metric, title, ctx);
  const unusual = unusualOnChart(answer, metric);
  return buildLine({
    ...header,
    ...(series.perDay ? { subtitle: `${header.subtitle} · average a day` } : {}),
    seriesLabel: series.perDay ? `${metric.label} per day` : metric.label,
    grain: answer.subQuestion.grain,
    points: series.points,
    format: valueFormatOf(metric, ctx.locale),
    ...(extra ? { overlay: extra } : {}),
    ...(unusual ? { unusual } : {}),
  });
}
