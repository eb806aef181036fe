// Presenter for "growth_series": a year × month grid of year-over-year growth for monthly data,
// a line of year-over-year growth (or period-over-period where there is no year earlier) otherwise.
import { buildGrowthGrid } from '../charts/build-growth-grid.js';
import { buildLine } from '../charts/build-line.js';
import type { ChartSpec } from '../charts/spec.js';
import { growthSeriesWords, growthVerdict, pickGrowthSeriesFindings } from '../captions/growth-series-caption.js';
import { growthInUnits, growthNotes } from '../captions/growth-words.js';
import { metricByName, metricDirection } from '../catalog.js';
import type { GrowthSeriesFinding } from '../findings/growth.js';
import { valueFormatOf, type ValueFormat } from '../format.js';
import type { Answer } from '../types.js';
import { chartFooter, chartSubtitle } from './header.js';
import { withVerdict, type PresentContext, type Presenter } from './presenter.js';

export const presentGrowthSeries: Presenter = (answer, ctx) => {
  const sq = answer.subQuestion;
  const metric = metricByName(ctx.dataset, sq.metrics[0]!);
  const found = pickGrowthSeriesFindings(answer.findings, metric.name);
  const words = growthSeriesWords(metric, sq.grain, found, ctx.locale, ctx.audience);
  const chart = found.series ? growthChart(answer, found.series, words.title, metricDirection(metric), ctx) : null;
  return {
    title: words.title,
    caption: words.caption,
    notes: growthNotes(answer, ctx.locale, ctx.dataset),
    chart,
    // A comparison the request named is judged by its own answer (growth_periods, growth_drivers), on the spans it named.
    takeaway: found.series ? withVerdict({ importance: 60, text: `${words.title}.` }, sq.compareWindow ? null : growthVerdict(metric, found, ctx.locale)) : null,
  };
};

function growthChart(answer: Answer, series: GrowthSeriesFinding, title: string, higherIsBetter: boolean | null, ctx: PresentContext): ChartSpec | null {
  const metric = metricByName(ctx.dataset, series.metric);
  const header = {
    title,
    chip: metric.label,
    subtitle: chartSubtitle(answer, metric, ctx),
    footer: chartFooter(answer, ctx),
    ...ctx.chart,
  };
  const lag = series.yoyLag;
  if (growthInUnits(metric, series) && lag !== null) return levelChangeLine(header, series, lag, valueFormatOf(metric, ctx.locale));
  const hasYoy = series.points.some((p) => p.yoy !== null);
  if (series.grain === 'month' && lag !== null && hasYoy) {
    // Months before the first year-earlier base can never hold a rate; a row of them would be empty.
    // A partly covered month is drawn hatched, a month without data blank (as are months after
    // the data ends); "n/a" is left for months with data but no year-earlier base.
    const cells = series.points.slice(lag).map((p) => ({
      period: p.period,
      change: p.yoy,
      ...(p.partial ? { state: 'partial' as const } : p.value === null ? { state: 'no_data' as const } : {}),
    }));
    return buildGrowthGrid({ ...header, cells, higherIsBetter, locale: ctx.locale });
  }
  const usePop = !hasYoy;
  if (usePop && !series.points.some((p) => p.pop !== null)) return null;
  const rateFormat: ValueFormat = { unit: 'percent', decimals: 1, locale: ctx.locale };
  const offset = usePop ? 1 : lag ?? 1;
  const points = series.points.slice(offset).map((p) => ({ period: p.period, value: usePop ? p.pop : p.yoy, partial: p.partial }));
  return buildLine({
    ...header,
    seriesLabel: usePop ? `Change on the ${series.grain} before` : 'Change on a year earlier',
    grain: series.grain,
    points,
    format: rateFormat,
  });
}

/** A level's change on a year earlier in its own units (a percentage grid would misstate a reading). */
function levelChangeLine(header: Omit<Parameters<typeof buildLine>[0], 'seriesLabel' | 'grain' | 'points' | 'format'>, series: GrowthSeriesFinding, lag: number, format: ValueFormat): ChartSpec | null {
  const usable = (p: GrowthSeriesFinding['points'][number] | undefined) => p !== undefined && !p.partial && p.value !== null;
  const points = series.points.slice(lag).map((p, i) => {
    const base = series.points[i];
    return { period: p.period, value: usable(p) && usable(base) ? p.value! - base!.value! : null, partial: p.partial };
  });
  if (!points.some((p) => p.value !== null)) return null;
  // The line is a change, not the reading itself: the subtitle says so first.
  return buildLine({ ...header, subtitle: `change on a year earlier · ${header.subtitle}`, seriesLabel: 'Change on a year earlier', grain: series.grain, points, format });
}
