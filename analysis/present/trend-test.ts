// Presenter for "trend_test": the series as a line with Sen's slope drawn as a trend line.
import { buildLine } from '../charts/build-line.js';
import { trendTestWords } from '../captions/trend-test-caption.js';
import { metricByName } from '../catalog.js';
import type { TrendTestFinding } from '../findings/segments.js';
import { valueFormatOf } from '../format.js';
import type { Finding } from '../types.js';
import { caveatNotes, chartHeader } from './header.js';
import type { Presenter } from './presenter.js';

export const presentTrendTest: Presenter = (answer, ctx) => {
  const sq = answer.subQuestion;
  const metric = metricByName(ctx.dataset, sq.metrics[0]!);
  const words = trendTestWords(metric, sq.grain, answer.findings, ctx.audience, ctx.locale);
  const series = answer.findings.find((f): f is Extract<Finding, { type: 'series' }> => f.type === 'series' && f.metric === metric.name);
  const test = answer.findings.find((f): f is TrendTestFinding => f.type === 'trend_test' && f.metric === metric.name);
  const chart =
    series && series.points.some((p) => p.value !== null)
      ? buildLine({
          ...chartHeader(answer, metric, words.title, ctx),
          seriesLabel: metric.label,
          grain: sq.grain,
          points: series.points,
          format: valueFormatOf(metric, ctx.locale),
          // Sen's line across the tested span only: outside it the slope was never measured.
          ...(test ? { overlay: { label: "Trend (Sen's slope)", values: trendLine(test, series.points) } } : {}),
        })
      : null;
  return {
    title: words.title,
    caption: words.caption,
    notes: caveatNotes(answer, ctx),
    chart,
    takeaway: test ? { importance: test.direction === 'none' ? 40 : 60, text: words.caption } : null,
  };
};

function trendLine(test: TrendTestFinding, points: readonly { period: string }[]): (number | null)[] {
  return points.map((p, i) =>
    p.period >= test.firstPeriod && p.period <= test.lastPeriod ? test.intercept + test.slopePerPeriod * i : null,
  );
}
