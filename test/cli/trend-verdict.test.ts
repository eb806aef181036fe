// A yes-or-no question about a trend is answered by the trend test over the whole span, not by one
// year's change; a question about a change on the year before still gets that change. Run through
// `threadcount ask` on vega-datasets' iowa-electricity.csv (U.S. EIA net generation in Iowa by
// source, 2001–2017, one row per source per year). The expected figures are computed here from the
// CSV: yearly totals, Sen's slope (median of pairwise slopes, Sen 1968) and the Mann–Kendall test
// with its normal approximation (Hipel & McLeod, Time Series Modelling of Water Resources and
// Environmental Systems, 1994, ch. 23: var S = n(n−1)(2n+5)/18 without ties, z = (S−1)/√var S).
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../helpers/run-cli.js';
import { vegaDataFile } from '../helpers/open-data.js';

const csv = vegaDataFile('iowa-electricity.csv');
const totals = new Map<number, number>();
const renewables = new Map<number, number>();
for (const line of readFileSync(csv, 'utf8').trim().split('\n').slice(1)) {
  const [year, source, value] = line.split(',');
  const y = Number(year!.slice(0, 4));
  totals.set(y, (totals.get(y) ?? 0) + Number(value));
  if (source === 'Renewables') renewables.set(y, Number(value));
}
const years = [...totals.keys()].sort((a, b) => a - b);
const values = years.map((y) => totals.get(y)!);

function senSlope(): number {
  const slopes: number[] = [];
  for (let i = 0; i < values.length; i++) for (let j = i + 1; j < values.length; j++) slopes.push((values[j]! - values[i]!) / (j - i));
  slopes.sort((a, b) => a - b);
  const m = slopes.length;
  return m % 2 ? slopes[(m - 1) / 2]! : (slopes[m / 2 - 1]! + slopes[m / 2]!) / 2;
}

function mannKendallZ(): number {
  let s = 0;
  for (let i = 0; i < values.length; i++) for (let j = i + 1; j < values.length; j++) s += Math.sign(values[j]! - values[i]!);
  const n = values.length;
  return (s - Math.sign(s)) / Math.sqrt((n * (n - 1) * (2 * n + 5)) / 18);
}

async function summaryOf(request: string): Promise<string> {
  const dir = mkdtempSync(join(tmpdir(), 'tc-trend-verdict-'));
  const config = join(dir, 'iowa.yaml');
  writeFileSync(config, `version: 1
datasets:
  - name: iowa
    label: Iowa electricity
    source: { kind: csv, path: "${csv}" }
    time_column: year
    timezone: UTC
    metrics:
      - { name: net_generation, label: Net generation, also_called: [generation], sum: net_generation, unit: number, kind: flow, higher_is_better: true }
    dimensions:
      - { name: source, label: Source, column: source }
`);
  const r = await runCli(['ask', '--config', config, '--request', request, '--out', join(dir, 'out')]);
  expect(r.code, r.err).toBe(0);
  const posts = (JSON.parse(readFileSync(join(dir, 'out', 'thread.json'), 'utf8')) as { posts: { text: string }[] }).posts.map((p) => p.text);
  return posts.find((p) => p.startsWith('*Summary*'))!;
}

let trendSummary = '';
let changeSummary = '';
let driversSummary = '';
beforeAll(async () => {
  trendSummary = await summaryOf('Is generation trending up? is the trend significant?');
  changeSummary = await summaryOf('Was generation up in 2017 on the year before?');
  driversSummary = await summaryOf('what drove the change in generation in 2016 compared with 2015?');
}, 300_000);

describe('the verdict on a trend question', () => {
  it('comes from the trend test: its direction, Sen\'s slope and the test named', () => {
    expect(years[0]).toBe(2001);
    expect(years.at(-1)).toBe(2017);
    const slope = senSlope();
    expect(slope).toBeGreaterThan(0);
    // |z| > 3.29 is p < 0.001 two-sided (standard normal table).
    expect(Math.abs(mannKendallZ())).toBeGreaterThan(3.29);
    const first = trendSummary.split('\n')[1]!;
    expect(first).toMatch(/^- Yes: net generation shows a rising trend/);
    expect(first).toContain(`${(slope / 1000).toFixed(2)}K`);
    expect(first).toContain('Mann–Kendall test, p < 0.001');
    // The trend test's own line is not said a second time.
    expect(trendSummary.match(/rising trend/g)).toHaveLength(1);
  });

  it('leaves a question about the year before to the change on the year before', () => {
    const change = totals.get(2017)! / totals.get(2016)! - 1;
    const first = changeSummary.split('\n')[1]!;
    expect(first).toMatch(/^- Yes: /);
    expect(first).toContain(`${(change * 100).toFixed(1)}%`);
    expect(first).not.toContain('Mann–Kendall');
  });

  it('names a segment ending in s with the apostrophe alone', () => {
    const share = (y: number) => renewables.get(y)! / totals.get(y)!;
    const points = ((share(2016) - share(2015)) * 100).toFixed(1);
    expect(driversSummary).toContain(`Renewables' share of net generation rose ${points} pts to ${(share(2016) * 100).toFixed(1)}%`);
    expect(driversSummary).not.toContain("Renewables's");
  });
});
