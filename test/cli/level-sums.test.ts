// A count held at a date (people unemployed, per industry per month) adds up across the industries
// on one date but not over time: a sum declared `kind: level` is totalled per date and averaged
// over a period's dates, so a year is its mean monthly total, never twelve months added up. Run
// through `threadcount ask` and `init` on vega-datasets' unemployment-across-industries.json (U.S.
// BLS unemployed persons in thousands by industry, monthly, 2000–2010). Expected figures are
// computed here from the JSON itself.
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { parse } from 'yaml';
import { askPostTexts, runCli } from '../helpers/run-cli.js';
import { UNEMPLOYMENT_JSON, unemploymentConfigText } from '../helpers/open-data.js';

const json = UNEMPLOYMENT_JSON;
const rows = JSON.parse(readFileSync(json, 'utf8')) as { series: string; date: string; count: number }[];
const monthTotals = new Map<string, number>();
for (const r of rows) monthTotals.set(r.date.slice(0, 7), (monthTotals.get(r.date.slice(0, 7)) ?? 0) + r.count);
/** The mean over a year's months of the month's total across industries. */
function yearMean(year: number, series?: string): number {
  const months = new Map<string, number>();
  for (const r of rows) if (r.date.startsWith(String(year)) && (!series || r.series === series)) months.set(r.date.slice(0, 7), (months.get(r.date.slice(0, 7)) ?? 0) + r.count);
  return [...months.values()].reduce((a, b) => a + b, 0) / months.size;
}
const thousands = (v: number) => `${Math.round(v).toLocaleString('en')}\u00a0thousand`;

let dir = '';
let config = '';
const postsOf = (request: string) => askPostTexts(config, request, mkdtempSync(join(dir, 'out-')));

let yearly: string[] = [];
let drivers: string[] = [];
beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'tc-level-sums-'));
  config = join(dir, 'unemployment.yaml');
  writeFileSync(config, unemploymentConfigText('number'));
  yearly = await postsOf('yearly unemployed, 2005 to 2009, by year');
  drivers = await postsOf('Which industries drove the rise in unemployment in 2009 compared with 2008?');
}, 300_000);

describe('a sum of kind level', () => {
  it('gives a year as the mean of its monthly totals, written out in thousands', () => {
    // From the JSON: 2009's months total 13,230 thousand on average, 2006's 6,384 (twelve months added up would be 158,759).
    expect(Math.round(yearMean(2009))).toBe(13230);
    const peak = yearly.find((p) => /peaked in 2009/.test(p));
    expect(peak, yearly.join('\n---\n')).toBeDefined();
    expect(peak).toContain(`peaked in 2009 at ${thousands(yearMean(2009))}`);
    expect(peak).toContain(`2006 at ${thousands(yearMean(2006))}`);
    expect(yearly.join('\n')).not.toMatch(/K\u00a0thousand/);
  });

  it('still splits across industries: the drivers add up to the total change, without a days note', () => {
    const answer = drivers.find((p) => /drove the biggest change/.test(p))!;
    expect(answer, drivers.join('\n---\n')).toBeDefined();
    const change = yearMean(2009) - yearMean(2008);
    expect(answer).toContain(`${thousands(yearMean(2008))} to ${thousands(yearMean(2009))}`);
    expect(answer).toContain(`Manufacturing +${Math.round(yearMean(2009, 'Manufacturing') - yearMean(2008, 'Manufacturing')).toLocaleString('en')}\u00a0thousand`);
    expect(change).toBeGreaterThan(5000);
    // Days matter only to a total that adds up over days.
    expect(answer).not.toMatch(/366/);
    expect(answer).not.toMatch(/do not add up/);
  });
});

describe('init on a panel of counts', () => {
  it('drafts the count as a sum of kind level, and says why', async () => {
    const out = join(dir, 'drafted.yaml');
    const r = await runCli(['init', '--source', json, '--out', out]);
    expect(r.code, r.err).toBe(0);
    const text = readFileSync(out, 'utf8');
    const metrics = (parse(text) as { datasets: { metrics: Record<string, unknown>[] }[] }).datasets[0]!.metrics;
    const count = metrics.find((m) => m.name === 'count')!;
    expect(count).toMatchObject({ sum: 'count', kind: 'level' });
    expect(text).toMatch(/totalled on each date and averaged over the dates/);
    // The rate column stays an average of points, with the weighting said.
    expect(metrics.find((m) => m.name === 'rate')).toMatchObject({ average: 'rate / 100', unit: 'percent' });
    expect(text).toMatch(/plain mean of the rows' rates/);
  });
});
