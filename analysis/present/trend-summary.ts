// Presenter for "trend_summary": the series as a line with its mean drawn flat for reference.
import { trendSummaryWords } from '../captions/trend-summary-caption.js';
import { metricByName } from '../catalog.js';
import type { TrendSummaryFinding } from '../findings/segments.js';
import { formatValue, valueFormatOf } from '../format.js';
import { caveatNotes, seriesLineChart, statedMetric } from './header.js';
import { perDayCsv } from './series.js';
import type { Finding } from '../types.js';
import type { Presenter } from './presenter.js';

export const presentTrendSummary: Presenter = (answer, ctx) => {
  const sq = answer.subQuestion;
  const metric = metricByName(ctx.dataset, sq.metrics[0]!);
  const fmt = valueFormatOf(metric, ctx.locale);
  // What one row is, for "per flight": the label of the dataset's plain row count, when it has one.
  const rowsMetric = ctx.dataset.metrics.find((m) => m.definition.type === 'count' && !m.definition.where);
  const words = trendSummaryWords(statedMetric(answer, metric), sq.grain, answer.findings, ctx.audience, ctx.locale, rowsMetric?.label);
  const s = answer.findings.find((f): f is TrendSummaryFinding => f.type === 'trend_summary' && f.metric === metric.name);
  const chart = seriesLineChart(answer, metric, words.title, ctx, (points) =>
    s && s.n > 1 ? { label: `Mean (${formatValue(s.mean, fmt, { compact: true })})`, values: points.map(() => s.mean) } : undefined,
  );
  return {
    title: words.title,
    caption: words.caption,
    notes: caveatNotes(answer, ctx),
    chart,
    // Asked per day: the table holds the figures the words state, not the query's totals.
    ...perDayTable(answer.findings, metric.name),
    takeaway: s ? { importance: 35, text: words.title } : null,
  };
};

function perDayTable(findings: readonly Finding[], metric: string): { csv?: string } {
  const series = findings.find((f): f is Extract<Finding, { type: 'series' }> => f.type === 'series' && f.metric === metric);
  return series?.perDay ? { csv: perDayCsv(series) } : {};
}
