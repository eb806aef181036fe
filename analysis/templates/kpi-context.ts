// Template "kpi_context" (kpi × summary): where the latest complete period sits in the
// window's history of complete periods: its rank and percentile, the spread of the history,
// the periods holding the extremes and a robust z-score that flags an unusual latest value.
import type { Coverage } from '../coverage.js';
import type { KpiContextFinding } from '../findings/kpi.js';
import { screenSeries, seriesOutliers } from '../quality/series-outliers.js';
import { argExtremes, summarize, type SeasonalModel } from '../stats/index.js';
import type { Caveat, Finding, PeriodPoint, ResultTable, SubQuestion } from '../types.js';
import { EMPTY_TABLE } from './kpi-sql.js';
import { compileSeries, modelOf, readSeries } from './series.js';
import type { DatasetConfig } from '../../config/schema.js';
import type { Reading, Template } from './template.js';

export const kpiContextTemplate: Template = {
  compile: (sq, ctx) => [{ name: 'history', ...compileSeries(sq, ctx) }],
  read: (sq, tables, ctx) => readKpiContext(sq, tables.history ?? EMPTY_TABLE, ctx.coverage, ctx.dataset),
};

export function readKpiContext(sq: SubQuestion, table: ResultTable, coverage: Coverage, dataset?: DatasetConfig): Reading {
  const base = readSeries(sq, table, coverage, { dataset });
  const caveats: Caveat[] = [...base.caveats];
  const findings: Finding[] = [];
  for (const f of base.findings) {
    if (f.type !== 'series') continue;
    findings.push(f);
    const context = contextOf(f.metric, sq.grain, f.points, modelOf(dataset, f.metric));
    if (!context) continue;
    findings.push(context);
    caveats.push(...seriesOutliers(f.points, sq.grain, modelOf(dataset, f.metric)).map((c) => ({ ...c, data: { ...c.data, metric: f.metric } })));
  }
  return { findings, caveats };
}

/**
 * The latest complete point against all complete points of the history; null without one. Whether it is unusual is the
 * series screen's call (quality/series-outliers.ts), the same rule as every other series: against its season and
 * trend where the history allows, else among the values. `model` is how the metric's cycle behaves (catalog.ts).
 */
export function contextOf(metric: string, grain: SubQuestion['grain'], points: PeriodPoint[], model?: SeasonalModel): KpiContextFinding | null {
  const complete = points.filter((p): p is PeriodPoint & { value: number } => !p.partial && p.value !== null && Number.isFinite(p.value));
  const latest = complete[complete.length - 1];
  if (!latest) return null;
  const values = complete.map((p) => p.value);
  const s = summarize(values);
  const { minIndex, maxIndex } = argExtremes(values);
  const above = values.filter((v) => v > latest.value).length;
  const atOrBelow = values.filter((v) => v <= latest.value).length;
  // Too few periods make the median absolute deviation meaningless: the screen gives no score rather than a wild one.
  const screen = screenSeries(points, grain, model);
  const judged = screen?.judged.find((u) => u.period === latest.period);
  const z = judged?.score ?? null;
  return {
    type: 'kpi_context',
    metric,
    grain,
    period: latest.period,
    value: latest.value,
    n: s.n,
    firstPeriod: complete[0]!.period,
    min: s.min!,
    max: s.max!,
    minPeriod: complete[minIndex!]!.period,
    maxPeriod: complete[maxIndex!]!.period,
    mean: s.mean!,
    median: s.median!,
    sd: s.sd,
    rank: above + 1,
    percentile: atOrBelow / values.length,
    robustZ: z,
    outlier: screen?.unusual.some((u) => u.period === latest.period) ?? false,
    ...(screen ? { outlierRule: screen.rule } : {}),
    ...(judged?.expected !== undefined ? { usual: judged.expected } : {}),
  };
}
