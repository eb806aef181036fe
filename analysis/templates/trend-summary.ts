// Template "trend_summary": summary statistics over the complete periods of the window (which
// period holds each extreme), and periods that stand out by a robust outlier screen.
import { summarize } from '../stats/index.js';
import { screenSeries } from '../quality/series-outliers.js';
import { metricByName, quantityKind } from '../catalog.js';
import { type CompileContext, periodScope, tableRef, whereClause } from '../compile-context.js';
import { filterCondition } from '../sql/metric-sql.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { Caveat, CompiledQuery, Finding, ResultTable, SubQuestion } from '../types.js';
import { compileSeries, modelOf, perDayOf, readSeries } from './series.js';
import type { ReadContext, Reading, Template } from './template.js';
import { completePoints, EMPTY_TABLE, numberOrNull, seriesFinding } from './trend-points.js';

export const trendSummaryTemplate: Template = {
  compile: (sq, ctx) => {
    const rows = compileRowStats(sq, ctx);
    const pooled = compilePooled(sq, ctx);
    return [
      { name: 'series', ...compileSeries({ ...sq, metrics: sq.metrics.slice(0, 1) }, ctx) },
      ...(rows ? [{ name: 'row_stats', ...rows }] : []),
      ...(pooled ? [{ name: 'pooled', ...pooled }] : []),
    ];
  },
  read: (sq, tables, ctx) => withPooled(withRowStats(readTrendSummary(sq, tables.series ?? EMPTY_TABLE, ctx), tables.row_stats), tables.pooled),
};

/**
 * A rate or a ratio over the whole window is the metric over all the window's rows: its numerator's
 * sum over its denominator's (away wins over matches), never the mean of the periods' rates, which
 * weighs a month of two matches like a month of forty (football.json, Barcelona and R. Madrid at
 * home: 8.1% of matches won away, against 6.9% as the mean of the monthly rates). An average of a
 * column gets the same from its row statistics below.
 */
function compilePooled(sq: SubQuestion, ctx: CompileContext): CompiledQuery | null {
  const metric = metricByName(ctx.dataset, sq.metrics[0]!);
  const t = metric.definition.type;
  if (quantityKind(metric) !== 'ratio' || (t !== 'rate' && t !== 'ratio')) return null;
  const q = new QueryBuilder(ctx.dialect);
  const scope = periodScope(q, ctx, sq.window, sq.filters);
  return q.finish(`SELECT ${scope.measure(metric)} AS pooled
FROM ${tableRef(q, ctx)}
WHERE ${scope.where}`);
}

function withPooled(reading: Reading, table: ResultTable | undefined): Reading {
  const pooled = numberOrNull(table?.rows[0]?.pooled);
  if (pooled === null) return reading;
  return { ...reading, findings: reading.findings.map((f) => (f.type === 'trend_summary' ? { ...f, pooled } : f)) };
}

/**
 * An average of a column summarised period by period gives the mean and median of the periods'
 * averages, which is not what "the typical delay per flight" asks: the median of the rows can be
 * far from the median of daily means (flights: 0 min against 6.7). So an average metric also
 * gets its mean and median over the rows themselves in the window (percentile_cont, the SQL
 * standard's ordered-set aggregate, which DuckDB and PostgreSQL both run).
 */
function compileRowStats(sq: SubQuestion, ctx: CompileContext): CompiledQuery | null {
  const metric = metricByName(ctx.dataset, sq.metrics[0]!);
  const def = metric.definition;
  if (def.type !== 'average') return null;
  // The rows themselves, never a rollup of them: a median does not roll up.
  const raw: CompileContext = { ...ctx, rollup: undefined };
  const q = new QueryBuilder(ctx.dialect);
  const col = q.ident(def.column);
  const where = [whereClause(q, raw, sq.window, sq.filters), ...(def.where ? [filterCondition(q, def.where)] : [])].join(' AND ');
  const d = ctx.dialect;
  return { ...q.finish(`SELECT ${d.toDouble(`AVG(${col})`)} AS row_mean,
  ${d.toDouble(`percentile_cont(0.5) WITHIN GROUP (ORDER BY ${col})`)} AS row_median,
  ${d.toDouble(`COUNT(${col})`)} AS row_n
FROM ${tableRef(q, raw)}
WHERE ${where}`), readsRows: true };
}

function withRowStats(reading: Reading, table: ResultTable | undefined): Reading {
  const row = table?.rows[0];
  const n = numberOrNull(row?.row_n);
  const meanOfRows = numberOrNull(row?.row_mean);
  const medianOfRows = numberOrNull(row?.row_median);
  if (!n || meanOfRows === null || medianOfRows === null) return reading;
  return { ...reading, findings: reading.findings.map((f) => (f.type === 'trend_summary' ? { ...f, rows: { n, mean: meanOfRows, median: medianOfRows } } : f)) };
}

export function readTrendSummary(sq: SubQuestion, table: ResultTable, ctx: ReadContext): Reading {
  const metric = sq.metrics[0]!;
  // Asked per day: the periods' figures per day, as the series shows them.
  const base = readSeries({ ...sq, metrics: [metric] }, table, ctx.coverage, { dataset: ctx.dataset, perDay: perDayOf({ ...sq, metrics: [metric] }, ctx.dataset) });
  const findings: Finding[] = [...base.findings];
  // The unusual periods are this answer's own findings, named in its caption: no note repeats them.
  const caveats: Caveat[] = base.caveats.filter((c) => c.code !== 'outlier');
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

  // The same screen as every series (quality/series-outliers.ts): after the cycle and trend where there are
  // cycles enough, so a July is not unusual for being July. It needs a few periods to estimate the spread from.
  if (complete.length >= MIN_PERIODS_FOR_OUTLIERS) {
    const screen = screenSeries(series.points, sq.grain, modelOf(ctx.dataset, metric));
    for (const u of screen?.unusual ?? []) {
      findings.push({
        type: 'trend_outlier',
        metric,
        grain: sq.grain,
        period: u.period,
        value: u.value,
        score: u.score,
        median: screen!.median,
        threshold: screen!.threshold,
        rule: screen!.rule,
        ...(u.expected !== undefined ? { expected: u.expected } : {}),
      });
    }
  }
  if (complete.length > 1 && complete.length < MIN_PERIODS_FOR_OUTLIERS) {
    caveats.push({ code: 'small_sample', data: { n: complete.length, metric } });
  }
  return { findings, caveats };
}

/** Fewest periods the outlier screen runs on (a rule of thumb, common practice). */
export const MIN_PERIODS_FOR_OUTLIERS = 5;
