// One ranking rule on a panel: segments are ranked by the metric's own value, never by their rows.
// Checked on vega-datasets' unemployment-across-industries.json (open data: US BLS monthly
// unemployed counts, in thousands, and unemployment rates, in percent, for 14 industries,
// January 2000 to February 2010), where every industry has one row a month, so a ranking by rows
// ties everywhere and fell back to names. The expected orders and values come from DuckDB SQL
// written in this file over the raw JSON, never from the project's SQL.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import { caveatNote } from '../../../analysis/captions/caveat-text.js';
import type { KpiBySegmentFinding } from '../../../analysis/findings/kpi.js';
import type { SegmentSharesFinding, SegmentTrendFinding } from '../../../analysis/findings/segments.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { parseConfigText } from '../../../config/load.js';
import { vegaDataFile } from '../../helpers/open-data.js';

const FILE = vegaDataFile('unemployment-across-industries.json');
const RAW = `read_json('${FILE.replaceAll("'", "''")}')`;
const dir = mkdtempSync(join(tmpdir(), 'tc-panel-rank-'));

// The catalog a newcomer would write (newcomer report 5): the rate as an average of the rows and
// as a ratio of totals (labour force recovered from each row as count / (rate / 100)), the number
// unemployed as an average per row, as a sum, and as a monthly average of the total.
const config = () =>
  parseConfigText(
    `
version: 1
datasets:
  - name: unemployment
    label: Unemployment by industry
    source: { kind: json, paths: [${JSON.stringify(FILE)}] }
    time_column: date
    timezone: UTC
    metrics:
      - name: rate
        label: Unemployment rate
        average: rate / 100
        unit: percent
        decimals: 1
        higher_is_better: false
        kind: level
      - name: unemployed_total
        label: Unemployed person-months
        sum: count
        unit: number
        kind: flow
      - name: labour_force
        label: Labour force
        sum: "count / (rate / 100)"
        unit: number
        kind: flow
      - name: rate_of_totals
        label: Unemployment rate of totals
        ratio: {of: unemployed_total, per: labour_force}
        unit: percent
        decimals: 1
        higher_is_better: false
      - name: months
        label: Months of data
        count_distinct: date
        unit: count
      - name: unemployed_monthly
        label: Unemployed
        ratio: {of: unemployed_total, per: months}
        unit: number
        unit_label: thousand
        higher_is_better: false
        kind: level
      - name: unemployed_per_row
        label: Unemployed per industry
        average: count
        unit: number
        unit_label: thousand
        higher_is_better: false
        kind: level
    dimensions:
      - name: series
        label: Industry
        also_called: [industries]
        column: series
`,
    join(dir, 'unemployment.yaml'),
  );

let reference: Awaited<ReturnType<DuckDBInstance['connect']>>;
let refInstance: DuckDBInstance;
let ws: Workspace;
async function truth(sql: string): Promise<{ series: string; v: number }[]> {
  const rows = (await reference.runAndReadAll(sql)).getRowObjectsJson() as Record<string, unknown>[];
  return rows.map((r) => ({ series: String(r.series), v: Number(r.v) }));
}

beforeAll(async () => {
  refInstance = await DuckDBInstance.create(':memory:');
  reference = await refInstance.connect();
  ws = await openWorkspace(config());
});
afterAll(async () => {
  await ws?.source.close();
  reference?.closeSync();
  refInstance?.closeSync();
  rmSync(dir, { recursive: true, force: true });
});

const Y2009 = { start: '2009-01-01', end: '2010-01-01' };
const question = (template: SubQuestion['template'], metric: string, extra: Partial<SubQuestion> = {}): SubQuestion => ({
  id: 'p',
  kind: 'trend',
  lens: 'distribution',
  template,
  metrics: [metric],
  dimension: 'series',
  grain: 'month',
  window: Y2009,
  filters: [],
  ...extra,
});
const present = async (sq: SubQuestion) => {
  const answer = await answerSubQuestion(sq, ws);
  const shown = SUB_QUESTIONS[sq.template].present(answer, { dataset: ws.dataset, locale: 'en-GB', audience: 'managers', chart: { width: 1200, height: 675, scale: 1 }, dataAsOf: ws.coverage.lastDate });
  return { answer, shown };
};

describe('rankings by value on a panel of industries (unemployment-across-industries.json)', () => {
  it('"top 5 industries by unemployment rate in 2009": the five highest mean rates, not the first five names', async () => {
    const want = await truth(`SELECT series, AVG(rate) AS v FROM ${RAW} WHERE year(CAST(date AS TIMESTAMP)) = 2009 GROUP BY 1 ORDER BY 2 DESC, 1`);
    // The newcomer's check (report 5, A1): Construction 19.05, Agriculture 14.39, Manufacturing 12.08, Leisure 11.68, Mining 11.66.
    expect(want.slice(0, 5).map((w) => `${w.series} ${w.v.toFixed(2)}`)).toEqual([
      'Construction 19.05',
      'Agriculture 14.39',
      'Manufacturing 12.08',
      'Leisure and hospitality 11.68',
      'Mining and Extraction 11.66',
    ]);
    const { answer, shown } = await present(question('segment_shares', 'rate', { rankLimit: 5 }));
    const f = answer.findings.find((x): x is SegmentSharesFinding => x.type === 'segment_shares')!;
    const named = f.rows.filter((r) => !r.other);
    expect(named.map((r) => r.segment)).toEqual(want.slice(0, 5).map((w) => w.series));
    for (const [i, r] of named.entries()) expect(r.value! * 100).toBeCloseTo(want[i]!.v, 9);
    // Every industry has 12 rows in 2009: none is too thin to rank, and the fold holds lower rates.
    const folded = answer.caveats.filter((c) => c.code === 'segments_folded');
    expect(folded).toEqual([{ code: 'segments_folded', data: { count: 9, dimension: 'series', folded: 'lower' } }]);
    expect(caveatNote(folded[0]!, 'en-GB')).toBe('9 more segments with lower values than those named are combined as "All others".');
    // The caption lists them in that order, each within its one-decimal rounding (19.05 sits on a half).
    const listed = [.../By industry: ([^.]*(?:\.\d[^.]*)*)\./.exec(shown.caption)![1]!.matchAll(/([A-Za-z ]+?) (\d+\.\d)%/g)].map((m) => ({ series: m[1]!.trim(), v: Number(m[2]) }));
    expect(listed.map((l) => l.series)).toEqual(want.slice(0, 5).map((w) => w.series));
    for (const [i, l] of listed.entries()) expect(Math.abs(l.v - want[i]!.v)).toBeLessThanOrEqual(0.05 + 1e-9);
    // The reason shares do not apply is said as the config's choice, with no sum to offer for a percent.
    expect(shown.caption).toContain('unemployment rate is set up in the config as an average per row, not as a total that splits across industries.');
  });

  it('the same ranking over the rate as a ratio of totals (labour-force weighted) has the same five', async () => {
    const want = await truth(`SELECT series, 100 * SUM(count) / SUM(count / (rate / 100)) AS v FROM ${RAW} WHERE year(CAST(date AS TIMESTAMP)) = 2009 GROUP BY 1 ORDER BY 2 DESC, 1`);
    const { answer } = await present(question('segment_shares', 'rate_of_totals', { rankLimit: 5 }));
    const named = answer.findings.find((x): x is SegmentSharesFinding => x.type === 'segment_shares')!.rows.filter((r) => !r.other);
    expect(named.map((r) => r.segment)).toEqual(want.slice(0, 5).map((w) => w.series));
    expect(named.map((r) => r.segment)).toEqual(['Construction', 'Agriculture', 'Manufacturing', 'Leisure and hospitality', 'Mining and Extraction']);
    for (const [i, r] of named.entries()) expect(r.value! * 100).toBeCloseTo(want[i]!.v, 9);
  });

  it('"top 3 industries by unemployed in 2009": the monthly average count ranks Manufacturing, Wholesale and Retail Trade, Construction', async () => {
    const want = await truth(`SELECT series, AVG(count) AS v FROM ${RAW} WHERE year(CAST(date AS TIMESTAMP)) = 2009 GROUP BY 1 ORDER BY 2 DESC, 1`);
    // The newcomer's check (report 5, t31): 1,890k, 1,844k and 1,770k.
    expect(want.slice(0, 3).map((w) => `${w.series} ${Math.round(w.v)}`)).toEqual(['Manufacturing 1890', 'Wholesale and Retail Trade 1844', 'Construction 1770']);
    for (const metric of ['unemployed_monthly', 'unemployed_per_row']) {
      const { answer, shown } = await present(question('segment_shares', metric, { rankLimit: 3 }));
      const named = answer.findings.find((x): x is SegmentSharesFinding => x.type === 'segment_shares')!.rows.filter((r) => !r.other);
      expect(named.map((r) => r.segment)).toEqual(want.slice(0, 3).map((w) => w.series));
      for (const [i, r] of named.entries()) expect(r.value).toBeCloseTo(want[i]!.v, 9);
      if (metric === 'unemployed_per_row') {
        // The config's own sum of the column is named as the total that would split.
        expect(shown.caption).toContain('set up in the config as an average per row, not as a total that splits across industries (Unemployed person-months, set up as sum: count, would).');
      } else {
        expect(shown.caption).toContain('set up in the config as a ratio (unemployed person-months per months of data), not as a total that splits across industries.');
      }
    }
  });

  it('a breakdown over time with no number asked names the 8 highest rates, and "lowest" ranks from the bottom', async () => {
    const want = await truth(`SELECT series, AVG(rate) AS v FROM ${RAW} WHERE year(CAST(date AS TIMESTAMP)) = 2009 GROUP BY 1 ORDER BY 2 DESC, 1`);
    const { answer, shown } = await present(question('segment_trend', 'rate', { lens: 'breakdown' }));
    const named = answer.findings.filter((x): x is SegmentTrendFinding => x.type === 'segment_trend' && !x.other);
    expect(named.map((t) => t.segment)).toEqual(want.slice(0, 8).map((w) => w.series));
    expect(shown.caption).not.toMatch(/smaller segments/);
    const low = await answerSubQuestion(question('segment_shares', 'rate', { rankLimit: 3, rankOrder: 'lowest' }), ws);
    const lowNamed = low.findings.find((x): x is SegmentSharesFinding => x.type === 'segment_shares')!.rows.filter((r) => !r.other);
    expect(lowNamed.map((r) => r.segment)).toEqual([...want].reverse().slice(0, 3).map((w) => w.series));
    expect(low.caveats).toContainEqual({ code: 'segments_folded', data: { count: 11, dimension: 'series', folded: 'higher' } });
  });

  it('the January 2010 snapshot by industry names the highest rates that month (Manufacturing fourth, Transportation fifth)', async () => {
    const want = await truth(`SELECT series, rate AS v FROM ${RAW} WHERE CAST(date AS TIMESTAMP) >= TIMESTAMP '2010-01-01' AND CAST(date AS TIMESTAMP) < TIMESTAMP '2010-02-01' ORDER BY 2 DESC, 1`);
    expect(want.slice(3, 5).map((w) => `${w.series} ${w.v}`)).toEqual(['Manufacturing 13', 'Transportation and Utilities 11.3']);
    const a = await answerSubQuestion(question('kpi_by_segment', 'rate', { kind: 'kpi', lens: 'breakdown', window: { start: '2010-01-01', end: '2010-02-01' } }), ws);
    const f = a.findings.find((x): x is KpiBySegmentFinding => x.type === 'kpi_by_segment')!;
    expect(f.period).toBe('2010-01-01');
    const named = f.segments.filter((s) => !s.other);
    expect(named.map((s) => s.key)).toEqual(want.slice(0, 8).map((w) => w.series));
    for (const [i, s] of named.entries()) expect(s.value! * 100).toBeCloseTo(want[i]!.v, 9);
    expect(a.caveats).toContainEqual({ code: 'segments_folded', data: { count: 6, folded: 'lower' } });
  });
});
