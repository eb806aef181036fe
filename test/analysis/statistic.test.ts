// A statistic named in the request ("median delay", "p90") is that quantile of an averaged
// metric's column, in every statement of the sub-questions that take it, and never a rollup's
// pooled figure. Checked on vega-datasets' seattle-weather.csv (NOAA daily weather in Seattle,
// 2012-2015): monthly median temp_max against the CSV read in plain JavaScript (continuous
// quantile: linear interpolation between order statistics, the definition both engines document),
// on DuckDB and PostgreSQL; and on flights-3m.parquet (US flights, January to June 2001) on DuckDB
// against the test's own SQL over the file (median() and the ordered-set percentile_cont).
import { describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../analysis/answer-sub-question.js';
import { rollupNeeds } from '../../analysis/rollup/eligibility.js';
import type { SubQuestion } from '../../analysis/types.js';
import type { Workspace } from '../../analysis/workspace.js';
import { parseConfigText } from '../../config/load.js';
import { flightsParquetConfigText, vegaDataFile } from '../helpers/open-data.js';
import { seriesPoints, useFileWorkspace } from '../helpers/workspace-checks.js';
import { describeOnSeattleWeather, loadSeattleWeather } from './stats/seattle-weather.js';

/** Continuous quantile of a sample: position p*(n-1) between order statistics. */
function quantile(xs: number[], p: number): number {
  const s = [...xs].sort((a, b) => a - b);
  const h = p * (s.length - 1);
  const lo = Math.floor(h);
  return s[lo]! + (h - lo) * ((s[lo + 1] ?? s[lo]!) - s[lo]!);
}

const WINDOW = { start: '2012-01-01', end: '2016-01-01' };
const monthly = (p: number): SubQuestion => ({ id: 'q', kind: 'trend', lens: 'time_pattern', template: 'series', metrics: ['temp_max'], grain: 'month', window: WINDOW, filters: [], statistic: { quantile: p } });

function seattleChecks(ws: () => Workspace): void {

  it.each([0.5, 0.9])('monthly quantile %s of temp_max matches the CSV; it reads the table, not a rollup', async (p) => {
    const byMonth = new Map<string, number[]>();
    for (const d of loadSeattleWeather()) {
      const k = `${d.date.slice(0, 7)}-01`;
      byMonth.set(k, [...(byMonth.get(k) ?? []), d.tempMax]);
    }
    const sq = monthly(p);
    expect(rollupNeeds(sq, ws().dataset)).toBeNull();
    const a = await answerSubQuestion(sq, ws());
    const points = seriesPoints(a, 'temp_max');
    expect(points.length).toBe(48);
    for (const pt of points) expect(pt.value).toBeCloseTo(quantile(byMonth.get(pt.period)!, p), 9);
    // The mean differs from the median somewhere, so the check tells them apart.
    const means = [...byMonth].map(([, xs]) => xs.reduce((s, x) => s + x, 0) / xs.length);
    expect(points.some((pt, i) => Math.abs(pt.value! - means[i]!) > 0.1)).toBe(true);
  });
}

describeOnSeattleWeather({ duckdb: 'a quantile of an averaged metric on DuckDB (seattle-weather.csv)', postgres: 'a quantile of an averaged metric on PostgreSQL (table loaded from seattle-weather.csv)' }, 'tc_quant', seattleChecks);

const FLIGHTS = vegaDataFile('flights-3m.parquet');
const flightsConfig = parseConfigText(
  flightsParquetConfigText(['{ name: delay, label: Average delay, average: delay, unit: number, unit_label: min, kind: ratio }']) +
    `    dimensions:\n      - { name: origin, label: Origin airport, column: origin }\n`,
  '/virtual/flights.yaml',
);

describe('median and 90th percentile delay on flights-3m.parquet (DuckDB)', () => {
  const { ws, own } = useFileWorkspace(flightsConfig, 'flights');
  const base: SubQuestion = { id: 'q', kind: 'trend', lens: 'time_pattern', template: 'series', metrics: ['delay'], grain: 'month', window: { start: '2001-01-01', end: '2001-07-01' }, filters: [] };

  it('monthly median and p90 match the file', async () => {
    const rows = await own(`SELECT strftime(date_trunc('month', date), '%Y-%m-%d') AS m, median(delay) AS med, percentile_cont(0.9) WITHIN GROUP (ORDER BY delay) AS p90, AVG(delay) AS mean
      FROM read_parquet('${FLIGHTS}') WHERE date < DATE '2001-07-01' GROUP BY 1 ORDER BY 1`);
    expect(rows.length).toBe(6);
    const med = seriesPoints(await answerSubQuestion({ ...base, statistic: { quantile: 0.5 } }, ws()), 'delay');
    const p90 = seriesPoints(await answerSubQuestion({ ...base, statistic: { quantile: 0.9 } }, ws()), 'delay');
    for (const r of rows) {
      expect(Number(r.med)).not.toBeCloseTo(Number(r.mean), 1);
      expect(med.find((p) => p.period === r.m)!.value).toBeCloseTo(Number(r.med), 9);
      expect(p90.find((p) => p.period === r.m)!.value).toBeCloseTo(Number(r.p90), 9);
    }
  }, 120_000);

  it('median delay by origin: each named segment is its own median over the period', async () => {
    const rows = await own(`SELECT origin, median(delay) AS med FROM read_parquet('${FLIGHTS}') WHERE date < DATE '2001-07-01' GROUP BY 1 HAVING COUNT(*) >= 100`);
    const want = new Map(rows.map((r) => [String(r.origin), Number(r.med)]));
    const a = await answerSubQuestion({ ...base, template: 'segment_shares', lens: 'distribution', dimension: 'origin', statistic: { quantile: 0.5 } }, ws());
    const named = a.tables.segment_totals!.rows.filter((x) => x.other === false);
    expect(named.length).toBeGreaterThan(2);
    for (const seg of named) expect(Number(seg.value)).toBeCloseTo(want.get(String(seg.segment))!, 9);
    // The highest median of the file leads.
    expect(Number(named[0]!.value)).toBe(Math.max(...want.values()));
    expect(a.queries.every((q) => !/tc_rollup/.test(q.sql) && /quantile_cont/.test(q.sql))).toBe(true);
  }, 120_000);
});
