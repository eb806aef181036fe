// Template "trend_summary": summary statistics over the complete periods of the window (which
// period holds each extreme), and periods that stand out by a robust outlier screen.
import { modifiedZScores, summarize } from '../stats/index.js';
import type { Caveat, Finding, ResultTable, SubQuestion } from '../types.js';
import { compileSeries, readSeries } from './series.js';
import type { ReadContext, Reading, Template } from './template.js';
import { completePoints, EMPTY_TABLE, seriesFinding } from './trend-points.js';

export const trendSummaryTemplate: Template = {
  compile: (sq, ctx) => [{ name: 'series', ...compileSeries({ ...sq, metrics: sq.metrics.slice(0, 1) }, ctx) }],
  read: (sq, tables, ctx) => readTrendSummary(sq, tables.series ?? EMPTY_TABLE, ctx),
};

export function readTrendSummary(sq: SubQuestion, table: ResultTable, ctx: ReadContext): Reading {
  const metric = sq.metrics[0]!;
  const base = readSeries({ ...sq, metrics: [metric] }, table, ctx.coverage);
  const findings: Finding[] = [...base.findings];
  const caveats: Caveat[] = [...base.caveats];
  const series = seriesFinding(base.findings, metric);
  if (!series) return { findings, caveats };
  const complete = completePoints(series.points);
  const s = summarize(complete.map((p) => p.value));
  if (s.n === 0 || s.min === null || s.max === null || s.mean === null || s.median === null) return { findings, caveats };

  // The first period holding each extreme, so ties never depend on row order.
  const minPoint = complete.find((p) => p.value === s.min)!;
  const maxPoint = complete.find((p) => p.value === s.max)!;
  findings.push({
    type: 'trend_summary',
    metric,
    grain: sq.grain,
    n: s.n,
    min: s.min,
    max: s.max,
    mean: s.mean,
    median: s.median,
    mode: s.mode,
    modeCount: s.modeCount,
    sd: s.sd,
    minPeriod: minPoint.period,
    maxPeriod: maxPoint.period,
  });

  // A robust screen needs a few periods to estimate the spread from; below that everything looks odd.
  if (complete.length >= MIN_PERIODS_FOR_OUTLIERS) {
    const z = modifiedZScores(complete.map((p) => p.value));
    if (z) {
      for (const i of z.outlierIndices) {
        const p = complete[i]!;
        const score = z.scores[i]!;
        findings.push({ type: 'trend_outlier', metric, grain: sq.grain, period: p.period, value: p.value, score, median: z.median, threshold: z.threshold });
        caveats.push({ code: 'outlier', data: { metric, period: p.period, grain: sq.grain, score } });
      }
    }
  }
  if (complete.length > 1 && complete.length < MIN_PERIODS_FOR_OUTLIERS) {
    caveats.push({ code: 'small_sample', data: { n: complete.length, metric } });
  }
  return { findings, caveats };
}

/** Fewest periods the outlier screen runs on (a rule of thumb, common practice). */
export const MIN_PERIODS_FOR_OUTLIERS = 5;
