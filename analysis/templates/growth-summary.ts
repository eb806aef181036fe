// Template "growth_summary": summary statistics of the growth rates over the window (growth × summary).
// Runs the growth_series query and summarises its year-over-year rates when there are enough of them,
// otherwise its period-over-period rates.
import type { GrowthRateSummaryFinding, GrowthSeriesFinding } from '../findings/growth.js';
import { argExtremes, quantileSorted, summarize } from '../stats/index.js';
import type { Finding } from '../types.js';
import { changesInUnits, metricByName, percentsApplyTo } from '../catalog.js';
import { compileGrowthSeries, readGrowthSeries } from './growth-series.js';
import type { Reading, Template } from './template.js';

/** Fewer year-over-year rates than this and the period-over-period rates are summarised instead. */
export const MIN_YOY_RATES = 3;
/** Below this many rates the spread is a weak guide; said with a `small_sample` caveat. */
export const SMALL_RATE_COUNT = 4;

export const growthSummaryTemplate: Template = {
  compile: (sq, ctx) => [{ name: 'growth', ...compileGrowthSeries(sq, ctx) }],
  read: (sq, tables, ctx) => {
    const base = readGrowthSeries(sq, tables.growth ?? { columns: [], rows: [], truncated: false }, ctx.coverage, ctx.dataset);
    const findings: Finding[] = [];
    const caveats = [...base.caveats];
    for (const f of base.findings) {
      if (f.type !== 'growth_series') continue;
      const metric = metricByName(ctx.dataset, f.metric);
      // A level, or a quantity signed in this window (an average delay that goes below zero), changes in its units.
      const complete = f.points.filter((p) => !p.partial).map((p) => p.value);
      const summary = summarizeRates(f, changesInUnits(metric) || metric.unit === 'percent' || !percentsApplyTo(metric, complete));
      if (summary.n === 0) caveats.push({ code: 'single_period', data: { metric: f.metric, rates: 0 } });
      else if (summary.n < SMALL_RATE_COUNT) caveats.push({ code: 'small_sample', data: { n: summary.n, metric: f.metric } });
      findings.push(summary);
    }
    return { findings, caveats } satisfies Reading;
  },
};

/** `units`: a level's changes are differences in its units (value less its base), not ratios. */
export function summarizeRates(series: GrowthSeriesFinding, units = false): GrowthRateSummaryFinding {
  const yoyCount = series.points.filter((p) => p.yoy !== null).length;
  const basis: 'yoy' | 'pop' = series.yoyLag !== null && (yoyCount >= MIN_YOY_RATES || series.yoyLag === 1) ? 'yoy' : 'pop';
  // Rates start where a base could exist, so the leading periods without one do not count as missing.
  const offset = basis === 'yoy' ? series.yoyLag! : 1;
  const usable = (p: GrowthSeriesFinding['points'][number] | undefined) => p !== undefined && !p.partial && p.value !== null;
  const difference = (i: number) => {
    const [p, base] = [series.points[i], series.points[i - offset]];
    return usable(p) && usable(base) ? p!.value! - base!.value! : null;
  };
  const rates = series.points.slice(offset).map((p, k) => ({ period: p.period, value: units ? difference(k + offset) : basis === 'yoy' ? p.yoy : p.pop }));
  const values = rates.map((r) => r.value);
  const s = summarize(values);
  const { minIndex, maxIndex } = argExtremes(values);
  return {
    type: 'growth_rate_summary',
    metric: series.metric,
    grain: series.grain,
    basis,
    measure: units ? 'units' : 'relative',
    rates,
    n: s.n,
    min: minIndex === null ? null : { period: rates[minIndex]!.period, value: rates[minIndex]!.value! },
    max: maxIndex === null ? null : { period: rates[maxIndex]!.period, value: rates[maxIndex]!.value! },
    mean: s.mean,
    median: s.median,
    sd: s.sd,
    quartiles: s.n < 2 ? null : quartilesOf(values),
  };
}

function quartilesOf(values: readonly (number | null)[]): { lower: number; upper: number } {
  const sorted = values.filter((v): v is number => v !== null && Number.isFinite(v)).sort((a, b) => a - b);
  return { lower: quantileSorted(sorted, 0.25), upper: quantileSorted(sorted, 0.75) };
}
