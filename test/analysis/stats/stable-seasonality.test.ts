// X-11's F-test for stable seasonality (Lothian & Morry 1978): a one-way analysis of variance of
// the detrended values by calendar month. Checked against @stdlib/stats-anova1 (a general-purpose
// one-way ANOVA from the npm registry), then through a whole seasonality answer on two open
// datasets: vega-datasets seattle-weather.csv (daily maximum temperature, NOAA, Seattle 2012-2015:
// a strong yearly cycle) and us-employment.csv (BLS nonfarm payrolls 2006-2015, which BLS publishes
// seasonally adjusted, recalled from memory and borne out by the data: no steady month pattern).
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import anova1 from '@stdlib/stats-anova1';
import { beforeAll, describe, expect, it } from 'vitest';
import { seasonalIndices } from '../../../analysis/stats/decomposition.js';
import { stableSeasonalityTest } from '../../../analysis/stats/stable-seasonality.js';
import { runCli } from '../../helpers/run-cli.js';
import { vegaDataFile } from '../../helpers/open-data.js';

/** Monthly means of a daily CSV column, in calendar order. */
function monthly(file: string, column: string): { period: string; value: number }[] {
  const [head, ...lines] = readFileSync(file, 'utf8').trim().split('\n');
  const at = head!.split(',').indexOf(column);
  const sums = new Map<string, { s: number; n: number }>();
  for (const line of lines) {
    const cells = line.split(',');
    const month = cells[0]!.slice(0, 7);
    const cell = sums.get(month) ?? { s: 0, n: 0 };
    cell.s += Number(cells[at]);
    cell.n += 1;
    sums.set(month, cell);
  }
  return [...sums.entries()].sort(([a], [b]) => a.localeCompare(b)).map(([period, c]) => ({ period, value: c.s / c.n }));
}

/** The detrended values by calendar month, from our own classical decomposition. */
function detrendedByMonth(points: { period: string; value: number }[], model: 'multiplicative' | 'additive'): number[][] {
  const r = seasonalIndices(points.map((p) => ({ season: Number(p.period.slice(5, 7)), value: p.value })), 12, model);
  if (r.kind !== 'ok') throw new Error(r.kind);
  return Array.from({ length: 12 }, (_, k) => r.cycles.map((c) => c.ratios[k]).filter((x): x is number => x !== null && x !== undefined));
}

const temps = monthly(vegaDataFile('seattle-weather.csv'), 'temp_max');

describe('the F-test for stable seasonality', () => {
  it('gives the F and p of a one-way ANOVA by month (@stdlib/stats-anova1)', () => {
    for (const [points, model] of [
      [temps, 'additive'],
      [temps.map((p) => ({ ...p, value: p.value + 20 })), 'multiplicative'],
    ] as const) {
      const groups = detrendedByMonth([...points], model);
      const ours = stableSeasonalityTest(groups)!;
      const ref = anova1(groups.flat(), groups.flatMap((g, k) => g.map(() => `m${k + 1}`)));
      expect(ours.f).toBeCloseTo(ref.statistic, 8);
      expect(ours.pValue).toBeCloseTo(ref.pValue, 10);
      expect(ours.df1).toBe(11);
      expect(ours.df2).toBe(groups.flat().length - 12);
    }
  });

  it('finds no season in groups that do not differ, and none to test with one group', () => {
    expect(stableSeasonalityTest([[1, 2, 3], [1, 2, 3], [1, 2, 3]])!.pValue).toBeCloseTo(1, 10);
    expect(stableSeasonalityTest([[1, 2, 3]])).toBeNull();
  });
});

let dir = '';
async function seasonAnswer(config: string, request: string): Promise<string> {
  const out = mkdtempSync(join(dir, 'out-'));
  const r = await runCli(['ask', '--config', config, '--request', request, '--out', out]);
  expect(r.code, r.err).toBe(0);
  const posts = (JSON.parse(readFileSync(join(out, 'thread.json'), 'utf8')) as { posts: { text: string }[] }).posts.map((p) => p.text);
  return posts.find((p) => /season|busiest|highest in/i.test(p.split('\n')[0]!) && /^\*\d+\./.test(p))!;
}

let weather = '';
let payrolls = '';
beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'tc-stable-season-'));
  const sea = join(dir, 'sea.yaml');
  writeFileSync(sea, `version: 1
datasets:
  - name: weather
    label: Seattle weather
    source: { kind: csv, paths: ["${vegaDataFile('seattle-weather.csv')}"] }
    time_column: date
    timezone: UTC
    metrics:
      - { name: temp_max, label: Maximum temperature, also_called: [temperature], average: temp_max, unit: number, unit_label: °C, kind: level }
    dimensions:
      - { name: weather, label: Weather, column: weather }
`);
  const jobs = join(dir, 'jobs.yaml');
  writeFileSync(jobs, `version: 1
datasets:
  - name: jobs
    label: US employment
    source: { kind: csv, paths: ["${vegaDataFile('us-employment.csv')}"] }
    time_column: month
    timezone: UTC
    metrics:
      - { name: nonfarm, label: Nonfarm employment, also_called: [payrolls, employment], sum: nonfarm, unit: number, unit_label: thousand, kind: level }
    dimensions: []
`);
  weather = await seasonAnswer(sea, 'When in the year is the temperature highest and lowest?');
  payrolls = await seasonAnswer(jobs, 'When in the year is nonfarm employment highest and lowest?');
}, 300_000);

describe('a seasonality answer', () => {
  it('names the peak months when the months differ beyond the years\' own swings (Seattle temperatures)', () => {
    expect(weather).toBeDefined();
    const means = temps.reduce((m, p) => m.set(p.period.slice(5, 7), [...(m.get(p.period.slice(5, 7)) ?? []), p.value]), new Map<string, number[]>());
    const warmest = [...means.entries()].map(([m, v]) => [m, v.reduce((a, b) => a + b, 0) / v.length] as const).sort((a, b) => b[1] - a[1])[0]![0];
    expect(warmest).toMatch(/^0[78]$/);
    expect(weather.split('\n')[0]).toMatch(/highest in (July|August)/);
    expect(weather).not.toMatch(/no steady seasonal pattern/);
  });

  it('says there is no steady pattern on seasonally adjusted payrolls, naming no peak in its title', () => {
    expect(payrolls, payrolls).toBeDefined();
    expect(payrolls.split('\n')[0]).toMatch(/^\*\d+\. Nonfarm employment: no steady seasonal pattern across the months\*$/);
    expect(payrolls).toMatch(/by no more than chance would give from year to year/);
  });
});
