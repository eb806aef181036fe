// What the bot assumes for what a request did not say, with a reason for each: the card shows
// them as assumed, and the plan is built from the brief with them filled in. Audience, deadline,
// grain and period always have safe defaults; only a request with no measure at all is asked.
import type { Coverage } from '../analysis/coverage.js';
import { firstBreakdownDimension, isBreakdownDimension, ownLevelDimension, pinsOneValue } from '../analysis/catalog.js';
import { valueFormatOf } from '../analysis/format.js';
import { ownLevelsReason } from '../analysis/captions/own-level-words.js';
import { addDays, periodsBetween } from '../analysis/periods.js';
import type { SegmentFilter } from '../analysis/types.js';
import type { ValueIndex } from '../analysis/values/value-index.js';
import { finestGrain, grainAdjective, isFinerGrain } from '../analysis/grains.js';
import type { DatasetConfig } from '../config/schema.js';
import type { Brief } from './brief.js';
import type { BriefDefaults } from './card.js';
import { recommendedGrain } from './prompts.js';
import { rankMetrics } from './reading/metric-ranking.js';

export function briefDefaults(brief: Brief, ds: DatasetConfig, coverage: Coverage, values?: ValueIndex): BriefDefaults {
  const grain = recommendedGrain(coverage);
  const out: BriefDefaults = {
    audience: { value: 'managers', reason: 'plain words with enough detail to act on' },
    grain: { value: grain.grain, reason: grain.reason },
  };
  // Data stamped once a month has no daily figures: a daily grain asked is read at the finest there is, and said.
  const finest = finestGrain(coverage.stamps);
  if (brief.grain && isFinerGrain(brief.grain, finest)) {
    out.grainCapped = { asked: brief.grain, value: finest, reason: `you asked for ${grainAdjective(brief.grain)} figures, but the data is stamped ${coverage.stamps}, so ${grainAdjective(finest)} is the finest there is` };
  }
  // A question with no measure of its own ("did this summer beat last summer") takes the measure
  // the metric prompt would recommend (never the row count unless things are counted), said on the card as assumed.
  const headline = ds.metrics.length > 0 ? rankMetrics(ds, brief.requestText)[0] : undefined;
  if (headline && brief.questions.some((q) => q.metrics.length === 0 && !q.frequency)) {
    out.metric = { value: headline.name, reason: headline.reason === 'the headline metric of this dataset' ? 'the headline measure of this dataset' : headline.reason };
  }
  // A change is explained by a breakdown; without one asked, the catalog's first that the
  // questions' filters leave more than one value of.
  const open = brief.questions.filter((q) => q.kind === 'growth' && q.dimensions.length === 0 && !q.contrast);
  const chosen = defaultBreakdown(ds, open.flatMap((q) => q.filters), coverage, values);
  // Never in place of a breakdown the request named that the catalog lacks ("by studio"): that is asked (bot/prompts.ts).
  const unplaced = brief.unknownTerms.some((u) => u.role === 'dimension');
  if (chosen && !brief.dimensionsAsked && open.length > 0 && !unplaced) {
    out.breakdown = { value: chosen.name, reason: `a change is easier to act on with what drove it; ${chosen.why}` };
  }
  // A level asked across entities (a price across symbols, a temperature across cities) with no
  // member named: answered per member, the combined figure kept with its caution (catalog.ts ownLevelDimension).
  const levels = brief.dimensionsAsked || unplaced ? null : ownLevelsAsked(brief, ds, out.metric?.value);
  if (levels) out.breakdown = levels;
  return out;
}

/** The kinds of question a level's own course per member answers (its trend, its change, its latest value). */
const PER_MEMBER_KINDS: ReadonlySet<string> = new Set(['trend', 'growth', 'kpi']);

/** A question of a level with no breakdown, no pair of values and no one value's share of its own. */
function asksLevelAcross(q: Brief['questions'][number]): boolean {
  return PER_MEMBER_KINDS.has(q.kind) && q.dimensions.length === 0 && !q.contrast && !q.shareOf;
}

/** The breakdown a level asked across entities is answered by, with why (the first metric that has one decides). */
function ownLevelsAsked(brief: Brief, ds: DatasetConfig, assumedMetric: string | undefined): BriefDefaults['breakdown'] | null {
  for (const q of brief.questions.filter(asksLevelAcross)) {
    for (const name of q.metrics.length > 0 ? q.metrics : assumedMetric ? [assumedMetric] : []) {
      const metric = ds.metrics.find((m) => m.name === name);
      const e = metric ? ownLevelDimension(ds, metric, q.filters) : null;
      if (!metric || !e) continue;
      const dim = ds.dimensions.find((d) => d.name === e.dimension)!;
      const levels = ds.metrics.filter((m) => ownLevelDimension(ds, m, q.filters)?.dimension === e.dimension).map((m) => m.name);
      return { value: e.dimension, reason: ownLevelsReason(metric.label, dim.label, e, valueFormatOf(metric, 'en'), 'en'), levels };
    }
  }
  return null;
}

/** How near the most persistent breakdown another must be to count as persistent too (common practice: a tenth). */
const PERSISTENCE_MARGIN = 0.1;

/**
 * The breakdown a change is explained by when the request names none, and why. The rule: among
 * the catalog's breakdowns (never personal data, never a group's own column, never one the
 * filters pin to one value), prefer the one whose values persist through the data — the mean,
 * over its values, of the share of the data's months each value has rows in. Entities that carry
 * on through time (cities, routes, airports) have rows nearly every month; a description of each
 * row's outcome (weather type, status) comes and goes (snow in a few winter months), and a
 * change "driven by" a value that is absent half the time explains little. Ties (within
 * PERSISTENCE_MARGIN of the best) go to catalog order. Without the value index (no months read),
 * the catalog's first breakdown, as before.
 */
export function defaultBreakdown(ds: DatasetConfig, filters: readonly SegmentFilter[], coverage: Coverage, values?: ValueIndex): { name: string; why: string } | undefined {
  const first = firstBreakdownDimension(ds, filters);
  if (!first) return undefined;
  const catalogFirst = { name: first, why: 'the first breakdown in the catalog' };
  if (!values || !coverage.firstDate || !coverage.lastDate) return catalogFirst;
  const months = periodsBetween(coverage.firstDate, addDays(coverage.lastDate, 1), 'month').length;
  const candidates = ds.dimensions.filter((d) => isBreakdownDimension(ds, d.name) && !pinsOneValue(filters, d.name));
  const scored = candidates.map((d) => {
    const vs = values.get(d.name)?.values ?? [];
    const known = vs.length > 0 && vs.every((v) => v.months !== undefined);
    return { d, persistence: known && months > 0 ? vs.reduce((a, v) => a + Math.min(1, v.months! / months), 0) / vs.length : undefined };
  });
  if (scored.some((s) => s.persistence === undefined) || months < 2) return catalogFirst;
  const best = Math.max(...scored.map((s) => s.persistence!));
  const pick = scored.find((s) => s.persistence! >= best - PERSISTENCE_MARGIN)!;
  const pct = (x: number) => `${Math.round(x * 100)}%`;
  const others = scored.filter((s) => s !== pick && s.persistence! < best - PERSISTENCE_MARGIN);
  if (others.length === 0) return { name: pick.d.name, why: 'the first breakdown in the catalog' };
  const label = (d: { label: string }) => d.label.toLowerCase();
  return {
    name: pick.d.name,
    why: `${label(pick.d)}, whose values persist through the data (each is in ${pct(pick.persistence!)} of its months on average, against ${others.map((o) => `${pct(o.persistence!)} for ${label(o.d)}`).join(', ')}); name another breakdown to change it`,
  };
}

/** The brief the plan is built from: what was read, with the defaults where nothing was. */
export function withDefaults(brief: Brief, d: BriefDefaults): Brief {
  const questions = brief.questions.map((q) => {
    const metrics = q.metrics.length === 0 && !q.frequency && d.metric ? [d.metric.value] : q.metrics;
    const level = !!d.breakdown?.levels && asksLevelAcross(q) && metrics.some((m) => d.breakdown!.levels!.includes(m));
    const dimensions = ((q.kind === 'growth' && q.dimensions.length === 0 && !q.contrast) || level) && d.breakdown ? [d.breakdown.value] : q.dimensions;
    return { ...q, metrics, dimensions };
  });
  return {
    ...brief,
    questions,
    metrics: [...new Set(questions.flatMap((q) => q.metrics))],
    dimensions: [...new Set([...brief.dimensions, ...questions.flatMap((q) => q.dimensions)])],
    audience: brief.audience ?? d.audience.value,
    grain: d.grainCapped?.value ?? brief.grain ?? d.grain.value,
    deadline: brief.deadline ?? 'none',
  };
}
