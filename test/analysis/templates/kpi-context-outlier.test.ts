// The KPI context's "is the latest period unusual" is the series screen's call (quality/series-outliers.ts), so the
// finding and the `outlier` caveat cannot disagree. Checked on public records in vega-datasets: NOAA's Mauna Loa CO2
// (co2-concentration.csv) and NOAA daily precipitation for Seattle (weather.csv).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { seriesOutliers } from '../../../analysis/quality/series-outliers.js';
import { modifiedZScores } from '../../../analysis/stats/index.js';
import { contextOf } from '../../../analysis/templates/kpi-context.js';
import type { PeriodPoint } from '../../../analysis/types.js';
import { vegaDataFile } from '../../helpers/open-data.js';

function csv(name: string): Record<string, string>[] {
  const [header, ...lines] = readFileSync(vegaDataFile(name), 'utf8').trim().split('\n');
  const cols = header!.split(',');
  return lines.map((l) => Object.fromEntries(l.split(',').map((v, i) => [cols[i]!, v])));
}

describe('kpi_context judges the latest period by the series screen', () => {
  // The last ten full years of the CO2 record, May 2010 to April 2020, consecutive months in the file.
  const co2: PeriodPoint[] = csv('co2-concentration.csv').slice(-120).map((r) => ({ period: r.Date!, value: Number(r.CO2), partial: false }));

  it('does not call the latest CO2 month unusual for being the highest of a rising record', () => {
    const f = contextOf('co2', 'month', co2, 'additive')!;
    // The file's own arithmetic: April 2020 is the highest of the ten years.
    expect(f.value).toBe(Math.max(...co2.map((p) => p.value!)));
    expect(f.rank).toBe(1);
    expect(f.outlier).toBe(false);
    expect(f.outlierRule).toBe('seasonal');
  });

  it('flags a jump planted in the latest month that the values alone miss, with the usual the record gives it', () => {
    // PLANTED: 3 ppm added to April 2020 of a copy of the record.
    const truth = co2[co2.length - 1]!.value!;
    const planted = co2.map((p, i) => (i === co2.length - 1 ? { ...p, value: p.value! + 3 } : p));
    const f = contextOf('co2', 'month', planted, 'additive')!;
    expect(f.outlier).toBe(true);
    expect(f.robustZ!).toBeGreaterThan(3.5);
    // 0.3 ppm: a tenth of the jump (the latest month's trend is carried past the moving average's end on a line).
    expect(Math.abs(f.usual! - truth)).toBeLessThan(0.3);
    // The plain rule over the values (what kpi_context used before) sees nothing: a rising series' top is not far out.
    const plain = modifiedZScores(planted.map((p) => p.value));
    expect(Math.abs(plain!.scores[planted.length - 1]!)).toBeLessThan(3.5);
    // One rule decides: the caveat names the same month.
    expect(seriesOutliers(planted, 'month', 'additive').map((c) => c.data.period)).toContain('2020-04-01');
  });

  it('flags Seattle’s December 2015, the wettest month of the file, against a usual inside the other Decembers’ range', () => {
    const sums = new Map<string, number>();
    for (const r of csv('weather.csv')) if (r.location === 'Seattle') sums.set(`${r.date!.slice(0, 7)}-01`, (sums.get(`${r.date!.slice(0, 7)}-01`) ?? 0) + Number(r.precipitation));
    const points: PeriodPoint[] = [...sums].sort(([a], [b]) => a.localeCompare(b)).map(([period, value]) => ({ period, value, partial: false }));
    const f = contextOf('precipitation', 'month', points, 'multiplicative')!;
    expect(f.period).toBe('2015-12-01');
    expect(f.rank).toBe(1);
    expect(f.outlier).toBe(true);
    const decembers = points.filter((p) => p.period.slice(5, 7) === '12' && p.period !== '2015-12-01').map((p) => p.value!);
    expect(f.usual!).toBeGreaterThanOrEqual(Math.min(...decembers));
    expect(f.usual!).toBeLessThanOrEqual(Math.max(...decembers));
    expect(seriesOutliers(points, 'month', 'multiplicative').map((c) => c.data.period)).toContain('2015-12-01');
  });
});
