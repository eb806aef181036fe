// From a complete brief to a plan of sub-questions, and the plan edits a requester can type.
import type { DatasetConfig } from '../config/schema.js';
import { TEMPLATES } from '../analysis/templates/index.js';
import { GRAINS, type RequestKind, type SubQuestion } from '../analysis/types.js';
import type { Brief } from './brief.js';

export interface Plan {
  items: SubQuestion[];
  /** Kinds of question asked for that no template answers yet, said out loud in the plan. */
  notCovered: RequestKind[];
}

export const MAX_PLAN_ITEMS = 16;

export function buildPlan(brief: Brief, ds: DatasetConfig): Plan {
  if (!brief.window || !brief.grain) throw new Error('a plan needs a window and a grain');
  const items: SubQuestion[] = [];
  const notCovered: RequestKind[] = [];
  for (const kind of brief.kinds) {
    if (kind !== 'trend') {
      notCovered.push(kind);
      continue;
    }
    for (const metric of brief.metrics) {
      if (!TEMPLATES.series || !ds.metrics.some((m) => m.name === metric)) continue;
      items.push({
        id: `q${items.length + 1}`,
        kind,
        lens: 'time_pattern',
        template: 'series',
        metrics: [metric],
        grain: brief.grain,
        window: brief.window,
        filters: [],
      });
    }
  }
  if (items.length === 0 && notCovered.length > 0) {
    // Every request can at least be answered with the metric's pattern over time.
    for (const metric of brief.metrics) {
      items.push({ id: `q${items.length + 1}`, kind: 'trend', lens: 'time_pattern', template: 'series', metrics: [metric], grain: brief.grain, window: brief.window, filters: [] });
    }
  }
  return { items: items.slice(0, MAX_PLAN_ITEMS), notCovered };
}

export type PlanEdit =
  | { type: 'agree' }
  | { type: 'drop'; numbers: number[] }
  | { type: 'grain'; grain: SubQuestion['grain'] }
  | { type: 'cancel' }
  | { type: 'unknown' };

export function readPlanEdit(text: string): PlanEdit {
  const t = text.trim().toLowerCase();
  if (/^(go|go ahead|yes|ok|okay|agreed?|looks good|lgtm|run( it)?|start|do it|sounds good)[.!]*$/.test(t)) return { type: 'agree' };
  if (/^(cancel|stop|never ?mind|abort)\b/.test(t)) return { type: 'cancel' };
  const drop = /^(?:drop|remove|delete|skip)\s+(.+)$/.exec(t);
  if (drop) {
    const numbers = [...drop[1]!.matchAll(/\d+/g)].map((m) => Number(m[0]));
    if (numbers.length > 0) return { type: 'drop', numbers };
  }
  const grain = GRAINS.find((g) => new RegExp(`\\b(${g}|${g}ly|${g === 'day' ? 'daily' : g + 'ly'})\\b`).test(t));
  if (grain && /\b(grain|make it|switch|change|use|instead|by)\b/.test(t)) return { type: 'grain', grain };
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
    default:
      return { plan };
  }
}

function renumber(items: SubQuestion[]): SubQuestion[] {
  return items.map((sq, i) => ({ ...sq, id: `q${i + 1}` }));
}
