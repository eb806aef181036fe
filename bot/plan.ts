// From a complete brief to a plan of sub-questions (each request kind through its lenses),
// shaped by the audience and capped in size, and the plan edits a requester can type.
import type { ComparisonGroup, DatasetConfig } from '../config/schema.js';
import { firstBreakdownDimension, isAdditive, isBreakdownDimension, metricByName, plainCountMetric } from '../analysis/catalog.js';
import type { Coverage } from '../analysis/coverage.js';
import { SUB_QUESTIONS, type TemplateName } from '../analysis/sub-questions/registry.js';
import { GRAINS, type DateWindow, type Grain, type Lens, type RequestKind, type SubQuestion } from '../analysis/types.js';
import type { Brief, Question } from './brief.js';
import { readPeriodPhrase } from './period-phrases.js';
import { fullWindow } from './prompts.js';

export interface Plan {
  items: SubQuestion[];
  /** Kinds of question asked for that no template answers yet, said out loud in the plan. */
  notCovered: RequestKind[];
  /** Sub-questions left out by the size cap or the audience, in plain words for the reply. */
  leftOut: SubQuestion[];
  /** How calendar phrases were read ("this summer" -> the summer of 2024), said back. */
  readings: string[];
}

export const MAX_PLAN_ITEMS = 16;
const LEADERSHIP_MAX_ITEMS = 6;
const LENS_ORDER: Lens[] = ['time_pattern', 'breakdown', 'summary', 'distribution'];

type Draft = Omit<SubQuestion, 'id'> & { headline: boolean; first?: boolean };

/** Metrics side by side in one period table; more are split over several tables so each stays legible. */
export const MAX_TABLE_METRICS = 4;

export function buildPlan(brief: Brief, ds: DatasetConfig, coverage: Coverage): Plan {
  const grain: Grain = brief.grain ?? 'month';
  const all = brief.window ?? fullWindow(coverage);
  if (!all) return { items: [], notCovered: [], leftOut: [], readings: [] };
  const drafts: Draft[] = [];
  const notCovered = new Set<RequestKind>();
  const readings: string[] = [];
  const questions = brief.questions.length > 0 ? brief.questions : [{ text: brief.requestText, kind: 'trend' as const, metrics: brief.metrics, dimensions: brief.dimensions, frequency: false }];
  for (const q of questions) {
    const group = groupFor(q, brief, ds);
    const phrase = readPeriodPhrase(q.text, coverage, group?.launch_date);
    if (phrase) readings.push(`"${q.text}": ${phrase.reading}`);
    const focus = phrase?.window ?? all;
    // A question's own breakdowns; the brief's (typed in a prompt) only when nothing else says.
    const own = q.dimensions.length > 0 ? q.dimensions : questions.length === 1 || brief.dimensionsAsked ? brief.dimensions : [];
    const dims = own.filter((d) => isBreakdownDimension(ds, d));
    const metrics = q.metrics.length > 0 ? q.metrics : q.frequency ? [plainCountMetric(ds)?.name].filter((m): m is string => !!m) : brief.metrics;
    addPeriodTables(drafts, q, brief, metrics, grain, focus);
    const before = drafts.length;
    // Kind and lens are the sub-question's own (its declaration in the registry).
    const add = (template: TemplateName, metric: string, headline: boolean, extra: Partial<SubQuestion> = {}, window: DateWindow = all) => {
      const { kind, lens } = SUB_QUESTIONS[template];
      drafts.push({ kind, lens, template, metrics: [metric], grain, window, filters: [], headline, ...extra });
    };
    for (const metric of metrics) {
      const additive = ds.metrics.some((m) => m.name === metric) && isAdditive(metricByName(ds, metric));
      switch (q.kind) {
        case 'trend':
          add('series', metric, true);
          if (grain === 'month') add('trend_seasonality', metric, false);
          add('trend_test', metric, false);
          add('trend_summary', metric, false);
          for (const d of dims) add('segment_trend', metric, false, { dimension: d });
          if (additive) for (const d of dims) add('segment_shares', metric, false, { dimension: d });
          break;
        case 'growth':
          // The metric's own pattern over time is the context any growth answer is read against.
          add('series', metric, false);
          add('growth_series', metric, !dims.length);
          for (const [i, d] of dims.entries()) add('growth_drivers', metric, i === 0, { dimension: d }, focus);
          add('growth_summary', metric, false);
          if (additive) for (const d of dims) add('growth_share_shift', metric, false, { dimension: d }, focus);
          break;
        case 'performance': {
          if (!group) break;
          const g = { comparisonGroup: group.name };
          const since = phrase?.window ?? (group.launch_date ? { start: group.launch_date, end: all.end } : all);
          if (q.frequency) {
            // "Do they travel more often?" is a per-customer question: comparing the groups'
            // total bookings would mostly measure how many customers each group has.
            add('performance_frequency', metric, true, g, since);
            add('performance_before_after', metric, false, g);
            break;
          }
          add('performance_compare', metric, true, g, since);
          add('performance_before_after', metric, false, g);
          const d = dims[0] ?? firstBreakdownDimension(ds);
          if (d) add('performance_by_segment', metric, false, { ...g, dimension: d }, since);
          break;
        }
        case 'kpi': {
          const upTo = { start: all.start, end: focus.end };
          add('kpi_snapshot', metric, true, {}, upTo);
          add('kpi_context', metric, false, {}, upTo);
          for (const d of dims) add('kpi_by_segment', metric, false, { dimension: d }, upTo);
          if (additive) for (const d of dims) add('kpi_mix', metric, false, { dimension: d }, upTo);
          break;
        }
      }
    }
    if (drafts.length === before) notCovered.add(q.kind);
  }
  // Leadership gets the headline of each question first, and fewer items.
  const leadership = brief.audience === 'leadership';
  const cap = leadership ? LEADERSHIP_MAX_ITEMS : MAX_PLAN_ITEMS;
  const chosen = [...drafts.filter((d) => d.first), ...(leadership ? [...drafts.filter((d) => d.headline && !d.first), ...drafts.filter((d) => !d.headline)] : drafts.filter((d) => !d.first))];
  const kept = new Set(chosen.slice(0, cap));
  // Shown grouped under each kind (in the order asked), headline first, then by lens; period tables open the plan.
  const kindOrder = [...new Set(drafts.map((d) => d.kind))];
  const rank = (d: Draft) => (d.first ? -1 : kindOrder.indexOf(d.kind) * 100 + (d.headline ? 0 : 10 + LENS_ORDER.indexOf(d.lens)));
  const ordered = [...drafts].sort((a, b) => rank(a) - rank(b));
  const keptOrdered = ordered.filter((d) => kept.has(d));
  const leftOrdered = ordered.filter((d) => !kept.has(d));
  const toSub = (d: Draft, i: number): SubQuestion => {
    const { headline: _headline, first: _first, ...sq } = d;
    return { id: `q${i + 1}`, ...sq };
  };
  return {
    items: keptOrdered.map(toSub),
    leftOut: leftOrdered.map((d, i) => toSub(d, keptOrdered.length + i)),
    notCovered: [...notCovered],
    readings,
  };
}

/**
 * The period table opens the plan when a question names two or more metrics and the brief has a
 * grain, or asks for the numbers period by period: the metrics side by side, split into tables of
 * at most MAX_TABLE_METRICS. A table already planned for the same metrics and window is not repeated.
 */
function addPeriodTables(drafts: Draft[], q: Question, brief: Brief, metrics: string[], grain: Grain, window: DateWindow): void {
  if (metrics.length === 0 || !(q.table || (metrics.length >= 2 && brief.grain))) return;
  const count = Math.ceil(metrics.length / MAX_TABLE_METRICS);
  for (let k = 0; k < count; k++) {
    const chunk = metrics.slice(Math.round((k * metrics.length) / count), Math.round(((k + 1) * metrics.length) / count));
    const same = (d: Draft) => d.template === 'period_table' && d.metrics.join() === chunk.join() && d.window.start === window.start && d.window.end === window.end;
    if (drafts.some(same)) continue;
    const { kind, lens } = SUB_QUESTIONS.period_table;
    drafts.push({ kind, lens, template: 'period_table', metrics: chunk, grain, window, filters: [], headline: true, first: true });
  }
}

function groupFor(q: Question, brief: Brief, ds: DatasetConfig): ComparisonGroup | undefined {
  const name = q.comparisonGroup ?? brief.comparisonGroup;
  return name ? ds.comparison_groups.find((g) => g.name === name) : ds.comparison_groups.length === 1 ? ds.comparison_groups[0] : undefined;
}

export type PlanEdit =
  | { type: 'agree' }
  | { type: 'drop'; numbers: number[] }
  | { type: 'grain'; grain: SubQuestion['grain'] }
  | { type: 'cancel' }
  /** "add a breakdown by channel": the phrase is matched to a dimension by the caller. */
  | { type: 'add_breakdown'; phrase: string; dimension?: string }
  /** "use 2024 instead", "since 2023-04": read against the data's coverage by the caller. */
  | { type: 'window'; phrase: string; window?: DateWindow }
  | { type: 'unknown' };

// The breakdown lens of each request kind, for "add a breakdown by ...".
const BREAKDOWN_TEMPLATE: Record<RequestKind, TemplateName> = {
  trend: 'segment_trend',
  growth: 'growth_drivers',
  performance: 'performance_by_segment',
  kpi: 'kpi_by_segment',
};

export function readPlanEdit(text: string): PlanEdit {
  const t = text.trim().toLowerCase();
  if (/^(go|go ahead|yes|ok|okay|agreed?|looks good|lgtm|run( it)?|start|do it|sounds good)[.!]*$/.test(t)) return { type: 'agree' };
  if (/^(cancel|stop|never ?mind|abort)\b/.test(t)) return { type: 'cancel' };
  const drop = /^(?:drop|remove|delete|skip)\s+(.+)$/.exec(t);
  if (drop) {
    const numbers = [...drop[1]!.matchAll(/\d+/g)].map((m) => Number(m[0]));
    if (numbers.length > 0) return { type: 'drop', numbers };
  }
  const add = /^(?:please\s+)?(?:add|also|plus|and|include)\b.*?\bby\s+(.+?)[.!?]*$/.exec(t) ?? /\bbreak\s+(?:it|this|that|them)?\s*down\s+by\s+(.+?)[.!?]*$/.exec(t);
  if (add) return { type: 'add_breakdown', phrase: add[1]! };
  const window = /^(?:(?:change|set|switch)\s+the\s+(?:window|period|dates?)\s+to|window|period|use|only|just)\s+(.+?)(?:\s+instead)?[.!?]*$/.exec(t) ?? /^((?:since|from)\s+.+?)[.!?]*$/.exec(t);
  if (window && /\d{4}|last\s+\d+|all/.test(window[1]!)) return { type: 'window', phrase: window[1]! };
  const adjective: Record<Grain, string> = { day: 'daily', week: 'weekly', month: 'monthly', quarter: 'quarterly', year: 'yearly' };
  const grain = GRAINS.find((g) => new RegExp(`\\b(${adjective[g]}|by ${g}|per ${g}|${g}ly)\\b`).test(t));
  if (grain) return { type: 'grain', grain };
  return { type: 'unknown' };
}

export function applyPlanEdit(plan: Plan, edit: PlanEdit): { plan: Plan; error?: string } {
  switch (edit.type) {
    case 'drop': {
      const bad = edit.numbers.filter((n) => n < 1 || n > plan.items.length);
      if (bad.length > 0) return { plan, error: `The plan has items 1 to ${plan.items.length}; there is no ${bad.join(', ')}.` };
      const items = plan.items.filter((_, i) => !edit.numbers.includes(i + 1));
      if (items.length === 0) return { plan, error: 'That would drop every item. Say "cancel" to stop the request instead.' };
      return { plan: { ...plan, items: renumber(items) } };
    }
    case 'grain':
      return { plan: { ...plan, items: plan.items.map((sq) => ({ ...sq, grain: edit.grain })) } };
    case 'window': {
      if (!edit.window) return { plan, error: `I couldn't read "${edit.phrase}" as a period.` };
      const w = edit.window;
      return { plan: { ...plan, items: plan.items.map((sq) => ({ ...sq, window: w })) } };
    }
    case 'add_breakdown': {
      const dimension = edit.dimension;
      if (!dimension) return { plan, error: `I couldn't match "${edit.phrase}" to a breakdown.` };
      // One breakdown per question already in the plan (its kind, metric, window and group).
      const heads = new Map<string, SubQuestion>();
      for (const sq of plan.items) {
        // A period table's metrics each have their own questions; it takes no breakdown itself.
        if (sq.template === 'period_table') continue;
        const key = `${sq.kind}|${sq.metrics.join(',')}|${sq.comparisonGroup ?? ''}`;
        if (!heads.has(key)) heads.set(key, sq);
      }
      const added: SubQuestion[] = [];
      for (const sq of heads.values()) {
        const template = BREAKDOWN_TEMPLATE[sq.kind];
        const exists = plan.items.some((x) => x.template === template && x.dimension === dimension && x.metrics.join() === sq.metrics.join());
        if (exists) continue;
        const { dimension: _old, ...rest } = sq;
        added.push({ ...rest, template, lens: 'breakdown', dimension });
      }
      if (added.length === 0) return { plan, error: 'The plan already has that breakdown.' };
      const items = [...plan.items, ...added];
      if (items.length > MAX_PLAN_ITEMS) return { plan, error: `That would take the plan past ${MAX_PLAN_ITEMS} items; drop some first (e.g. "drop 3").` };
      return { plan: { ...plan, items: renumber(items) } };
    }
    default:
      return { plan };
  }
}

function renumber(items: SubQuestion[]): SubQuestion[] {
  return items.map((sq, i) => ({ ...sq, id: `q${i + 1}` }));
}
