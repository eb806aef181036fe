// Presenter for the "series" template: a line with the high and low marked.
import { seriesWords } from '../captions/series-caption.js';
import { metricByName } from '../catalog.js';
import { caveatNotes, seriesLineChart } from './header.js';
import type { Presenter } from './presenter.js';
import { tableToCsv } from '../table-csv.js';
import type { Finding, ResultColumn } from '../types.js';

export const presentSeries: Presenter = (answer, ctx) => {
  const sq = answer.subQuestion;
  const metric = metricByName(ctx.dataset, sq.metrics[0]!);
  const words = seriesWords(metric, sq.grain, answer.findings, ctx.locale, sq.rankOrder === 'lowest');
  const chart = seriesLineChart(answer, metric, words.title, ctx);
  const series = answer.findings.find((f): f is Extract<Finding, { type: 'series' }> => f.type === 'series' && f.metric === metric.name);
  return {
    title: words.title,
    caption: words.caption,
    notes: caveatNotes(answer, ctx),
    chart,
    takeaway: chart ? { importance: 50, text: words.caption } : null,
    // Per day, the figures the caption states are not the query's totals: they get a table of their own.
    ...(series?.perDay ? { csv: perDayCsv(series) } : {}),
  };
};

/** A per-day series as its own table (period, the figure per day, partial): the query's rows are totals. */
export function perDayCsv(series: Extract<Finding, { type: 'series' }>): string {
  const columns: ResultColumn[] = [{ name: 'period', type: 'date' }, { name: `${series.metric}_per_day`, type: 'number' }, { name: 'partial', type: 'boolean' }];
  return tableToCsv({ columns, rows: series.points.map((p) => ({ period: p.period, [`${series.metric}_per_day`]: p.value, partial: p.partial })), truncated: false });
}
