// A level on a public series: NOAA's Mauna Loa monthly mean CO2 (vega-datasets co2-concentration.csv,
// 1958–2020), loaded into an in-memory DuckDB table with a config written here that declares it a
// level in ppm with one decimal. Every number is checked against a plain computation of the CSV
// in this file (means and least-squares slopes), never through DuckDB, and the decade rates
// against NOAA's published Mauna Loa growth rates.
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { TrendSeasonalityFinding, TrendSummaryFinding, TrendTestFinding } from '../../../analysis/findings/segments.js';
import { renderChartWithGeometry } from '../../../analysis/charts/render.js';
import type { LineSpec, SeasonalProfileSpec } from '../../../analysis/charts/spec.js';
import type { GrowthLevelRateFinding, GrowthRateSummaryFinding } from '../../../analysis/findings/growth.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../../analysis/types.js';
import type { TemplateName } from '../../../analysis/sub-questions/registry.js';
import { memoryWorkspace } from './trend-memory-db.js';
import { vegaDataFile } from '../../helpers/open-data.js';

const CSV = vegaDataFile('co2-concentration.csv');

const CONFIG = `
version: 1
datasets:
  - name: co2
    label: Mauna Loa CO2 (vega-datasets)
    source: { kind: duckdb, path: unused.duckdb }
    table: co2
    time_column: Date
    timezone: UTC
    metrics:
      - name: co2
        label: CO2
        definition: { type: average, column: CO2 }
        unit: number
        unit_label: ppm
        decimals: 1
        higher_is_better: false
        kind: level
`;

interface Reading {
  date: string;
  year: number;
  month: number;
  co2: number;
  /** NOAA's own seasonally adjusted value, shipped beside the reading. */
  adjusted: number;
}
const readings: Reading[] = readFileSync(CSV, 'utf8')
  .trim()
  .split('\n')
  .slice(1)
  .map((line) => {
    const [date, co2, adjusted] = line.split(',');
    return { date: date!, year: Number(date!.slice(0, 4)), month: Number(date!.slice(5, 7)), co2: Number(co2), adjusted: Number(adjusted) };
  });

/** Ordinary least squares slope of y on x. */
function olsSlope(xs: number[], ys: number[]): number {
  const mx = xs.reduce((a, b) => a + b, 0) / xs.length;
  const my = ys.reduce((a, b) => a + b, 0) / ys.length;
  let sxy = 0;
  let sxx = 0;
  xs.forEach((x, i) => {
    sxy += (x - mx) * (ys[i]! - my);
    sxx += (x - mx) ** 2;
  });
  return sxy / sxx;
}

let ws: Awaited<ReturnType<typeof memoryWorkspace>>;
const question = (template: TemplateName, grain: SubQuestion['grain'] = 'month'): SubQuestion => ({
  id: 'c',
  kind: 'trend',
  lens: 'time_pattern',
  template,
  metrics: ['co2'],
  grain,
  window: { start: '1958-01-01', end: '2020-05-01' },
  filters: [],
});
const present = async (sq: SubQuestion, audience: 'managers' | 'analysts' = 'managers') => {
  const answer = await answerSubQuestion(sq, ws);
  return { answer, shown: SUB_QUESTIONS[sq.template].present(answer, { dataset: ws.dataset, locale: 'en-GB', audience, chart: { width: 1200, height: 675, scale: 1 }, dataAsOf: ws.coverage.lastDate }) };
};

beforeAll(async () => {
  ws = await memoryWorkspace([`CREATE TABLE co2 AS SELECT * FROM read_csv('${CSV.replaceAll("'", "''")}', header = true)`], CONFIG);
});
afterAll(async () => {
  await ws?.source.close();
});

describe('a level (Mauna Loa CO2) is stated in its own units', () => {
  it('the summary says "averaged 355.x ppm", never "a month", with the mean of the CSV', async () => {
    const { answer, shown } = await present(question('trend_summary'));
    const s = answer.findings.find((f): f is TrendSummaryFinding => f.type === 'trend_summary')!;
    // Every stamped month is complete (stamped monthly on the 1st, up to April 2020).
    const mean = readings.reduce((a, r) => a + r.co2, 0) / readings.length;
    expect(s.n).toBe(readings.length);
    expect(s.mean).toBeCloseTo(mean, 9);
    expect(shown.title).toBe(`CO2 averaged ${mean.toFixed(1)}\u00a0ppm, from ${Math.min(...readings.map((r) => r.co2)).toFixed(1)}\u00a0ppm to ${Math.max(...readings.map((r) => r.co2)).toFixed(1)}\u00a0ppm`);
    expect(shown.caption).toContain(`averaged ${mean.toFixed(1)}\u00a0ppm (median`);
    expect(`${shown.title} ${shown.caption}`).not.toMatch(/a month|a year/);
  });

  it('the trend is a change in ppm a year and a decade, with a rate for each decade near NOAA’s', async () => {
    const { answer, shown } = await present(question('trend_test'));
    const t = answer.findings.find((f): f is TrendTestFinding => f.type === 'trend_test')!;
    expect(t.direction).toBe('up');
    // Independent: least squares of the monthly readings on time within each whole decade of the CSV.
    const decades = [1960, 1970, 1980, 1990, 2000, 2010];
    expect(t.byDecade.map((d) => d.decade)).toEqual(decades);
    for (const d of t.byDecade) {
      const inside = readings.filter((r) => r.year >= d.decade && r.year < d.decade + 10);
      const ols = olsSlope(inside.map((r) => r.year + (r.month - 1) / 12), inside.map((r) => r.co2));
      expect(Math.abs(d.perYear - ols)).toBeLessThan(0.1);
    }
    // NOAA Global Monitoring Laboratory, Mauna Loa annual mean growth rates averaged by decade
    // (recalled from memory, ppm a year): 1960s about 0.86, 2010s about 2.4.
    expect(t.byDecade[0]!.perYear).toBeGreaterThan(0.7);
    expect(t.byDecade[0]!.perYear).toBeLessThan(1.0);
    expect(t.byDecade[5]!.perYear).toBeGreaterThan(2.2);
    expect(t.byDecade[5]!.perYear).toBeLessThan(2.6);
    // The whole span: least squares over all readings, per year and per decade.
    const overall = olsSlope(readings.map((r) => r.year + (r.month - 1) / 12), readings.map((r) => r.co2));
    expect(Math.abs(t.slopePerYear - overall)).toBeLessThan(0.1);
    expect(shown.title).toBe(`CO2 shows a rising trend of about ${t.slopePerYear.toFixed(1)}\u00a0ppm a year`);
    expect(shown.caption).toContain(`rose by about ${t.slopePerYear.toFixed(1)}\u00a0ppm a year (${(t.slopePerYear * 10).toFixed(1)}\u00a0ppm a decade)`);
    expect(shown.caption).toContain(`+${t.byDecade[0]!.perYear.toFixed(1)}\u00a0ppm in the 1960s`);
    expect(shown.caption).toContain(`+${t.byDecade[5]!.perYear.toFixed(1)}\u00a0ppm in the 2010s`);
    expect(shown.caption).not.toMatch(/%/);
  });

  it('the seasonal pattern is a swing in ppm around the yearly mean, as NOAA’s own adjustment has it, drawn around zero', async () => {
    const { answer, shown } = await present(question('trend_seasonality'));
    const s = answer.findings.find((f): f is TrendSeasonalityFinding => f.type === 'trend_seasonality')!;
    expect(s.model).toBe('additive');
    // Independent: NOAA's seasonal cycle is the reading less its seasonally adjusted value (both
    // columns of the CSV); its mean per calendar month is the cycle our decomposition should find.
    for (let month = 1; month <= 12; month++) {
      const rows = readings.filter((r) => r.month === month);
      const noaa = rows.reduce((a, r) => a + (r.co2 - r.adjusted), 0) / rows.length;
      expect(Math.abs(s.months[month - 1]!.index - noaa)).toBeLessThan(0.35);
    }
    expect(s.months.reduce((a, m) => a + m.index, 0)).toBeCloseTo(0, 9);
    // May is the highest month and September or October the lowest at Mauna Loa (NOAA's record).
    expect(s.busiest[0]).toBe(5);
    expect([9, 10]).toContain(s.quietest[0]);
    const may = s.months[4]!.index;
    expect(shown.caption).toContain(`runs +${may.toFixed(1)}\u00a0ppm above the yearly mean in May`);
    expect(shown.caption).not.toMatch(/index|%/);
    const spec = shown.chart as SeasonalProfileSpec;
    expect(spec.reference).toBe(0);
    expect(spec.units?.axisTitle).toBe('Difference from the yearly mean (ppm)');
    // The unit is said once, in the axis title, not after each of twelve bar labels.
    expect(spec.months[4]!.text).toBe(`+${may.toFixed(1)}`);
    // Drawn around zero: months above the mean end above the reference line, those below beneath it.
    const { png, geometry } = await renderChartWithGeometry(spec);
    if (process.env.TC_CHART_DIR) writeFileSync(join(process.env.TC_CHART_DIR, 'co2-seasonal.png'), png);
    const ref = geometry.lines.find((l) => l.role === 'reference')!;
    s.months.forEach((m, k) => {
      const y = geometry.points[k]!.y;
      if (m.index > 0.05) expect(y).toBeLessThan(ref.y1);
      if (m.index < -0.05) expect(y).toBeGreaterThan(ref.y1);
    });
  });

  it('its growth is a change in ppm on the year before and a rate a year and a decade, decade by decade, with its chart in ppm', async () => {
    const { answer, shown } = await present(question('growth_series'));
    const rate = answer.findings.find((f): f is GrowthLevelRateFinding => f.type === 'growth_level_rate')!;
    // Independent: the mean of each complete year's twelve readings in the CSV (1959–2019).
    const yearly = new Map<number, number[]>();
    for (const r of readings) yearly.set(r.year, [...(yearly.get(r.year) ?? []), r.co2]);
    const means = [...yearly].filter(([y, v]) => v.length === 12 && y < 2020).map(([y, v]) => ({ year: y, mean: v.reduce((a, b) => a + b, 0) / 12 }));
    expect(rate.from.slice(0, 4)).toBe(String(means[0]!.year));
    expect(rate.to).toBe('2019-01-01');
    expect(Math.abs(rate.perYear - olsSlope(means.map((m) => m.year), means.map((m) => m.mean)))).toBeLessThan(0.1);
    // NOAA's decade means of the Mauna Loa annual growth rate (recalled from memory): 1960s about 0.86 ppm a year, 2010s about 2.4.
    expect(rate.byDecade.map((x) => x.decade)).toEqual([1960, 1970, 1980, 1990, 2000, 2010]);
    expect(Math.abs(rate.byDecade[0]!.perYear - 0.86)).toBeLessThan(0.15);
    expect(Math.abs(rate.byDecade[5]!.perYear - 2.4)).toBeLessThan(0.15);
    const [y2018, y2019] = [means.find((m) => m.year === 2018)!, means.find((m) => m.year === 2019)!];
    expect(shown.caption).toContain(`2019: ${y2019.mean.toFixed(1)}\u00a0ppm, +${(y2019.mean - y2018.mean).toFixed(1)}\u00a0ppm on the year before`);
    expect(shown.caption).toContain(`it rose about ${rate.perYear.toFixed(1)}\u00a0ppm a year (${(rate.perYear * 10).toFixed(1)}\u00a0ppm a decade)`);
    expect(shown.caption).toContain('in the 1960s');
    expect(`${shown.title} ${shown.caption}`).not.toMatch(/%|compound/);
    expect(shown.takeaway?.verdict?.direction).toBe('up');
    const spec = shown.chart as LineSpec;
    expect(spec.kind).toBe('line');
    expect(spec.format.label).toBe('ppm');
    // The line is the change on the same month a year earlier, in ppm, from the CSV: March 2019 less March 2018.
    const mar = (y: number) => readings.find((r) => r.date === `${y}-03-01`)!.co2;
    expect(spec.points.find((p) => p.period === '2019-03-01')!.value).toBeCloseTo(mar(2019) - mar(2018), 9);
    const { png } = await renderChartWithGeometry(spec);
    if (process.env.TC_CHART_DIR) writeFileSync(join(process.env.TC_CHART_DIR, 'co2-growth.png'), png);
  });

  it('the summary of its changes is in ppm on the same month a year earlier, as the CSV gives them', async () => {
    const { answer, shown } = await present(question('growth_summary'));
    const f = answer.findings.find((x): x is GrowthRateSummaryFinding => x.type === 'growth_rate_summary')!;
    expect(f.measure).toBe('units');
    // Independent: every month's reading less the same month's a year earlier, where both are in the CSV.
    const byDate = new Map(readings.map((r) => [r.date, r.co2]));
    const diffs = readings.flatMap((r) => {
      const base = byDate.get(`${r.year - 1}${r.date.slice(4)}`);
      return base === undefined ? [] : [r.co2 - base];
    });
    expect(f.n).toBe(diffs.length);
    expect(f.mean!).toBeCloseTo(diffs.reduce((a, b) => a + b, 0) / diffs.length, 9);
    expect(f.max!.value).toBeCloseTo(Math.max(...diffs), 9);
    expect(shown.title).toContain(`to +${Math.max(...diffs).toFixed(1)}\u00a0ppm`);
    expect(`${shown.title} ${shown.caption}`).not.toMatch(/%| pts/);
    expect((shown.chart as LineSpec).format.label).toBe('ppm');
  });
});
