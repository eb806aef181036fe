// "Which X is growing fastest" asks for X's segments ranked by their own growth rate; "what drove
// it" asks who added most. Read on vega-datasets' birdstrikes.csv (FAA wildlife strike reports
// 1990-2002) with a newcomer's hand-written config; the phrasings were written for this test.
import { beforeAll, describe, expect, it } from 'vitest';
import { briefDefaults, withDefaults } from '../../bot/brief-defaults.js';
import type { Brief } from '../../bot/brief.js';
import { buildPlan } from '../../bot/plan.js';
import { type DatasetFacts, readRequest } from '../../bot/reading/read-request.js';
import { describeSubQuestion } from '../../analysis/sub-questions/describe.js';
import { BIRDSTRIKES_CONFIG } from './open-data-configs.js';
import { publicFacts } from './public-data.js';

let strikes: DatasetFacts;
const NOW = new Date('2026-12-05T01:00:00Z');
beforeAll(async () => {
  strikes = await publicFacts(BIRDSTRIKES_CONFIG);
}, 120_000);

const read = (text: string): Brief => readRequest(text, strikes, { now: NOW, locale: 'en-GB' });
const planOf = (b: Brief) => buildPlan(withDefaults(b, briefDefaults(b, strikes.dataset, strikes.coverage)), strikes.dataset, strikes.coverage);

describe('a ranking by growth rate', () => {
  it.each([
    ['which phase of flight is growing fastest?', 'fastest'],
    ['Which states have the fastest-growing strike counts?', 'fastest'],
    ['strikes by time of day: which one has the highest growth rate', 'fastest'],
    ['which phase is growing the slowest in strikes', 'slowest'],
    ['which state saw strikes fall fastest?', 'slowest'],
  ])('%s -> %s', (text, order) => {
    const b = read(text);
    const q = b.questions[0]!;
    expect(q.kind).toBe('growth');
    expect(q.growthRank).toBe(order);
    const item = planOf(b).items.find((i) => i.template === 'growth_drivers');
    expect(item?.growthRank).toBe(order);
    // It answers the question asked, so the summary leads with it, and the plan says "its own growth rate" (with no measure named, the default one).
    expect(item?.answersAsked).toBe(true);
    expect(describeSubQuestion(item!, strikes.dataset, 'en-GB')).toMatch(/grew (?:fastest|slowest) in [a-z ]+, each by its own growth rate/);
  });

  it.each(['which phase of flight drove the growth in strikes?', 'how fast are strikes growing?', 'strikes growth by phase of flight'])('%s is no ranking by rate', (text) => {
    const b = read(text);
    expect(b.questions[0]!.growthRank).toBeUndefined();
    for (const item of planOf(b).items) expect(item.growthRank).toBeUndefined();
  });
});
