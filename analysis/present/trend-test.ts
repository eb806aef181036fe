// Presenter for "trend_test": the series as a line with Sen's slope drawn as a trend line.
import { trendTestWords, trendVerdict } from '../captions/trend-test-caption.js';
import { metricByName } from '../catalog.js';
import type { TrendTestFinding } from '../findings/segments.js';

import { caveatNotes, seriesLineChart, statedMetric } from './header.js';
import { perDayCsv } from './series.js';
import type { Finding } from '../types.js';
import { withVerdict, type Presenter } from './presenter.js';

export const presentTrendTest: Presenter = (answer, ctx) => {
  const sq = answer.subQuestion;
  const metric = metricByName(ctx.dataset, sq.metrics[0]!);
  const words = trendTestWords(statedMetric(answer, metric), sq.grain, answer.findings, ctx.audience, ctx.locale);
  const test = answer.findings.find((f): f is TrendTestFinding => f.type === 'trend_test' && f.metric === metric.name);
  // Sen's line across the tested span only: outside it the slope was never measured.
  const chart = seriesLineChart(answer, metric, words.title, ctx, (points) =>
    test ? { label: test.seasonUnresolved ? "Straight-line fit (Sen's slope; season not removed)" : "Trend (Sen's slope)", values: trendLine(test, points) } : undefined,
  );
  return {
    title: words.title,
    caption: words.caption,
    notes: caveatNotes(answer, ctx),
    chart,
    // Asked per day: the table holds the figures the words state, not the query's totals.
    ...perDayTable(answer.findings, metric.name),
    takeaway: test
      ? withVerdict({ importance: test.direction === 'none' || test.seasonUnresolved ? 40 : 60, text: `${words.title}.` }, trendVerdict(statedMetric(answer, metric), sq.grain, test, words.title, ctx.locale))
      : null,
  };
};

function trendLine(test: TrendTestFinding, points: readonly { period: string }[]): (number | null)[] {
  return points.map((p, i) =>
    p.period >= test.firstPeriod && p.period <= test.lastPeriod ? test.intercept + test.slopePerPeriod * i : null,
  );
}

function perDayTable(findings: readonly Finding[], metric: string): { csv?: string } {
  const series = findings.find((f): f is Extract<Finding, { type: 'series' }> => f.type === 'series' && f.metric === metric);
  return series?.perDay ? { csv: perDayCsv(series) } : {};
}
