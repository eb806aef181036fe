// Periods a request names are the periods answered. "2009 vs 2008" on a dataset with no breakdown
// leads with the two periods' own figures and no growth answer reads as the data's last two years;
// "how X compared between 2008 and 2009" is the two years set against each other, not one
// stretch; "how many in total in 2009" is the year's figure, not its last month. Run through
// `threadcount ask` on vega-datasets' us-employment.csv (U.S. BLS payrolls, thousands, one row a
// month 2006–2015; nonfarm_change is the month's net jobs added) and
// unemployment-across-industries.json (U.S. BLS unemployed persons in thousands and unemployment
// rate in percent, 14 industries, monthly 2000–2010). Expected figures are computed here from the files.
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../helpers/run-cli.js';
import { vegaDataFile } from '../helpers/open-data.js';

const csv = vegaDataFile('us-employment.csv');
const [head, ...lines] = readFileSync(csv, 'utf8').trim().split('\n');
const columns = head!.split(',');
const rows = lines.map((l) => Object.fromEntries(l.split(',').map((v, i) => [columns[i]!, v])));
const inYear = (year: number) => rows.filter((r) => r.month!.startsWith(String(year)));
const yearSum = (year: number, col: string) => inYear(year).reduce((a, r) => a + Number(r[col]), 0);
const yearMean = (year: number, col: string) => yearSum(year, col) / inYear(year).length;
const thousands = (v: number, signed = false) => `${signed && v > 0 ? '+' : ''}${Math.round(v).toLocaleString('en').replace('-', '\u2212')}\u00a0thousand`;

const json = vegaDataFile('unemployment-across-industries.json');
const industryRows = JSON.parse(readFileSync(json, 'utf8')) as { series: string; date: string; count: number; rate: number }[];
/** The mean over a year's months of a column, optionally for one industry; for all of them, each month's total first. */
function industryYear(year: number, column: 'count' | 'rate', series?: string): number {
  const months = new Map<string, number>();
  for (const r of industryRows) if (r.date.startsWith(String(year)) && (!series || r.series === series)) months.set(r.date.slice(0, 7), (months.get(r.date.slice(0, 7)) ?? 0) + r[column]);
  return [...months.values()].reduce((a, b) => a + b, 0) / months.size;
}

let dir = '';
async function unemploymentPosts(request: string): Promise<string[]> {
  const config = join(dir, 'unemployment.yaml');
  // Unemployed people are a headcount held at each date: a sum across industries, a level over time.
  writeFileSync(config, `version: 1
datasets:
  - name: unemployment
    label: Unemployment by industry
    source: { kind: json, paths: ["${json}"] }
    time_column: date
    timezone: UTC
    metrics:
      - { name: unemployed, label: Unemployed, also_called: [unemployed people, people out of work], sum: count, unit: number, unit_label: thousand, kind: level, higher_is_better: false }
      - { name: rate, label: Unemployment rate, also_called: [jobless rate], average: rate / 100, decimals: 1, unit: percent, kind: level, higher_is_better: false }
    dimensions:
      - { name: industry, label: Industry, also_called: [industries], column: series }
`);
  return postsFor(config, request);
}

async function postsFor(config: string, request: string): Promise<string[]> {
  const out = mkdtempSync(join(dir, 'out-'));
  const r = await runCli(['ask', '--config', config, '--request', request, '--out', out]);
  expect(r.code, r.err).toBe(0);
  return (JSON.parse(readFileSync(join(out, 'thread.json'), 'utf8')) as { posts: { text: string }[] }).posts.map((p) => p.text);
}

async function postsOf(request: string): Promise<string[]> {
  const config = join(dir, 'usemp.yaml');
  // The labels and other names a newcomer gave it: "Jobs added" is the month's net change.
  writeFileSync(config, `version: 1
datasets:
  - name: us_employment
    label: US employment
    source: { kind: csv, paths: ["${csv}"] }
    time_column: month
    timezone: UTC
    metrics:
      - { name: nonfarm, label: Nonfarm employment, also_called: [payrolls, jobs, employment], average: nonfarm, unit: number, unit_label: thousand, kind: level }
      - { name: nonfarm_change, label: Jobs added, also_called: [net jobs added, job gains], sum: nonfarm_change, unit: number, unit_label: thousand, kind: flow }
    dimensions: []
`);
  return postsFor(config, request);
}

let added: string[] = [];
let level: string[] = [];
let between: string[] = [];
let total: string[] = [];
let first: string[] = [];
beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'tc-named-periods-'));
  added = await postsOf('How many jobs were added in 2009 vs 2008?');
  level = await postsOf('payrolls 2009 vs 2008?');
  between = await unemploymentPosts("Hi team, hope you're well! Could you pull together how the jobless rate in Finance compared between 2008 and 2009 for the leadership deck? Thanks so much");
  total = await unemploymentPosts('how many people were unemployed in total in 2009?');
  // The data's first year: the year before it is not in the data.
  first = await unemploymentPosts('how many people were unemployed in total in 2000?');
}, 600_000);

describe('two named periods with no breakdown', () => {
  it('reads "jobs were added" as the jobs-added measure and leads with 2009 against 2008, as totals', () => {
    // From the CSV: sum(nonfarm_change) is −5,061 thousand in 2009 and −3,569 thousand in 2008.
    expect(Math.round(yearSum(2009, 'nonfarm_change'))).toBe(-5061);
    const text = added.join('\n---\n');
    expect(text).toContain('(from "jobs were added")');
    const first = added.find((p) => /^\*1\. /.test(p));
    expect(first, text).toBeDefined();
    expect(first).toContain(`Jobs added: ${thousands(yearSum(2009, 'nonfarm_change'))} in 2009 against ${thousands(yearSum(2008, 'nonfarm_change'))} in 2008`);
    expect(first).toContain(`a change of ${thousands(yearSum(2009, 'nonfarm_change') - yearSum(2008, 'nonfarm_change'), true)}`);
    expect(first).toContain("the period's total");
  });

  it('never answers with the data\'s last two years instead', () => {
    // The data runs to December 2015; no growth answer of the request names 2014 or 2015.
    expect(rows.at(-1)!.month).toMatch(/^2015-12/);
    for (const posts of [added, level]) {
      const answers = posts.filter((p) => /^\*\d+\. /.test(p));
      expect(answers.length).toBeGreaterThan(1);
      for (const a of answers) expect(a, a).not.toMatch(/\b201[45]\b/);
    }
  });

  it('gives a level as each year\'s mean reading, with the change in its units and in percent', () => {
    // From the CSV: mean nonfarm 131,301 thousand in 2009 against 137,241 thousand in 2008 (−4.3%).
    const [a, b] = [yearMean(2009, 'nonfarm'), yearMean(2008, 'nonfarm')];
    const first = level.find((p) => /^\*1\. /.test(p))!;
    expect(first, level.join('\n---\n')).toContain(`Nonfarm employment: ${thousands(a)} in 2009 against ${thousands(b)} in 2008`);
    expect(first).toContain(`fell ${Math.abs((a / b - 1) * 100).toFixed(1)}% from 2008 to 2009`);
    // The change as printed, within its rounding (the means differ by about 5,939.6 thousand).
    const change = /\(\u2212([\d,]+)\u00a0thousand\)/.exec(first)?.[1];
    expect(change, first).toBeDefined();
    expect(Math.abs(Number(change!.replaceAll(',', '')) - (b - a))).toBeLessThanOrEqual(0.5 + 1e-9);
    expect(first).toContain('average reading');
  });
});

describe('"compared between 2008 and 2009"', () => {
  it('sets the two years against each other, for the one industry named, and leads with them', () => {
    // From the JSON: Finance's mean monthly rate was 3.95% in 2008 and 6.40% in 2009 (+2.45 pts).
    const [a, b] = [industryYear(2009, 'rate', 'Finance'), industryYear(2008, 'rate', 'Finance')];
    expect(b.toFixed(2)).toBe('3.95');
    const text = between.join('\n---\n');
    expect(text).toContain('*Period:* January 2009 to December 2009 against January 2008 to December 2008');
    expect(text).toContain('*Audience:* Leadership');
    const first = between.find((p) => /^\*1\. /.test(p))!;
    expect(first, text).toContain(`Unemployment rate: ${a.toFixed(1)}% in 2009 against ${b.toFixed(1)}% in 2008`);
    expect(first).toContain(`rose ${(a - b).toFixed(1)} pts from 2008 to 2009`);
    expect(first).toContain('Finance');
  });
});

describe('"in total in 2009"', () => {
  it('gives the year\'s figure, the mean of its monthly totals, not December\'s', () => {
    // From the JSON: the months of 2009 total 13,230 thousand on average; December alone is 13,695 thousand.
    const year = industryYear(2009, 'count');
    expect(Math.round(year)).toBe(13230);
    const first = total.find((p) => /^\*1\. /.test(p))!;
    expect(first, total.join('\n---\n')).toContain(`Unemployed: ${thousands(year)} in 2009 against ${thousands(industryYear(2008, 'count'))} in 2008`);
    expect(first).toContain('average over the period of the total at each date');
    expect(first).not.toMatch(/December/);
    // Listed under the question it answers, a KPI, not under a growth heading the request never asked.
    const card = total.find((p) => p.startsWith('*Here is what I understood.*'))!;
    expect(card).toMatch(/\*KPI snapshot\*\n1\. Unemployed, January 2009 to December 2009 against January 2008 to December 2008/);
    expect(card).not.toContain('*Growth*');
  });

  it('on the data\'s first year, the plan says the year before is not in the data, and the answer says it once', () => {
    const card = first.find((p) => p.startsWith('*Here is what I understood.*'))!;
    expect(card).toContain('1. Unemployed, January 2000 to December 2000: its figure (January 1999 to December 1999, to compare with, is before the data starts).');
    const answer = first.find((p) => /^\*1\. /.test(p))!;
    expect(answer).toContain(`Unemployed was ${thousands(industryYear(2000, 'count'))} in 2000; 1999 has no figure to compare with.`);
    expect(answer).not.toContain('_Note: There is no data');
  });
});
