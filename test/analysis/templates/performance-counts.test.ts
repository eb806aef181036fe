// Counts compared between groups (issue 16, item 3): a count, plain or filtered, is compared per
// calendar day, never as a share of rows; a difference in differences is stated in relative terms
// with an interval from a log-linear model of the four cells, and its verdict follows that
// interval; a named unit (a site) that opens inside the window is left out of both groups and
// named in the caption.
//
// Two kinds of check:
// - the arithmetic against a published worked example: Card and Krueger (1994), "Minimum Wages and
//   Employment: A Case Study of the Fast-Food Industry in New Jersey and Pennsylvania", American
//   Economic Review 84(4), Table 3, mean full-time-equivalent employment per store;
// - whole answers on an invented table of site visits built in the test (a seeded generator), with
//   every expected figure reduced by the test itself from the raw rows, on DuckDB and PostgreSQL.
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import ttest2 from '@stdlib/stats-ttest2';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { PerformanceDidFinding, PerformanceGroupFinding, PerformanceUnitsLeftOutFinding } from '../../../analysis/findings/performance.js';
import { openRunScope } from '../../../analysis/run-scope.js';
import { mulberry32 } from '../../../analysis/stats/random.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import { contrast, logRatioContrast, type MeanCell } from '../../../analysis/templates/performance-stats.js';
import type { Answer, Finding, SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { loadConfig } from '../../../config/load.js';
import { presentContext } from '../../../bot/present-answer.js';
import { captionProblems } from '../../helpers/caption-checks.js';
import { copyDuckDbTableToPostgres, createReaderRole, describeWithPostgres, dropSchema, onPostgres, uniqueName } from '../../helpers/postgres.js';
import { compareAnswers } from '../../helpers/template-cases.js';

const find = <T extends Finding['type']>(a: Answer, type: T) => a.findings.filter((f) => f.type === type) as Extract<Finding, { type: T }>[];

/** A mean cell with the given mean and standard error over n observations. */
function cellOf(mean: number, se: number, n: number): MeanCell {
  // se² = s² / n and m2 = s² (n − 1).
  return { kind: 'mean', n, mean, m2: se * se * n * (n - 1) };
}

describe('difference in differences against Card and Krueger (1994), Table 3', () => {
  // Table 3, rows 1-2 (FTE employment per store, standard errors in parentheses): New Jersey
  // 20.44 (0.51) before, 21.03 (0.52) after; Pennsylvania 23.33 (1.35) before, 21.17 (0.94) after.
  // Row 3 reports the difference in differences as 2.76 (1.36). The means 20.44 and 23.33 and the
  // 2.76 are also printed by public replications (e.g. kelunwang.com/posts/hw2, a replication of
  // Table 2; austin-li7.github.io's replication of Table 3); the standard errors and the store
  // counts (NJ 321, PA 78, the paper's wave 1 sample) are recalled from memory.
  const nj = { before: cellOf(20.44, 0.51, 321), after: cellOf(21.03, 0.52, 321) };
  const pa = { before: cellOf(23.33, 1.35, 78), after: cellOf(21.17, 0.94, 78) };
  const terms = [
    { cell: nj.after, weight: 1 },
    { cell: nj.before, weight: -1 },
    { cell: pa.after, weight: -1 },
    { cell: pa.before, weight: 1 },
  ];

  it('gives the published estimate from the four cell means', () => {
    const did = contrast(terms, 0.95)!;
    // 2.76 in the paper, from unrounded means; the rounded means give 2.75 (as the course example
    // at hedibert.org/wp-content/uploads/2025/11/example2-DiD-card-krueger.html prints from the data).
    expect(did.estimate).toBeCloseTo(2.75, 10);
    expect(Math.abs(did.estimate - 2.76)).toBeLessThan(0.015);
  });

  it('treats the cells as independent samples: its standard error is the root sum of the cell variances', () => {
    const did = contrast(terms, 0.95)!;
    const se = did.estimate / did.statistic!;
    expect(se).toBeCloseTo(Math.sqrt(0.51 ** 2 + 0.52 ** 2 + 1.35 ** 2 + 0.94 ** 2), 3);
    // The same course example fits outcome ~ time + treatment + time:treatment by OLS on the store
    // rows (a pooled variance) and prints 2.750 with standard error 1.731: close to ours (1.80),
    // which lets each cell keep its own variance. The paper's 1.36 is smaller because it pairs each
    // store with itself before and after (a balanced sample), which cells of rows cannot.
    expect(Math.abs(se - 1.731) / 1.731).toBeLessThan(0.06);
    expect(se).toBeGreaterThan(1.36);
  });

  it('states the change in relative terms with a log-linear interval whose verdict agrees with it', () => {
    const r = logRatioContrast(terms, 0.95)!;
    // (21.03 / 20.44) / (21.17 / 23.33) − 1, by hand.
    expect(r.estimate).toBeCloseTo(21.03 / 20.44 / (21.17 / 23.33) - 1, 12);
    expect(r.estimate).toBeCloseTo(0.1338, 4);
    const logSe = Math.sqrt((0.51 / 20.44) ** 2 + (0.52 / 21.03) ** 2 + (1.35 / 23.33) ** 2 + (0.94 / 21.17) ** 2);
    expect(r.se).toBeCloseTo(logSe, 12);
    expect(r.ci[0]).toBeCloseTo(Math.exp(Math.log(1 + r.estimate) - 1.959963984540054 * logSe) - 1, 9);
    // Independent cells cannot tell +13% from no change here (the interval holds 0), and the
    // p-value says the same: the verdict follows the interval.
    expect(r.ci[0]).toBeLessThan(0);
    expect(r.ci[1]).toBeGreaterThan(0);
    expect(r.pValue).toBeGreaterThan(0.05);
  });
});

// ---- an invented chain of sites -------------------------------------------------------------------
// Six sites; two (North Quay, Mill Lane) are refitted on 2024-01-01. Each site's visits a day are
// its base times a weekday factor, a season and noise; after the refit the refitted sites' weekday
// visits rise by PLANTED. Harbour Road, one of the others, opens on 2024-03-04, so it would add
// visits to the others' after window only.
const PLANTED = 0.22;
const SITES = [
  { site: 'North Quay', base: 14, refit: true, opens: '2023-01-01' },
  { site: 'Mill Lane', base: 11, refit: true, opens: '2023-01-01' },
  { site: 'Ash Row', base: 13, refit: false, opens: '2023-01-01' },
  { site: 'Brook End', base: 9, refit: false, opens: '2023-01-01' },
  { site: 'Castle Gate', base: 16, refit: false, opens: '2023-01-01' },
  { site: 'Harbour Road', base: 15, refit: false, opens: '2024-03-04' },
];
const START = '2023-01-01';
const END = '2025-01-01';
const LAUNCH = '2024-01-01';

interface Visit {
  visit_id: number;
  visit_day: string;
  site: string;
  refit: boolean;
  weekday: boolean;
}

function generateVisits(): Visit[] {
  const next = mulberry32(20240101);
  const out: Visit[] = [];
  let id = 1;
  for (let t = Date.parse(START); t < Date.parse(END); t += 86_400_000) {
    const day = new Date(t).toISOString().slice(0, 10);
    const dow = new Date(t).getUTCDay();
    const weekday = dow >= 1 && dow <= 5;
    const season = 1 + 0.25 * Math.sin((2 * Math.PI * (new Date(t).getUTCMonth() - 3)) / 12);
    for (const s of SITES) {
      if (day < s.opens) continue;
      const lift = s.refit && day >= LAUNCH && weekday ? 1 + PLANTED : 1;
      const mean = s.base * (weekday ? 1 : 0.6) * season * lift;
      const n = Math.max(0, Math.round(mean * (0.85 + 0.3 * next())));
      for (let i = 0; i < n; i++) out.push({ visit_id: id++, visit_day: day, site: s.site, refit: s.refit, weekday });
    }
  }
  return out;
}

const CONFIG = `version: 1
datasets:
  - name: visits
    label: Site visits
    source: { kind: duckdb, path: visits.duckdb }
    table: visits
    time_column: visit_day
    timezone: UTC
    key_column: visit_id
    metrics:
      - { name: visits, label: Visits, count: rows, unit: count, higher_is_better: true }
      - name: weekday_visits
        label: Weekday visits
        count: rows
        when: { column: weekday, is: true }
        unit: count
        higher_is_better: true
    dimensions:
      - { name: site, column: site, label: Site }
      - { name: day_type, column: weekday, label: Weekday }
    comparison_groups:
      - name: refit
        label: Refit
        column: refit
        members_label: Refitted sites
        others_label: Other sites
        launch_date: "${LAUNCH}"
        unit_column: site
`;

const question = (template: 'performance_before_after' | 'performance_compare' | 'performance_by_segment', metric: string, extra: Partial<SubQuestion> = {}): SubQuestion => ({
  id: `${template}-${metric}`,
  kind: 'performance',
  lens: template === 'performance_before_after' ? 'time_pattern' : template === 'performance_compare' ? 'summary' : 'breakdown',
  template,
  metrics: [metric],
  grain: 'month',
  window: { start: START, end: END },
  filters: [],
  comparisonGroup: 'refit',
  ...extra,
});

let dir: string;
let ws: Workspace;
/** The same table with no unit column on the group: counts are compared per day. */
let noUnits: Workspace;
let visits: Visit[];
beforeAll(async () => {
  visits = generateVisits();
  dir = await mkdtemp(join(tmpdir(), 'tc-counts-'));
  const inst = await DuckDBInstance.create(join(dir, 'visits.duckdb'));
  const con = await inst.connect();
  await con.run('CREATE TABLE visits (visit_id INTEGER, visit_day DATE, site VARCHAR, refit BOOLEAN, weekday BOOLEAN)');
  const app = await con.createAppender('visits');
  for (const v of visits) {
    app.appendInteger(v.visit_id);
    app.appendVarchar(v.visit_day);
    app.appendVarchar(v.site);
    app.appendBoolean(v.refit);
    app.appendBoolean(v.weekday);
    app.endRow();
  }
  app.closeSync();
  con.closeSync();
  inst.closeSync();
  await writeFile(join(dir, 'config.yaml'), CONFIG);
  ws = await openWorkspace(loadConfig(join(dir, 'config.yaml')));
  await writeFile(join(dir, 'config-no-units.yaml'), CONFIG.replace(/\n\s+unit_column: site\n/, '\n'));
  noUnits = await openWorkspace(loadConfig(join(dir, 'config-no-units.yaml')));
}, 120_000);
afterAll(async () => {
  await ws?.source.close();
  await noUnits?.source.close();
  if (dir) await rm(dir, { recursive: true, force: true });
});

/** Weekday visits per calendar day of a group over [from, to), from the raw rows (Harbour Road left out). */
function perDay(refit: boolean, from: string, to: string, weekdayOnly = true): number {
  const n = visits.filter((v) => v.refit === refit && v.site !== 'Harbour Road' && v.visit_day >= from && v.visit_day < to && (!weekdayOnly || v.weekday)).length;
  return n / Math.round((Date.parse(to) - Date.parse(from)) / 86_400_000);
}

describe('a filtered count compared between groups of sites', () => {
  it('before and after the refit: per-site per-day cells, a relative difference in differences near the planted lift, and the late site left out', async () => {
    const a = await answerSubQuestion(question('performance_before_after', 'weekday_visits'), ws);
    const did = find(a, 'performance_did')[0] as PerformanceDidFinding;
    expect(did).toBeDefined();
    // Equal windows of 12 months either side: 2023 against 2024. A group of sites is put per site
    // (its daily total over its sites there throughout: two refitted, three others).
    const sitesOf = (refit: boolean) => SITES.filter((s) => s.refit === refit && s.site !== 'Harbour Road').length;
    expect([sitesOf(true), sitesOf(false)]).toEqual([2, 3]);
    expect(did.membersBefore).toBeCloseTo(perDay(true, '2023-01-01', '2024-01-01') / sitesOf(true), 9);
    expect(did.membersAfter).toBeCloseTo(perDay(true, '2024-01-01', '2025-01-01') / sitesOf(true), 9);
    expect(did.othersBefore).toBeCloseTo(perDay(false, '2023-01-01', '2024-01-01') / sitesOf(false), 9);
    expect(did.othersAfter).toBeCloseTo(perDay(false, '2024-01-01', '2025-01-01') / sitesOf(false), 9);
    const series = find(a, 'performance_group_series');
    expect(series.map((s) => [s.quantity, s.unit])).toEqual([
      ['per_unit_day', 'site'],
      ['per_unit_day', 'site'],
    ]);
    const ratioByHand = did.membersAfter / did.membersBefore / (did.othersAfter / did.othersBefore) - 1;
    expect(did.ratio!.estimate).toBeCloseTo(ratioByHand, 12);
    // Near the planted +22%, and clearly so: the interval leaves 0 out. (It is wide, as days are
    // taken as independent draws and a weekday count is 0 on every weekend day.)
    expect(Math.abs(did.ratio!.estimate - PLANTED)).toBeLessThan(0.03);
    expect(did.ratio!.ci[0]).toBeGreaterThan(0);
    expect(did.ratio!.pValue).toBeLessThan(0.05);
    expect(did.ratio!.ci[0]).toBeLessThan(did.ratio!.estimate);
    expect(did.ratio!.ci[1]).toBeGreaterThan(did.ratio!.estimate);

    const left = find(a, 'performance_units_left_out')[0] as PerformanceUnitsLeftOutFinding;
    expect(left.units).toEqual([{ unit: 'Harbour Road', group: 'others', first: '2024-03-04', last: '2024-12-31' }]);

    for (const audience of ['leadership', 'managers', 'analysts'] as const) {
      const p = SUB_QUESTIONS.performance_before_after.present(a, presentContext(ws, audience));
      if (process.env.TC_PEEK) console.log(audience, '\n', p.title, '\n', p.caption, '\n', p.notes.join('\n'));
      expect(captionProblems(a, p)).toEqual([]);
      expect(p.caption).toContain('Harbour Road');
      expect(p.caption).toMatch(/left out of both groups/);
      expect(p.caption).not.toMatch(/no clear change/);
      if (audience !== 'analysts') expect(p.title).toMatch(/^Weekday visits per site per day: about 2\d% higher for refitted sites after the launch, relative to other sites$/);
    }
  });

  it('the relative estimate is the per-site one: the groups are of fixed sites, so their unequal sizes cancel', async () => {
    // Groups of named units compared as per-day totals (performance_compare compares them per unit):
    // with the late site left out, each group holds the same sites in both windows, so a group's
    // total per day is its per-site rate times a constant, and the ratio of ratios is the per-site one.
    const a = await answerSubQuestion(question('performance_before_after', 'weekday_visits'), ws);
    const did = find(a, 'performance_did')[0] as PerformanceDidFinding;
    const sites = (refit: boolean, from: string, to: string) =>
      new Set(visits.filter((v) => v.refit === refit && v.site !== 'Harbour Road' && v.weekday && v.visit_day >= from && v.visit_day < to).map((v) => v.site));
    const perSite = (refit: boolean, from: string, to: string) => perDay(refit, from, to) / sites(refit, from, to).size;
    for (const refit of [true, false]) expect([...sites(refit, '2023-01-01', '2024-01-01')].sort()).toEqual([...sites(refit, '2024-01-01', '2025-01-01')].sort());
    expect(sites(true, '2023-01-01', '2024-01-01').size).not.toBe(sites(false, '2023-01-01', '2024-01-01').size);
    const perSiteRatio = perSite(true, '2024-01-01', '2025-01-01') / perSite(true, '2023-01-01', '2024-01-01') / (perSite(false, '2024-01-01', '2025-01-01') / perSite(false, '2023-01-01', '2024-01-01')) - 1;
    expect(did.ratio!.estimate).toBeCloseTo(perSiteRatio, 12);
  });

  it('without the late site left out, the others would have grown by its visits: the estimate would be far lower', () => {
    const all = (refit: boolean, from: string, to: string) => visits.filter((v) => v.refit === refit && v.weekday && v.visit_day >= from && v.visit_day < to).length;
    const naive = all(true, '2024-01-01', '2025-01-01') / all(true, '2023-01-01', '2024-01-01') / (all(false, '2024-01-01', '2025-01-01') / all(false, '2023-01-01', '2024-01-01')) - 1;
    expect(naive).toBeLessThan(PLANTED - 0.1);
  });

  it('members against others: weekday visits per site per day (the group is of sites), never a share of rows', async () => {
    const a = await answerSubQuestion(question('performance_compare', 'weekday_visits'), ws);
    const groups = find(a, 'performance_group') as PerformanceGroupFinding[];
    const members = groups.find((g) => g.group === 'members')!;
    const others = groups.find((g) => g.group === 'others')!;
    expect(members.quantity).toBe('per_unit_day');
    expect(members.unit).toBe('site');
    // Each site's weekday visits per calendar day since the launch, from the raw rows (Harbour Road
    // opened late and is left out); the groups are the means over their sites, n the sites.
    const days = 366;
    const rate = (site: string) => visits.filter((v) => v.site === site && v.weekday && v.visit_day >= LAUNCH && v.visit_day < END).length / days;
    const refitted = ['North Quay', 'Mill Lane'].map(rate);
    const rest = ['Ash Row', 'Brook End', 'Castle Gate'].map(rate);
    const mean = (xs: number[]) => xs.reduce((t, x) => t + x, 0) / xs.length;
    expect(members.n).toBe(2);
    expect(others.n).toBe(3);
    expect(members.estimate).toBeCloseTo(mean(refitted), 9);
    expect(others.estimate).toBeCloseTo(mean(rest), 9);
    // Per site, not per group: the refitted pair's visits per day over 2 sites.
    expect(members.estimate).toBeCloseTo(perDay(true, LAUNCH, END) / 2, 9);
    // Welch's t-test over the sites, against @stdlib/stats-ttest2 (a general-purpose reference).
    const d = find(a, 'performance_difference')[0]!;
    const ref = ttest2(refitted, rest);
    expect(d.statistic).toBeCloseTo(ref.statistic, 8);
    expect(d.df!).toBeCloseTo(ref.df, 8);
    expect(d.ci[0]).toBeCloseTo(ref.ci[0]!, 8);
    expect(d.ci[1]).toBeCloseTo(ref.ci[1]!, 8);
    expect(d.pValue).toBeCloseTo(ref.pValue, 8);
    const verdict = find(a, 'performance_verdict')[0]!;
    // A rate per site has the metric's good direction; with two sites against three nothing is clear.
    expect(verdict.higherIsBetter).toBe(true);
    expect(verdict.verdict).toBe(ref.pValue < 0.05 ? (ref.statistic > 0 ? 'better' : 'worse') : 'no_clear_difference');
    const p = SUB_QUESTIONS.performance_compare.present(a, presentContext(ws, 'managers'));
    if (process.env.TC_PEEK) console.log(p.title, '\n', p.caption, '\n', p.notes.join('\n'));
    expect(captionProblems(a, p)).toEqual([]);
    expect(p.title).toMatch(/^Weekday visits per site per day/);
    expect(`${p.title} ${p.caption}`).not.toMatch(/\b1 against 1\b|\b0 higher\b/);
    // n counts sites, and the note says each site is one observation.
    expect(p.caption).toMatch(/over 2 and 3 sites/);
    expect(p.notes.join(' ')).toMatch(/Each site counts once/);
    expect(a.caveats.some((c) => c.code === 'small_sample')).toBe(true);
  });

  it('members against others without named units: weekday visits per day, two volumes with no better or worse', async () => {
    const a = await answerSubQuestion(question('performance_compare', 'weekday_visits'), noUnits);
    const groups = find(a, 'performance_group') as PerformanceGroupFinding[];
    const members = groups.find((g) => g.group === 'members')!;
    const others = groups.find((g) => g.group === 'others')!;
    expect(members.quantity).toBe('per_day');
    // Without a unit dimension Harbour Road stays in (nothing says it is a site).
    const all = (refit: boolean) => visits.filter((v) => v.refit === refit && v.weekday && v.visit_day >= LAUNCH && v.visit_day < END).length / 366;
    expect(members.estimate).toBeCloseTo(all(true), 9);
    expect(others.estimate).toBeCloseTo(all(false), 9);
    expect(members.n).toBe(366);
    const p = SUB_QUESTIONS.performance_compare.present(a, presentContext(noUnits, 'managers'));
    expect(captionProblems(a, p)).toEqual([]);
    expect(p.title).toMatch(/^Weekday visits per day/);
    // n counts days, and two groups' daily volumes are not called better or worse.
    expect(p.caption).toMatch(/over 366 and 366 days/);
    expect(p.caption).not.toMatch(/better|worse/);
    expect(p.caption).toMatch(/daily volumes/);
    // Nor does the stored verdict, which the summary and digest may read: the groups' volumes have
    // no good direction, so a clear gap (25 against 53 visits a day by design) is only a clear gap.
    expect(find(a, 'performance_verdict')[0]).toMatchObject({ verdict: 'clear_difference', direction: 'lower', higherIsBetter: null });
    expect(p.takeaway?.text ?? '').not.toMatch(/better|worse/);
  });

  it('per site: each site side per day matches the raw rows', async () => {
    const a = await answerSubQuestion(question('performance_by_segment', 'weekday_visits', { dimension: 'site' }), ws);
    const segs = find(a, 'performance_segment');
    const ash = segs.find((s) => s.segment === 'Ash Row')!;
    const ashRows = visits.filter((v) => v.site === 'Ash Row' && v.weekday && v.visit_day >= LAUNCH).length;
    expect(ash.others).toBeCloseTo(ashRows / 366, 9);
    expect(segs.some((s) => s.segment === 'Harbour Road')).toBe(false);
    const p = SUB_QUESTIONS.performance_by_segment.present(a, presentContext(ws, 'managers'));
    if (process.env.TC_PEEK) console.log(p.title, '\n', p.caption, '\n', p.notes.join('\n'));
    expect(captionProblems(a, p)).toEqual([]);
  });

  it('by a segment every site has (weekday or not): visits per site per day in each segment, the sites as the sample, as the groups overall', async () => {
    const a = await answerSubQuestion(question('performance_by_segment', 'visits', { dimension: 'day_type' }), ws);
    const groups = find(a, 'performance_group') as PerformanceGroupFinding[];
    expect(groups.map((g) => g.quantity)).toEqual(['per_unit_day', 'per_unit_day']);
    const segs = find(a, 'performance_segment');
    expect(segs).toHaveLength(2);
    const days = 366;
    const mean = (xs: number[]) => xs.reduce((t, x) => t + x, 0) / xs.length;
    // Each site's visits on that kind of day since the launch over the calendar days, averaged over
    // the group's sites (Harbour Road opened late and is left out), from the raw rows.
    const perSite = (sites: string[], weekday: boolean) => mean(sites.map((site) => visits.filter((v) => v.site === site && v.weekday === weekday && v.visit_day >= LAUNCH && v.visit_day < END).length / days));
    for (const s of segs) {
      const weekday = s.segment === 'true';
      expect(s.nMembers).toBe(2);
      expect(s.nOthers).toBe(3);
      expect(s.members!).toBeCloseTo(perSite(['North Quay', 'Mill Lane'], weekday), 9);
      expect(s.others!).toBeCloseTo(perSite(['Ash Row', 'Brook End', 'Castle Gate'], weekday), 9);
    }
    const p = SUB_QUESTIONS.performance_by_segment.present(a, presentContext(ws, 'managers'));
    if (process.env.TC_PEEK) console.log(p.title, '\n', p.caption, '\n', p.notes.join('\n'));
    expect(captionProblems(a, p)).toEqual([]);
    // The chart's subtitle and the headline name the figure compared: per site per day.
    expect(p.title).toMatch(/^Visits per site per day/);
    expect(p.chart?.subtitle).toMatch(/^Visits per site per day, % /);
  });

  it('per site, "top 2": two sites named (the busiest by weekday visits), the rest folded', async () => {
    const a = await answerSubQuestion(question('performance_by_segment', 'weekday_visits', { dimension: 'site', rankLimit: 2 }), ws);
    const segs = find(a, 'performance_segment');
    const named = segs.filter((s) => !s.folded);
    expect(named).toHaveLength(2);
    expect(segs.find((s) => s.folded)?.segmentCount).toBeGreaterThan(0);
  });

  it('reads the same numbers from the run rollup as from the rows', async () => {
    const run = [question('performance_before_after', 'weekday_visits'), question('performance_compare', 'weekday_visits'), question('performance_by_segment', 'weekday_visits', { dimension: 'site' })];
    for (const sq of run) {
      const raw = await answerSubQuestion(sq, ws, { scope: openRunScope([sq], ws, { readTable: true }) });
      const rolled = await answerSubQuestion(sq, ws, { scope: openRunScope(run, ws) });
      expect(rolled.queries.some((q) => !!q.scan)).toBe(true);
      expect(compareAnswers(raw, rolled)).toEqual([]);
    }
  });
});

describeWithPostgres('the same comparisons on PostgreSQL', (adminUrl) => {
  const schema = uniqueName('tc_counts');
  const urlEnv = 'TC_COUNTS_PG_URL';
  let post: Workspace;
  let role: string | undefined;
  beforeAll(async () => {
    await copyDuckDbTableToPostgres({ duckdbPath: join(dir, 'visits.duckdb'), table: 'visits', url: adminUrl, schema });
    const reader = await createReaderRole(adminUrl, schema);
    role = reader.role;
    post = await openWorkspace(onPostgres(loadConfig(join(dir, 'config.yaml')), urlEnv, schema), undefined, { [urlEnv]: reader.url });
  }, 120_000);
  afterAll(async () => {
    await post?.source.close();
    await dropSchema(adminUrl, schema, role ? [role] : []);
  });
  for (const template of ['performance_before_after', 'performance_compare', 'performance_by_segment'] as const) {
    it(`${template} agrees with DuckDB, from the rows and from the rollup`, async () => {
      const sq = question(template, 'weekday_visits', template === 'performance_by_segment' ? { dimension: 'site' } : {});
      const d = await answerSubQuestion(sq, ws);
      const p = await answerSubQuestion(sq, post);
      expect(compareAnswers(d, p)).toEqual([]);
      const run = [question('performance_before_after', 'weekday_visits'), question('performance_compare', 'weekday_visits'), question('performance_by_segment', 'weekday_visits', { dimension: 'site' })];
      const rolled = await answerSubQuestion(sq, post, { scope: openRunScope(run, post) });
      expect(rolled.queries.some((q) => !!q.scan)).toBe(true);
      expect(compareAnswers(d, rolled)).toEqual([]);
    }, 60_000);
  }
});
