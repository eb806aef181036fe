// Unusual periods judged after the cycle and trend are taken out (analysis/quality/series-outliers.ts),
// checked on public records in vega-datasets: NOAA's Mauna Loa CO2 (co2-concentration.csv), NOAA daily
// weather for Seattle and New York (weather.csv) and the BLS nonfarm payroll changes (us-employment.csv).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { screenSeries, seriesOutliers } from '../../../analysis/quality/series-outliers.js';
import { seasonalRemainders } from '../../../analysis/stats/decomposition.js';
import type { PeriodPoint } from '../../../analysis/types.js';
import { vegaDataFile } from '../../helpers/open-data.js';

/** Rows of a vega-datasets CSV (no quoted fields in these files), parsed with a plain split. */
function csv(name: string): Record<string, string>[] {
  const [header, ...lines] = readFileSync(vegaDataFile(name), 'utf8').trim().split('\n');
  const cols = header!.split(',');
  return lines.map((l) => Object.fromEntries(l.split(',').map((v, i) => [cols[i]!, v])));
}

/** Month starts from `first` to `last` inclusive, a month with no value as a null point (as readSeries gives a gap). */
function monthlyPoints(values: ReadonlyMap<string, number>, first: string, last: string): PeriodPoint[] {
  const out: PeriodPoint[] = [];
  let [y, m] = [Number(first.slice(0, 4)), Number(first.slice(5, 7))];
  for (;;) {
    const period = `${y}-${String(m).padStart(2, '0')}-01`;
    if (period > last) return out;
    out.push({ period, value: values.get(period) ?? null, partial: false });
    m = m === 12 ? 1 : m + 1;
    if (m === 1) y++;
  }
}

const monthOf = (period: string) => Number(period.slice(5, 7));

describe('seasonalRemainders', () => {
  it('leaves nothing of a series that is exactly trend plus a repeating cycle, ends included (FPP 3.4: y = T + S + R)', () => {
    // Built from the additive identity, not from data: a line plus a fixed 12-month pattern summing to 0.
    const pattern = [-5, -4, -2, 0, 3, 6, 7, 6, 3, 0, -6, -8];
    const y = Array.from({ length: 49 }, (_, t) => 10 + 0.25 * t + pattern[t % 12]!);
    const r = seasonalRemainders(y, 12, 'additive');
    if (r.kind !== 'ok') throw new Error(r.kind);
    r.remainder.forEach((e) => expect(Math.abs(e!)).toBeLessThan(1e-9));
    r.seasonal.slice(0, 12).forEach((s, k) => expect(s).toBeCloseTo(pattern[k]!, 9));
  });

  it('and the multiplicative one: a growing level times a repeating ratio leaves remainders of 0', () => {
    const ratio = [0.8, 0.9, 1.0, 1.1, 1.3, 1.2, 1.0, 0.9, 0.8, 1.0, 1.0, 1.0];
    const mean = ratio.reduce((a, b) => a + b, 0) / 12;
    // A flat level keeps the 2×12 moving average exactly on it; the ratios are centred to average 1.
    const y = Array.from({ length: 36 }, (_, t) => 200 * ratio[t % 12]!);
    const r = seasonalRemainders(y, 12, 'multiplicative');
    if (r.kind !== 'ok') throw new Error(r.kind);
    r.remainder.forEach((e) => expect(Math.abs(e!)).toBeLessThan(1e-12));
    r.seasonal.slice(0, 12).forEach((s, k) => expect(s).toBeCloseTo(ratio[k]! / mean, 12));
  });

  it('declines fewer than the cycles asked for', () => {
    expect(seasonalRemainders([1, 2, 3, 4, 5, 6, 7], 4, 'additive')).toMatchObject({ kind: 'too_few_cycles', fullCycles: 1, required: 2 });
  });
});

describe('unusual months of the Mauna Loa CO2 record (NOAA, vega-datasets co2-concentration.csv)', () => {
  const rows = csv('co2-concentration.csv');
  const byMonth = new Map(rows.map((r) => [r.Date!, Number(r.CO2)]));
  const all = monthlyPoints(byMonth, rows[0]!.Date!, rows[rows.length - 1]!.Date!);
  // The last ten full years, May 2010 to April 2020: a "recent years" window.
  const decade = all.slice(-120);

  it('does not flag the seasonal high (May) or low (September, October) of any year once the cycle is taken out', () => {
    for (const points of [all, decade]) {
      const screen = screenSeries(points, 'month', 'additive')!;
      expect(screen.rule).toBe('seasonal');
      const months = screen.unusual.map((u) => monthOf(u.period));
      expect(months).not.toContain(5);
      expect(months).not.toContain(9);
      expect(months).not.toContain(10);
      // Not one calendar month recurring: what is left is not the season. A few of 700 months at most.
      expect(screen.unusual.length).toBeLessThanOrEqual(points.length / 100);
    }
  });

  it('flags a planted jump of 3 ppm in May 2015 (PLANTED: a copy of the record, the real May 2015 reads 404.10 ppm) and nothing in its place', () => {
    const planted = decade.map((p) => (p.period === '2015-05-01' ? { ...p, value: p.value! + 3 } : p));
    const real = screenSeries(decade, 'month', 'additive')!;
    const screen = screenSeries(planted, 'month', 'additive')!;
    const top = [...screen.unusual].sort((a, b) => Math.abs(b.score) - Math.abs(a.score))[0]!;
    expect(top.period).toBe('2015-05-01');
    expect(real.unusual.map((u) => u.period)).not.toContain('2015-05-01');
    // The yearly high is no outlier among the values themselves either: the plain screen misses the jump.
    expect(screenSeries(planted, 'year')!.unusual).toEqual([]);
    // Expected value: the real May 2015 against its own trend and season, within the spread of other years.
    expect(top.expected!).toBeGreaterThan(byMonth.get('2015-05-01')! - 1);
    expect(top.expected!).toBeLessThan(byMonth.get('2015-05-01')! + 1);
  });

  it('does not let a planted jump raise its own usual: the fit after the flagged months are put back is within 0.15 ppm of the real value', () => {
    // PLANTED: 3 and 10 ppm added to May 2015 of a copy of the record; the file's own May 2015 is the truth.
    const truth = byMonth.get('2015-05-01')!;
    const at = decade.findIndex((p) => p.period === '2015-05-01');
    for (const jump of [3, 10]) {
      const planted = decade.map((p) => (p.period === '2015-05-01' ? { ...p, value: p.value! + jump } : p));
      const flagged = screenSeries(planted, 'month', 'additive')!.unusual.find((u) => u.period === '2015-05-01')!;
      expect(flagged.value).toBeCloseTo(truth + jump, 9);
      // 0.15 ppm: a twentieth of the smaller jump, and under the month-to-month rise of the record in spring.
      expect(Math.abs(flagged.expected! - truth)).toBeLessThan(0.15);
      // The one-pass fit (moving average and season's median over the planted copy) sits higher: the jump leaks in.
      const onePass = seasonalRemainders(planted.map((p) => p.value), 12, 'additive');
      if (onePass.kind !== 'ok') throw new Error(onePass.kind);
      expect(onePass.expected[at]! - truth).toBeGreaterThan(jump / 15);
    }
  });
});

describe('unusual months of daily high temperature, Seattle and New York 2012–2015 (NOAA, vega-datasets weather.csv)', () => {
  const rows = csv('weather.csv');
  const meanByMonth = (location: string) => {
    const sums = new Map<string, [number, number]>();
    for (const r of rows) {
      if (r.location !== location) continue;
      const key = `${r.date!.slice(0, 7)}-01`;
      const s = sums.get(key) ?? [0, 0];
      sums.set(key, [s[0] + Number(r.temp_max), s[1] + 1]);
    }
    return monthlyPoints(new Map([...sums].map(([k, [t, n]]) => [k, t / n])), '2012-01-01', '2015-12-01');
  };

  it('flags no summer month in either city: the yearly swing of 15 to 20 °C is the cycle, not news', () => {
    for (const city of ['Seattle', 'New York']) {
      const screen = screenSeries(meanByMonth(city), 'month', 'additive')!;
      expect(screen.rule).toBe('seasonal');
      expect(screen.cycle).toBe(12);
      for (const u of screen.unusual) expect([6, 7, 8]).not.toContain(monthOf(u.period));
    }
  });

  it('flags New York’s warm February and March 2012 and December 2015, which the screen of raw values misses', () => {
    // Recalled from memory (NOAA climate summaries): March 2012 brought a record heat wave to the eastern US, and
    // December 2015 was New York's warmest December on record. Both run about 4 °C over their months' usual here.
    // February 2012 (the mild winter of 2011–12, also recalled from memory) is flagged since the X-11-style second
    // pass: in one pass March 2012's heat lifted the trend carried to the series' start and hid it.
    const points = meanByMonth('New York');
    const screen = screenSeries(points, 'month', 'additive')!;
    expect(screen.unusual.map((u) => u.period)).toEqual(['2012-02-01', '2012-03-01', '2015-12-01']);
    // The file's own arithmetic: February 2012's mean high is more than 4 °C over every other February's.
    const febs = points.filter((p) => monthOf(p.period) === 2).map((p) => p.value!);
    for (const other of febs.slice(1)) expect(febs[0]! - other).toBeGreaterThan(4);
    for (const u of screen.unusual) expect(u.value - u.expected!).toBeGreaterThan(3);
    expect(screenSeries(points, 'year')!.unusual).toEqual([]);
  });
});

describe('the wettest months, Seattle and New York 2012–2015 (NOAA daily precipitation, vega-datasets weather.csv)', () => {
  const rows = csv('weather.csv');
  const totalByMonth = (location: string) => {
    const sums = new Map<string, number>();
    for (const r of rows) if (r.location === location) sums.set(`${r.date!.slice(0, 7)}-01`, (sums.get(`${r.date!.slice(0, 7)}-01`) ?? 0) + Number(r.precipitation));
    return monthlyPoints(sums, '2012-01-01', '2015-12-01');
  };
  /** The same calendar month's totals in the other years of the file. */
  const sameMonthOtherYears = (points: PeriodPoint[], period: string) =>
    points.filter((p) => monthOf(p.period) === monthOf(period) && p.period !== period).map((p) => p.value!);
  const wettest = (points: PeriodPoint[]) => points.reduce((a, b) => (b.value! > a.value! ? b : a));

  it('flags Seattle’s wettest month, December 2015, against a usual inside the range of the other Decembers', () => {
    const points = totalByMonth('Seattle');
    const top = wettest(points);
    expect(top.period).toBe('2015-12-01');
    const screen = screenSeries(points, 'month', 'multiplicative')!;
    expect(screen.rule).toBe('seasonal');
    const u = screen.unusual.find((x) => x.period === top.period)!;
    expect(u.value).toBeCloseTo(top.value!, 9);
    const others = sameMonthOtherYears(points, top.period);
    expect(u.expected!).toBeGreaterThanOrEqual(Math.min(...others));
    expect(u.expected!).toBeLessThanOrEqual(Math.max(...others));
  });

  it('in New York flags the wet April 2014, not the wettest month (June 2013), since Junes are wet every year', () => {
    const points = totalByMonth('New York');
    const top = wettest(points);
    expect(top.period).toBe('2013-06-01');
    const screen = screenSeries(points, 'month', 'multiplicative')!;
    const periods = screen.unusual.map((u) => u.period);
    expect(periods).not.toContain(top.period);
    // June 2013 is under 1.7 times the other Junes' mean; April 2014 over 3 times the other Aprils'.
    const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
    expect(top.value! / mean(sameMonthOtherYears(points, top.period))).toBeLessThan(1.7);
    const april = points.find((p) => p.period === '2014-04-01')!;
    expect(april.value! / mean(sameMonthOtherYears(points, april.period))).toBeGreaterThan(3);
    expect(periods).toContain('2014-04-01');
    // Its usual is set by the other Aprils, not raised by its own storm: inside their range, below the one-pass fit.
    const u = screen.unusual.find((x) => x.period === '2014-04-01')!;
    const others = sameMonthOtherYears(points, april.period);
    expect(u.expected!).toBeGreaterThanOrEqual(Math.min(...others));
    expect(u.expected!).toBeLessThanOrEqual(Math.max(...others));
    const onePass = seasonalRemainders(points.map((p) => p.value), 12, 'multiplicative');
    if (onePass.kind !== 'ok') throw new Error(onePass.kind);
    expect(u.expected!).toBeLessThan(onePass.expected[points.indexOf(april)]!);
  });
});

describe('a series without a cycle: monthly change in US nonfarm payrolls 2006–2015 (BLS, vega-datasets us-employment.csv)', () => {
  const rows = csv('us-employment.csv');
  const points = monthlyPoints(new Map(rows.map((r) => [r.month!, Number(r.nonfarm_change)])), rows[0]!.month!, rows[rows.length - 1]!.month!);

  it('flags May 2010, the census hiring month, not the whole recession as the raw values do', () => {
    // Recalled from memory (BLS Employment Situation, June 2010): May 2010 payrolls rose by over 400,000, most of it
    // temporary census workers. The file's figures are seasonally adjusted, so the seasonal part here is near 0.
    const screen = screenSeries(points, 'month', 'additive')!;
    expect(screen.rule).toBe('seasonal');
    expect(screen.unusual.map((u) => u.period)).toContain('2010-05-01');
    const plain = screenSeries(points, 'year')!;
    // The raw values call every month of the 2008–09 slump unusual (a run, not a point) and miss May 2010.
    expect(plain.unusual.length).toBeGreaterThanOrEqual(6);
    expect(plain.unusual.map((u) => u.period)).not.toContain('2010-05-01');
    expect(screen.unusual.length).toBeLessThan(plain.unusual.length);
  });
});

describe('which rule screens a series', () => {
  const months = (values: (number | null)[], from = 2020): PeriodPoint[] =>
    values.map((value, i) => ({ period: `${from + Math.floor(i / 12)}-${String((i % 12) + 1).padStart(2, '0')}-01`, value, partial: false }));
  const co2 = csv('co2-concentration.csv');
  const lastYears = (n: number) => co2.slice(-12 * n).map((r) => Number(r.CO2));

  it('screens values alone at a yearly grain, below two full cycles, and when periods skip', () => {
    expect(screenSeries(months(lastYears(1).concat([400, 401, 402])), 'month')).toMatchObject({ rule: 'values', fallback: 'too_few_cycles' });
    expect(screenSeries(months(lastYears(3)), 'year')).toMatchObject({ rule: 'values' });
    expect(screenSeries(months(lastYears(3)), 'year')!.fallback).toBeUndefined();
    const skipping = months(lastYears(3)).filter((_, i) => i !== 7);
    expect(screenSeries(skipping, 'month')).toMatchObject({ rule: 'values', fallback: 'irregular' });
  });

  it('with two full cycles, needs both the remainders and the values to call a period unusual; three or more, the remainders', () => {
    expect(screenSeries(months(lastYears(2)), 'month')!.rule).toBe('seasonal_and_values');
    expect(screenSeries(months(lastYears(3)), 'month')!.rule).toBe('seasonal');
  });

  it('says the rule and the cycle on each caveat', () => {
    const planted = lastYears(4);
    planted[20] = planted[20]! + 4; // PLANTED: 4 ppm added to one month of a copy of the record.
    const c = seriesOutliers(months(planted), 'month', 'additive');
    expect(c.map((x) => x.data.period)).toContain('2021-09-01');
    expect(c.find((x) => x.data.period === '2021-09-01')!.data).toMatchObject({ rule: 'seasonal', cycle: 12, grain: 'month' });
  });
});
