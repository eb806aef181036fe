// trend_seasonality on a table outside the project: vega-datasets' Seattle daily weather
// (2012–2015), loaded into an in-memory DuckDB table with a config written here.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { TrendSeasonalityFinding, TrendWeekdayFinding } from '../../../analysis/findings/segments.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { loadSeattleWeather, monthly } from '../stats/seattle-weather.js';
import { memoryWorkspace } from './trend-memory-db.js';
import { vegaDataFile } from '../../helpers/open-data.js';

const CSV = vegaDataFile('seattle-weather.csv');

const CONFIG = `
version: 1
datasets:
  - name: seattle
    label: Seattle weather (vega-datasets)
    source: { kind: duckdb, path: unused.duckdb }
    table: weather
    time_column: date
    timezone: America/Los_Angeles
    metrics:
      - name: temp_max
        label: Daily maximum temperature
        definition: { type: average, column: temp_max }
        unit: number
        decimals: 1
        higher_is_better: true
      - name: precipitation
        label: Precipitation
        definition: { type: sum, column: precipitation }
        unit: number
        higher_is_better: false
    dimensions:
      - { name: weather, column: weather, label: Weather }
`;

// R 4.2.2 decompose(..., type = "multiplicative")$figure on the monthly mean temp_max of the same file, as recorded
// in test/analysis/stats/decomposition.test.ts (run once by hand there).
const R_TEMP_MAX = [
  0.507507780694236, 0.588923936075734, 0.785826968588254, 0.889698706290558, 1.172328123897633, 1.395025245681366,
  1.552598425716549, 1.599112663810361, 1.366406256728667, 0.966277886486035, 0.6930632567777, 0.483230749252907,
];

let ws: Awaited<ReturnType<typeof memoryWorkspace>>;
const sq: SubQuestion = {
  id: 'w',
  kind: 'trend',
  lens: 'time_pattern',
  template: 'trend_seasonality',
  metrics: ['temp_max'],
  grain: 'month',
  window: { start: '2012-01-01', end: '2016-01-01' },
  filters: [],
};

beforeAll(async () => {
  // The file path is test setup, not user input; it still goes in as an escaped literal.
  ws = await memoryWorkspace([`CREATE TABLE weather AS SELECT * FROM read_csv('${CSV.replaceAll("'", "''")}', header = true)`], CONFIG);
});
afterAll(async () => {
  await ws?.source.close();
});

describe('trend_seasonality on Seattle weather', () => {
  it('finds July and August the warmest months by mean temp_max, as the public record has it, with the additive figure of classical decomposition', async () => {
    const a = await answerSubQuestion(sq, ws);
    const s = a.findings.find((f): f is TrendSeasonalityFinding => f.type === 'trend_seasonality')!;
    expect(s).toBeDefined();
    expect([...s.busiest].sort()).toEqual([7, 8]);
    // Some days' maximum is below 0 °C (−1.6 °C at the lowest, from the CSV itself), so a
    // temperature swings in degrees around its mean (catalog seasonalModel), not as a ratio: the
    // additive figure of classical decomposition (Hyndman & Athanasopoulos, FPP 3rd ed., §3.4),
    // worked out here from the CSV's monthly means: the 2×12 centred moving average, each month's
    // mean deviation from it, centred to sum to zero. (R's multiplicative figure on the same series
    // stays checked in test/analysis/stats/decomposition.test.ts.)
    expect(Math.min(...loadSeattleWeather().map((d) => d.tempMax))).toBeLessThan(0);
    expect(s.model).toBe('additive');
    const x = monthly(loadSeattleWeather()).sort((a, b) => (a.key < b.key ? -1 : 1)).map((m) => m.meanTempMax);
    const dev: number[][] = Array.from({ length: 12 }, () => []);
    for (let t = 6; t < x.length - 6; t++) {
      const ma = (x[t - 6]! / 2 + x.slice(t - 5, t + 6).reduce((a, b) => a + b, 0) + x[t + 6]! / 2) / 12;
      dev[t % 12]!.push(x[t]! - ma);
    }
    const raw = dev.map((d) => d.reduce((a, b) => a + b, 0) / d.length);
    const centre = raw.reduce((a, b) => a + b, 0) / 12;
    s.months.forEach((m, k) => expect(m.index).toBeCloseTo(raw[k]! - centre, 9));
    expect(R_TEMP_MAX.indexOf(Math.max(...R_TEMP_MAX)) + 1).toBe(8);
    // December and January are the coldest (public record).
    expect([...s.quietest].sort((x, y) => x - y)).toEqual([1, 12]);

    // Per-year counts against a plain reduction of the CSV (loaded independently of DuckDB).
    const months = monthly(loadSeattleWeather());
    let julAugTopTwo = 0;
    for (const year of ['2012', '2013', '2014', '2015']) {
      const inYear = months.filter((m) => m.key.startsWith(year)).sort((x, y) => y.meanTempMax - x.meanTempMax);
      if (inYear.slice(0, 2).every((m) => m.month === 7 || m.month === 8)) julAugTopTwo++;
    }
    expect(s.fullYears).toEqual([2012, 2013, 2014, 2015]);
    expect(Math.min(s.months[6]!.topTwoIn, s.months[7]!.topTwoIn)).toBe(julAugTopTwo);
  });

  it('gives an average metric weekday levels without shares, and words it as highest rather than busiest', async () => {
    const a = await answerSubQuestion(sq, ws);
    const w = a.findings.find((f): f is TrendWeekdayFinding => f.type === 'trend_weekday')!;
    expect(w.additive).toBe(false);
    expect(w.days.every((d) => d.share === null)).toBe(true);
    // Weekday mean temp_max by plain reduction.
    const days = loadSeattleWeather();
    for (const d of w.days) {
      const xs = days.filter((x) => (new Date(`${x.date}T00:00:00Z`).getUTCDay() + 6) % 7 === d.isoDay - 1).map((x) => x.tempMax);
      expect(d.value).toBeCloseTo(xs.reduce((p, q) => p + q, 0) / xs.length, 9);
    }
    const p = SUB_QUESTIONS['trend_seasonality'].present(a, { dataset: ws.dataset, locale: 'en-US', audience: 'managers', chart: { width: 1200, height: 675, scale: 1 }, dataAsOf: ws.coverage.lastDate });
    expect(p.title).toBe('Daily maximum temperature is highest in July and August (top two in 4 of 4 full years)');
    expect(p.chart?.kind).toBe('seasonal_profile');
  });
});
