// A correction applied to the brief behind the card ("for leadership, weekly, only 2024, add
// channel, drop 3"), and the plan rebuilt from it. Changes are made to the brief, never to the
// plan's lines, so the card, the plan and any later run agree; items dropped by the requester
// stay dropped when the plan is rebuilt (they are remembered by what they are, not their number).
import type { Coverage } from '../analysis/coverage.js';
import { inSentence } from '../analysis/captions/grammar.js';
import { grainAdjective } from '../analysis/grains.js';
import { describeSubQuestion } from '../analysis/sub-questions/describe.js';
import type { SubQuestion } from '../analysis/types.js';
import { describeWindow } from '../analysis/window-words.js';
import type { DatasetConfig } from '../config/schema.js';
import { briefDefaults, withDefaults } from './brief-defaults.js';
import type { Brief, Question } from './brief.js';
import type { BriefDefaults } from './card.js';
import type { ValueIndex } from '../analysis/values/value-index.js';
import { applyPlanEdit, buildPlan, type Plan } from './plan.js';
import type { Correction } from './reading/corrections.js';
import { AUDIENCE_LABELS, STOPWORDS } from './reading/lexicon.js';

/** What a plan item is, whatever its number: dropped items are matched by it after a rebuild. */
export function itemSignature(sq: SubQuestion): string {
  return [sq.template, sq.metrics.join(','), sq.dimension ?? '', sq.comparisonGroup ?? ''].join('|');
}

export interface PlannedBrief {
  plan: Plan;
  defaults: BriefDefaults;
}

/** The plan for a brief as read (defaults filled in), without the items the requester dropped. */
export function planFor(brief: Brief, ds: DatasetConfig, coverage: Coverage, dropped: readonly string[], values?: ValueIndex): PlannedBrief {
  const defaults = briefDefaults(brief, ds, coverage, values);
  let plan = buildPlan(withDefaults(brief, defaults), ds, coverage);
  const numbers = plan.items.flatMap((sq, i) => (dropped.includes(itemSignature(sq)) ? [i + 1] : []));
  if (numbers.length > 0 && numbers.length < plan.items.length) plan = applyPlanEdit(plan, { type: 'drop', numbers }).plan;
  return { plan, defaults };
}

export interface CardEdit {
  brief: Brief;
  dropped: string[];
  /** What changed, in a few words each ("audience: leadership"). */
  changes: string[];
  /** What could not be done, said back. */
  problems: string[];
}

export interface EditContext {
  dataset: DatasetConfig;
  coverage: Coverage;
  locale: string;
  /** The words the correction came in, kept as the evidence of what it set. */
  words: string;
}

/** Applies a correction to the brief; `plan` is the plan the requester sees (for "drop 3"). */
export function applyCorrection(brief: Brief, c: Correction, plan: Plan, dropped: readonly string[], ctx: EditContext): CardEdit {
  const ds = ctx.dataset;
  const changes: string[] = [];
  const problems = [...c.problems];
  const evidence = { ...(brief.evidence ?? {}) };
  const stated = { words: ctx.words, how: 'stated' as const };
  const dimLabel = (d: string) => inSentence(ds.dimensions.find((x) => x.name === d)?.label ?? d);
  const metricLabel = (m: string) => inSentence(ds.metrics.find((x) => x.name === m)?.label ?? m);
  let next: Brief = { ...brief, questions: brief.questions.map((q) => ({ ...q, filters: [...q.filters], dimensions: [...q.dimensions] })) };

  if (c.audience && c.audience !== brief.audience) {
    next.audience = c.audience;
    evidence.audience = stated;
    changes.push(`audience: ${AUDIENCE_LABELS[c.audience].label.toLowerCase()}`);
  }
  if (c.deadline && (c.deadline !== brief.deadline || !c.deadlineAsap !== !brief.deadlineAsap)) {
    next.deadline = c.deadline;
    if (c.deadlineAsap) next.deadlineAsap = true;
    else delete next.deadlineAsap;
    evidence.deadline = stated;
    changes.push(`deadline: ${c.deadline === 'none' ? 'none' : c.deadlineAsap ? 'as soon as possible' : c.deadline}`);
  }
  if (c.grain && c.grain !== brief.grain) {
    next.grain = c.grain;
    evidence.grain = stated;
    changes.push(`grain: ${grainAdjective(c.grain)}`);
  }
  if (c.window) {
    if ('all' in c.window) {
      next = { ...next, questions: next.questions.map(({ window: _w, compareWindow: _c, windowSoFar: _s, spanEnds: _e, ...q }) => q as Question) };
      delete next.window;
      delete next.compareWindow;
      delete evidence.window;
      changes.push('period: all the data');
    } else {
      const { window, compareWindow } = c.window;
      next.questions = next.questions.map(({ compareWindow: _c, windowSoFar: _s, spanEnds: _e, ...q }) => ({ ...q, window, ...(compareWindow ? { compareWindow } : {}) }) as Question);
      next.window = window;
      if (compareWindow) next.compareWindow = compareWindow;
      else delete next.compareWindow;
      evidence.window = stated;
      changes.push(`period: ${describeWindow(window, ctx.coverage, ctx.locale)}${compareWindow ? ` against ${describeWindow(compareWindow, ctx.coverage, ctx.locale)}` : ''}`);
    }
  }
  if (c.metrics) {
    const named = 'replace' in c.metrics ? c.metrics.replace : c.metrics.add;
    next.questions = next.questions.map((q) => (q.frequency ? q : { ...q, metrics: 'replace' in c.metrics! ? [...named] : [...new Set([...q.metrics, ...named])] }));
    evidence.metrics = stated;
    changes.push(`${'replace' in c.metrics ? 'measures' : 'measures added'}: ${named.map(metricLabel).join(', ')}`);
  }
  // Breakdowns go to the questions that explain with one (trend, growth, KPI); else to all.
  const explainers = next.questions.filter((q) => q.kind !== 'performance');
  const targets = explainers.length > 0 ? explainers : next.questions;
  if (c.clearDimensions) {
    for (const q of next.questions) q.dimensions = [];
    next.dimensions = [];
    next.dimensionsAsked = true;
    evidence.dimensions = stated;
    changes.push('no breakdown');
  }
  const added = c.addDimensions.filter((d) => !targets.every((q) => q.dimensions.includes(d)));
  if (added.length > 0) {
    for (const q of targets) q.dimensions = [...new Set([...q.dimensions, ...added])];
    next.dimensionsAsked = true;
    evidence.dimensions = stated;
    changes.push(`breakdown added: ${added.map(dimLabel).join(', ')}`);
  }
  const removed = c.removeDimensions.filter((d) => next.questions.some((q) => q.dimensions.includes(d)));
  if (removed.length > 0) {
    for (const q of next.questions) q.dimensions = q.dimensions.filter((d) => !removed.includes(d));
    next.dimensionsAsked = true;
    evidence.dimensions = stated;
    changes.push(`breakdown removed: ${removed.map(dimLabel).join(', ')}`);
  }
  if (c.filters.length > 0) {
    const dims = new Set(c.filters.map((f) => f.dimension));
    for (const q of next.questions) q.filters = [...q.filters.filter((f) => !dims.has(f.dimension)), ...c.filters];
    evidence.filters = stated;
    changes.push(`only: ${c.filters.map((f) => `${f.exclude ? 'not ' : ''}${f.values.join(' or ')}`).join('; ')}`);
  }
  const lifted = c.clearFilters.filter((d) => next.questions.some((q) => q.filters.some((f) => f.dimension === d)));
  if (lifted.length > 0) {
    for (const q of next.questions) q.filters = q.filters.filter((f) => !lifted.includes(f.dimension));
    changes.push(`filter lifted: all ${lifted.map(dimLabel).join(', ')}`);
  }
  next.metrics = [...new Set(next.questions.flatMap((q) => q.metrics))];
  next.dimensions = [...new Set(next.questions.flatMap((q) => q.dimensions))];
  next.evidence = evidence;

  const nowDropped = [...dropped];
  for (const target of c.drop) {
    const hit = typeof target === 'number' ? plan.items[target - 1] : itemByWords(plan, target, ds, ctx.locale);
    if (!hit) {
      problems.push(typeof target === 'number' ? `The plan has items 1 to ${plan.items.length}; there is no ${target}.` : `No item of the plan matches "${target}".`);
      continue;
    }
    nowDropped.push(itemSignature(hit));
    changes.push(`dropped: ${describeSubQuestion(hit, ds, ctx.locale).replace(/\.$/, '')}`);
  }
  if (nowDropped.length > 0 && plan.items.every((sq) => nowDropped.includes(itemSignature(sq))) && changes.length === c.drop.length) {
    problems.push('That would drop every item. Say "cancel" to stop the request instead.');
    return { brief, dropped: [...dropped], changes: [], problems };
  }
  return { brief: next, dropped: nowDropped, changes, problems };
}

/** "the seasonality one": the plan item whose description shares the most words with it. */
function itemByWords(plan: Plan, words: string, ds: DatasetConfig, locale: string): SubQuestion | undefined {
  const stem = (w: string) => w.toLowerCase().replace(/(?:ality|ity|al|s|ing|ed)$/, '').slice(0, 6);
  const wanted = words.split(/[^a-z0-9]+/i).filter((w) => w.length > 2 && !STOPWORDS.has(w.toLowerCase())).map(stem);
  if (wanted.length === 0) return undefined;
  let best: { sq: SubQuestion; score: number } | undefined;
  for (const sq of plan.items) {
    const text = `${describeSubQuestion(sq, ds, locale)} ${sq.template.replace(/_/g, ' ')} ${sq.lens.replace(/_/g, ' ')}`;
    const have = new Set(text.split(/[^a-z0-9]+/i).filter(Boolean).map(stem));
    const score = wanted.filter((w) => have.has(w)).length;
    if (score > 0 && (!best || score > best.score)) best = { sq, score };
  }
  return best?.sq;
}
