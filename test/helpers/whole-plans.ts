// Whole plans on real data, for tests that hold every answer of a plan to a rule: the demo and the
// two fixture datasets of other trades, each asked a request of every kind at several grains and
// periods (the whole history, one calendar year that runs past the data's end, the last 12 months),
// planned by bot/plan.ts, answered on the real engine and presented for every audience.
import { fileURLToPath } from 'node:url';
import { answerSubQuestion } from '../../analysis/answer-sub-question.js';
import { firstBreakdownDimension, isAdditive, plainCountMetric } from '../../analysis/catalog.js';
import { addDays, addMonths, periodStart } from '../../analysis/periods.js';
import type { Presented } from '../../analysis/present/presenter.js';
import { SUB_QUESTIONS } from '../../analysis/sub-questions/registry.js';
import type { Answer, Audience, DateWindow, Grain, RequestKind } from '../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../analysis/workspace.js';
import type { Brief, Question } from '../../bot/brief.js';
import { buildPlan, type Plan } from '../../bot/plan.js';
import { presentContext } from '../../bot/present-answer.js';
import { loadConfig } from '../../config/load.js';
import { demoFixture } from './demo-fixture.js';

const fixture = (path: string) => fileURLToPath(new URL(`../fixtures/datasets/${path}`, import.meta.url));

export interface NamedWorkspace {
  name: string;
  ws: Workspace;
}

/** The demo and the two fixture datasets, opened; close them with `closeWorkspaces`. */
export async function openPlanWorkspaces(): Promise<NamedWorkspace[]> {
  const demo = await demoFixture();
  const out: NamedWorkspace[] = [];
  for (const [name, path] of [
    ['Skerrywake demo', demo.configPath],
    ['support desk', fixture('support-desk/ledgerlark.yaml')],
    ['subscription app', fixture('subscription-app/chatterwren.yaml')],
  ] as const) {
    out.push({ name, ws: await openWorkspace(loadConfig(path)) });
  }
  return out;
}

export async function closeWorkspaces(spaces: NamedWorkspace[]): Promise<void> {
  for (const s of spaces) await s.ws.source.close();
}

export interface PlanCase {
  label: string;
  brief: Brief;
}

/** A question of one kind as the reader leaves it (built by hand, so the test needs no reader). */
function question(kind: RequestKind, metrics: string[], dimensions: string[], comparisonGroup?: string): Question {
  const q = { text: `a ${kind} question`, kind, metrics, dimensions, frequency: false, filters: [], ...(comparisonGroup ? { comparisonGroup } : {}) };
  return q as Question;
}

/**
 * Requests of every kind, each at a monthly and a quarterly grain, over the whole history, over
 * the last calendar year the data reaches (it ends part-way through it), and over the last 12 full
 * months. A flow metric and a ratio or average, each with the first breakdown.
 */
export function planCases(ws: Workspace): PlanCase[] {
  const ds = ws.dataset;
  const flow = ds.metrics.find((m) => isAdditive(m)) ?? ds.metrics[0]!;
  const other = ds.metrics.find((m) => !isAdditive(m) && m.definition.type !== 'distinct_count');
  const count = plainCountMetric(ds) ?? flow;
  const dim = firstBreakdownDimension(ds);
  const group = ds.comparison_groups[0]?.name;
  const first = ws.coverage.firstDate!;
  const last = ws.coverage.lastDate!;
  const end = addDays(last, 1);
  const all: DateWindow = { start: first, end };
  const lastYear: DateWindow = { start: `${last.slice(0, 4)}-01-01`, end: `${Number(last.slice(0, 4)) + 1}-01-01` };
  const monthEnd = periodStart(end, 'month');
  const last12: DateWindow = { start: addMonths(monthEnd, -12), end: monthEnd };
  const cases: PlanCase[] = [];
  const windows: [string, DateWindow][] = [['all', all], ['calendar year past the data', lastYear], ['last 12 months', last12]];
  const grains: Grain[] = ['month', 'quarter'];
  const kinds: [RequestKind, string[], string[], string?][] = [
    ['trend', [flow.name, ...(other ? [other.name] : [])], dim ? [dim] : []],
    ['growth', [flow.name], dim ? [dim] : []],
    ['kpi', [flow.name, ...(other ? [other.name] : [])], dim ? [dim] : []],
    ...(group ? ([['performance', [count.name], dim ? [dim] : [], group]] as [RequestKind, string[], string[], string][]) : []),
  ];
  for (const [kind, metrics, dims, g] of kinds) {
    for (const grain of grains) {
      for (const [wName, window] of windows) {
        const q = question(kind, metrics, dims, g);
        const brief: Brief = {
          requestText: `${kind} of ${metrics.join(' and ')} by ${dims.join(', ') || 'nothing'}, ${grain}ly, ${wName}`,
          questions: [q],
          kinds: [kind],
          metrics,
          dimensions: dims,
          unknownTerms: [],
          window,
          grain,
          audience: 'managers',
          ...(g ? { comparisonGroup: g } : {}),
        };
        cases.push({ label: brief.requestText, brief });
      }
    }
  }
  return cases;
}

export interface PlannedAnswer {
  caseLabel: string;
  plan: Plan;
  answer: Answer;
  /** One presentation per audience. */
  presented: Record<Audience, Presented>;
}

const AUDIENCES: Audience[] = ['leadership', 'managers', 'analysts'];

/**
 * Every item of every case's plan, answered once (the same sub-question asked by two cases is
 * answered once) and presented for every audience.
 */
export async function answerPlans(ws: Workspace, cases: PlanCase[] = planCases(ws)): Promise<PlannedAnswer[]> {
  const out: PlannedAnswer[] = [];
  const answered = new Map<string, Answer>();
  for (const c of cases) {
    const plan = buildPlan(c.brief, ws.dataset, ws.coverage);
    for (const sq of plan.items) {
      const key = JSON.stringify({ ...sq, id: '' });
      let answer = answered.get(key);
      if (!answer) {
        answer = await answerSubQuestion(sq, ws);
        answered.set(key, answer);
      }
      const presented = Object.fromEntries(
        AUDIENCES.map((a) => [a, SUB_QUESTIONS[sq.template].present(answer!, presentContext(ws, a))]),
      ) as Record<Audience, Presented>;
      out.push({ caseLabel: c.label, plan, answer, presented });
    }
  }
  return out;
}
