// An average over a span is the span's own ratio (sum over count across its rows), not the mean of
// its periods' averages. Checked on vega-datasets' flights-3m.parquet (public US flight records,
// FAA on-time data as packaged by vega-datasets): January 2001's delay per flight, by complete ISO
// weeks. Expected numbers come from the test's own SQL over the file (read_parquet in DuckDB).
import { describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../analysis/answer-sub-question.js';
import { metricByName } from '../../analysis/catalog.js';
import { trendSummaryWords } from '../../analysis/captions/trend-summary-caption.js';
import { formatValue, valueFormatOf } from '../../analysis/format.js';
import type { SubQuestion } from '../../analysis/types.js';
import { parseConfigText } from '../../config/load.js';
import { flightsParquetConfigText, vegaDataFile } from '../helpers/open-data.js';
import { useFileWorkspace } from '../helpers/workspace-checks.js';

const FLIGHTS = vegaDataFile('flights-3m.parquet');
const config = parseConfigText(flightsParquetConfigText(['{ name: delay, label: Average delay, average: delay, unit: number, unit_label: min, decimals: 1, kind: ratio }']), '/virtual/flights.yaml');

const JANUARY: SubQuestion = { id: 'jan', kind: 'trend', lens: 'summary', template: 'trend_summary', metrics: ['delay'], grain: 'week', window: { start: '2001-01-01', end: '2001-02-01' }, filters: [] };

describe("a span's average is its own ratio (flights-3m.parquet, January 2001)", () => {
  const { ws, own } = useFileWorkspace(config, 'flights');

  it('the headline says the delay per flight over January, not the mean of the weekly means', async () => {
    const [jan] = await own(`SELECT AVG(delay) AS mean, CAST(COUNT(delay) AS DOUBLE) AS n FROM read_parquet('${FLIGHTS}') WHERE date >= DATE '2001-01-01' AND date < DATE '2001-02-01'`);
    const weeks = await own(`SELECT AVG(delay) AS m FROM read_parquet('${FLIGHTS}') WHERE date >= DATE '2001-01-01' AND date < DATE '2001-01-29' GROUP BY date_trunc('week', date)`);
    const meanOfWeeks = weeks.reduce((s, r) => s + Number(r.m), 0) / weeks.length;
    const fmt = valueFormatOf(metricByName(ws().dataset, 'delay'), 'en-GB');
    const said = (x: number) => formatValue(x, fmt, { compact: true });
    // The two differ at the shown precision, so the check can tell them apart.
    expect(weeks.length).toBe(4);
    expect(said(Number(jan!.mean))).not.toBe(said(meanOfWeeks));
    const a = await answerSubQuestion(JANUARY, ws());
    const words = trendSummaryWords(metricByName(ws().dataset, 'delay'), 'week', a.findings, 'managers', 'en-GB', 'flights');
    expect(words.title).toContain(`averaged ${said(Number(jan!.mean))}`);
    expect(words.title).not.toContain(said(meanOfWeeks));
    expect(words.caption).not.toContain(`averaged ${said(meanOfWeeks)}`);
  }, 120_000);

  it('a flow still averages its periods: flights a week', async () => {
    const a = await answerSubQuestion({ ...JANUARY, metrics: ['flights'] }, ws());
    const weeks = await own(`SELECT CAST(COUNT(*) AS DOUBLE) AS n FROM read_parquet('${FLIGHTS}') WHERE date >= DATE '2001-01-01' AND date < DATE '2001-01-29' GROUP BY date_trunc('week', date)`);
    const mean = weeks.reduce((s, r) => s + Number(r.n), 0) / weeks.length;
    const fmt = valueFormatOf(metricByName(ws().dataset, 'flights'), 'en-GB');
    const words = trendSummaryWords(metricByName(ws().dataset, 'flights'), 'week', a.findings, 'managers', 'en-GB');
    expect(words.title).toContain(`averaged ${formatValue(mean, fmt, { compact: true })} a week`);
  }, 120_000);
});
