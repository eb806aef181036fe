// Group comparisons on open data (issue 16; newcomer trial 4, faults 8 and 9): vega-datasets'
// unemployment-across-industries.json (US Bureau of Labor Statistics, unemployed persons by
// industry, monthly, 2000 to February 2010). One row is an industry's month, no thing a manager
// can picture, so a sum is compared per industry per day, not per row; and "did these industries
// grow faster?" is answered with each group's own growth, in total and like for like.
//
// The file is copied to a CSV with one change, said here: Mining and Extraction's rows before July
// 2008 are left out, so the others' group holds a unit that is new in the earlier year (as a shop
// that opened mid-year would be). Every expected figure is reduced by the test's own SQL over that CSV.
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { PerformanceGroupFinding, PerformanceGroupGrowthFinding } from '../../../analysis/findings/performance.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { Answer, Finding, SubQuestion } from '../../../analysis/types.js';
import { datasetFacts, openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { briefDefaults, withDefaults } from '../../../bot/brief-defaults.js';
import { buildPlan } from '../../../bot/plan.js';
import { presentContext } from '../../../bot/present-answer.js';
import { readRequest } from '../../../bot/reading/read-request.js';
import { loadConfig } from '../../../config/load.js';
import { vegaDataFile } from '../../helpers/open-data.js';

const MEMBERS = ['Construction', 'Manufacturing', 'Finance'];
const NEW_UNIT = 'Mining and Extraction';
const NEW_FROM = '2008-07-01';

const find = <T extends Finding['type']>(a: Answer, type: T) => a.findings.filter((f) => f.type === type) as Extract<Finding, { type: T }>[];

let dir: string;
let ws: Workspace;
let truth: (sql: string) => Promise<Record<string, unknown>[]>;
let close: () => void;

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'tc-group-growth-'));
  const csv = join(dir, 'industries.csv');
  const inst = await DuckDBInstance.create(':memory:');
  const con = await inst.connect();
  await con.run(`COPY (
    SELECT series AS industry, CAST(CAST(date AS TIMESTAMP) AS DATE) AS month_start, count AS unemployed
    FROM read_json_auto('${vegaDataFile('unemployment-across-industries.json')}')
    WHERE NOT (series = '${NEW_UNIT}' AND CAST(CAST(date AS TIMESTAMP) AS DATE) < DATE '${NEW_FROM}')
  ) TO '${csv}' (HEADER)`);
  await con.run(`CREATE VIEW t AS SELECT * FROM read_csv_auto('${csv}')`);
  truth = async (sql) => (await con.runAndReadAll(sql)).getRowObjects() as Record<string, unknown>[];
  close = () => {
    con.closeSync();
    inst.closeSync();
  };
  await writeFile(
    join(dir, 'config.yaml'),
    `version: 1
datasets:
  - name: industries
    label: Unemployment by industry
    source: { kind: csv, paths: [${csv}] }
    time_column: month_start
    timezone: UTC
    metrics:
      - { name: unemployed, label: Unemployed, sum: unemployed, unit: count, higher_is_better: false }
    dimensions:
      - { name: industry, label: Industry, column: industry }
    comparison_groups:
      - name: cyclical
        label: Cyclical industries
        also_called: [cyclical industries]
        when: { column: industry, one_of: [${MEMBERS.join(', ')}] }
        members_label: Cyclical industries
        others_label: Other industries
`,
  );
  ws = await openWorkspace(loadConfig(join(dir, 'config.yaml')));
}, 120_000);

afterAll(async () => {
  await ws?.source.close();
  close?.();
  if (dir) await rm(dir, { recursive: true, force: true });
});

const question = (template: 'performance_growth' | 'performance_compare', window: { start: string; end: string }): SubQuestion => ({
  id: template,
  kind: 'performance',
  lens: 'summary',
  template,
  metrics: ['unemployed'],
  grain: 'month',
  window,
  filters: [],
  comparisonGroup: 'cyclical',
});

const inList = MEMBERS.map((m) => `'${m}'`).join(', ');

describe('a group of industries: its own growth, in total and like for like', () => {
  it('2009 against 2008: each group adds up its industries; the industry new in 2008 is out of the like-for-like base only', async () => {
    const a = await answerSubQuestion(question('performance_growth', { start: '2009-01-01', end: '2010-01-01' }), ws);
    const f = find(a, 'performance_group_growth')[0] as PerformanceGroupGrowthFinding;
    expect(f).toBeDefined();
    expect(f.unit).toBe('industry');
    expect([f.current, f.prior]).toEqual([
      { start: '2009-01-01', end: '2010-01-01' },
      { start: '2008-01-01', end: '2009-01-01' },
    ]);
    const [row] = await truth(`SELECT
      SUM(unemployed) FILTER (year(month_start) = 2009 AND industry IN (${inList})) AS m_after,
      SUM(unemployed) FILTER (year(month_start) = 2008 AND industry IN (${inList})) AS m_before,
      SUM(unemployed) FILTER (year(month_start) = 2009 AND industry NOT IN (${inList})) AS o_after,
      SUM(unemployed) FILTER (year(month_start) = 2008 AND industry NOT IN (${inList})) AS o_before,
      SUM(unemployed) FILTER (year(month_start) = 2009 AND industry NOT IN (${inList}) AND industry <> '${NEW_UNIT}') AS l_after,
      SUM(unemployed) FILTER (year(month_start) = 2008 AND industry NOT IN (${inList}) AND industry <> '${NEW_UNIT}') AS l_before
      FROM t`);
    const n = (k: string) => Number(row![k]);
    const members = f.groups.find((g) => g.group === 'members')!;
    const others = f.groups.find((g) => g.group === 'others')!;
    expect(members.total.relative).toBeCloseTo(n('m_after') / n('m_before') - 1, 12);
    // No cyclical industry is new: like for like is the total.
    expect(members.likeForLike!.relative).toBeCloseTo(members.total.relative!, 12);
    expect(members.changed).toEqual([]);
    expect(others.total.relative).toBeCloseTo(n('o_after') / n('o_before') - 1, 12);
    expect(others.likeForLike!.relative).toBeCloseTo(n('l_after') / n('l_before') - 1, 12);
    expect(others.likeForLike!.units).toBe(10);
    expect(others.changed.map((c) => [c.segment, c.opened, c.firstDay])).toEqual([[NEW_UNIT, true, NEW_FROM]]);
    // The new industry (half a year in the base, a whole year after) sets the two apart.
    expect(Math.abs(others.total.relative! - others.likeForLike!.relative!)).toBeGreaterThan(0.005);

    const p = SUB_QUESTIONS.performance_growth.present(a, presentContext(ws, 'managers'));
    expect(p.caption).toContain(NEW_UNIT);
    expect(p.caption).toMatch(/like-for-like growth/);
    expect(p.title).toMatch(/^Cyclical industries grew (faster than|more slowly than|at the same rate as) other industries/);
    expect(p.chart?.kind).toBe('group_compare');
  });

  it('"did the cyclical industries grow faster?" is planned as their growth first, not as a level', () => {
    const facts = datasetFacts(ws);
    const b = readRequest('Did the cyclical industries grow unemployed faster than the other industries in 2009?', facts, { now: new Date('2026-12-05T01:00:00Z'), locale: 'en-IE' });
    const plan = buildPlan(withDefaults(b, briefDefaults(b, facts.dataset, facts.coverage)), facts.dataset, facts.coverage);
    expect(plan.items[0]).toMatchObject({ template: 'performance_growth', comparisonGroup: 'cyclical', window: { start: '2009-01-01', end: '2010-01-01' } });
    expect(plan.items.map((i) => i.template)).toContain('performance_compare');
  });
});

describe('a sum over rows that are no thing of their own: compared per industry per day', () => {
  it('each industry counts once at its unemployed per day over 2009, never per row', async () => {
    const a = await answerSubQuestion(question('performance_compare', { start: '2009-01-01', end: '2010-01-01' }), ws);
    const groups = find(a, 'performance_group') as PerformanceGroupFinding[];
    const rows = await truth(`SELECT industry IN (${inList}) AS member, AVG(total / 365.0) AS per_day, COUNT(*) AS industries
      FROM (SELECT industry, SUM(unemployed) AS total FROM t WHERE year(month_start) = 2009 GROUP BY 1) GROUP BY 1`);
    for (const g of groups) {
      const r = rows.find((x) => x.member === (g.group === 'members'))!;
      expect(g.quantity).toBe('per_unit_day');
      expect(g.unit).toBe('industry');
      expect(g.n).toBe(Number(r.industries));
      expect(g.estimate).toBeCloseTo(Number(r.per_day), 9);
    }
    const p = SUB_QUESTIONS.performance_compare.present(a, presentContext(ws, 'managers'));
    expect(p.title).toMatch(/per industry per day/);
    expect(`${p.title} ${p.caption}`).not.toMatch(/per row/);
  });
});
