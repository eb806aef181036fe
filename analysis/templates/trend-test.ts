// Template "trend_test": is a metric moving over time? The series at the grain (one grouped
// query), then Mann–Kendall for direction and strength, Sen's slope for the size, and how far
// the latest complete period sits from the peak.
import type { Metric } from '../../config/schema.js';
import { metricByName, metricPercentScale, seasonalModel } from '../catalog.js';
import { yearFraction } from '../periods.js';
import { mannKendall, percentChange, senSlope, slopesByDecade, type DecadeSlope, type SeasonalModel } from '../stats/index.js';
import type { Caveat, Finding, PeriodPoint, ResultTable, SubQuestion } from '../types.js';
import type { TrendTestFinding } from '../findings/segments.js';
import { compileSeries, perDayOf, readSeries } from './series.js';
import type { ReadContext, Reading, Template } from './template.js';
import { completePoints, EMPTY_TABLE, mean, periodsInYear, relativeYearlyRateApplies, seasonallyAdjusted, seasonUnresolvedOver, seriesFinding, spansAYear } from './trend-points.js';

/** Conventional two-sided significance level (common practice, not a law). */
export const TREND_ALPHA = 0.05;

export const trendTestTemplate: Template = {
  // One metric per sub-question: the test and the caption speak about one series.
  compile: (sq, ctx) => [{ name: 'series', ...compileSeries({ ...sq, metrics: sq.metrics.slice(0, 1) }, ctx) }],
  read: (sq, tables, ctx) => readTrendTest(sq, tables.series ?? EMPTY_TABLE, ctx),
};

export function readTrendTest(sq: SubQuestion, table: ResultTable, ctx: ReadContext): Reading {
  const metric = sq.metrics[0]!;
  const one = { ...sq, metrics: [metric] };
  // Asked per day: the periods' figures per day, as the series shows them.
  const base = readSeries(one, table, ctx.coverage, { dataset: ctx.dataset, perDay: perDayOf(one, ctx.dataset) });
  const findings: Finding[] = [...base.findings];
  // Unusual periods are said under the answer that draws or lists the periods (the series, the
  // summary), not again under the trend's verdict.
  const caveats: Caveat[] = base.caveats.filter((c) => c.code !== 'outlier');
  const series = seriesFinding(base.findings, metric);
  if (!series) return { findings, caveats };

  const complete = completePoints(series.points);
  const peak = findings.find((f): f is Extract<Finding, { type: 'peak' }> => f.type === 'peak');
  const latest = findings.find((f): f is Extract<Finding, { type: 'latest' }> => f.type === 'latest');
  if (peak && latest) {
    findings.push({
      type: 'change',
      metric,
      from: { period: peak.period, value: peak.value },
      to: { period: latest.period, value: latest.value },
      // A percentage below the peak only where the one rule allows it (catalog.ts metricPercentScale).
      relative: percentChange(peak.value, latest.value, metricPercentScale(metricByName(ctx.dataset, metric), complete.map((c) => c.value))),
      absolute: latest.value - peak.value,
    });
  }

  const catalogMetric = metricByName(ctx.dataset, metric);
  const test = trendTest(sq, series.points, complete, seasonalModel(catalogMetric, complete.map((c) => c.value)), catalogMetric);
  if (test) {
    findings.push(test);
    if (test.smallSample) caveats.push({ code: 'small_sample', data: { n: test.n, metric } });
  } else if (complete.length === 2) {
    caveats.push({ code: 'small_sample', data: { n: 2, metric } });
  }
  return { findings, caveats };
}

function trendTest(sq: SubQuestion, points: readonly PeriodPoint[], complete: ReturnType<typeof completePoints>, model: SeasonalModel, metric: Metric): TrendTestFinding | null {
  const raw = complete.map((p) => p.value);
  const adjusted = seasonallyAdjusted(sq.grain, points, complete, model);
  const values = adjusted ?? raw;
  const mk = mannKendall(values);
  const sen = senSlope(values, complete.map((p) => p.index));
  if (!mk || !sen) return null;
  const rawMk = adjusted ? mannKendall(raw) : mk;
  const perYear = periodsInYear(sq.grain);
  const slopePerYear = sen.slope * perYear;
  const spanned = complete[complete.length - 1]!.index - complete[0]!.index + 1;
  const seasonUnresolved = seasonUnresolvedOver(sq.grain, spanned);
  const level = mean(values);
  // Sen's intercept is at time 0 of the times given, which are the series' own positions.
  return {
    type: 'trend_test',
    metric: sq.metrics[0]!,
    grain: sq.grain,
    n: mk.n,
    firstPeriod: complete[0]!.period,
    lastPeriod: complete[complete.length - 1]!.period,
    seasonallyAdjusted: adjusted !== null,
    ...(seasonUnresolved ? { seasonUnresolved: true } : {}),
    s: mk.s,
    z: mk.z,
    pValue: mk.pValue,
    rawPValue: rawMk?.pValue ?? mk.pValue,
    tau: mk.tau,
    alpha: TREND_ALPHA,
    direction: mk.pValue < TREND_ALPHA && mk.s !== 0 ? (mk.s > 0 ? 'up' : 'down') : 'none',
    slopePerPeriod: sen.slope,
    slopePerYear,
    // A percentage of the level only where the rule allows one (trend-points relativeYearlyRateApplies).
    slopePerYearRelative: level !== null && level > 0 && relativeYearlyRateApplies(metric, raw, sq.grain) ? slopePerYear / level : null,
    ...(spansAYear(spanned, sq.grain) ? {} : { underAYear: true }),
    intercept: sen.intercept,
    smallSample: mk.smallSample,
    byDecade: decadesOf(complete, values),
  };
}

/** Decade by decade, when the values reach into two decades or more; each period counts at its start date. */
function decadesOf(complete: ReturnType<typeof completePoints>, values: readonly number[]): DecadeSlope[] {
  const decades = slopesByDecade(complete.map((p, i) => ({ year: yearFraction(p.period), value: values[i]! })));
  return decades.length >= 2 ? decades : [];
}
