// What the bot assumes for what a request did not say, with a reason for each: the card shows
// them as assumed, and the plan is built from the brief with them filled in. Audience, deadline,
// grain and period always have safe defaults; only a request with no measure at all is asked.
import type { Coverage } from '../analysis/coverage.js';
import { firstBreakdownDimension } from '../analysis/catalog.js';
import { finestGrain, grainAdjective, isFinerGrain } from '../analysis/grains.js';
import type { DatasetConfig } from '../config/schema.js';
import type { Brief } from './brief.js';
import type { BriefDefaults } from './card.js';
import { recommendedGrain } from './prompts.js';
import { rankMetrics } from './reading/metric-ranking.js';

export function briefDefaults(brief: Brief, ds: DatasetConfig, coverage: Coverage): BriefDefaults {
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
  const first = firstBreakdownDimension(ds, open.flatMap((q) => q.filters));
  // Never in place of a breakdown the request named that the catalog lacks ("by studio"): that is asked (bot/prompts.ts).
  const unplaced = brief.unknownTerms.some((u) => u.role === 'dimension');
  if (first && !brief.dimensionsAsked && open.length > 0 && !unplaced) {
    out.breakdown = { value: first, reason: 'a change is easier to act on with what drove it; the first breakdown in the catalog' };
  }
  return out;
}

/** The brief the plan is built from: what was read, with the defaults where nothing was. */
export function withDefaults(brief: Brief, d: BriefDefaults): Brief {
  const questions = brief.questions.map((q) => {
    const metrics = q.metrics.length === 0 && !q.frequency && d.metric ? [d.metric.value] : q.metrics;
    const dimensions = q.kind === 'growth' && q.dimensions.length === 0 && !q.contrast && d.breakdown ? [d.breakdown.value] : q.dimensions;
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
