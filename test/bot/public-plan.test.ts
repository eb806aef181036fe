// From a request on public data (vega-datasets' US unemployment by industry, test/reading/public-data.ts)
// to the plan the requester agrees: what the request restricted (an industry, a stretch of years)
// holds in every item after the measure prompt is answered, and a brief with no question of its
// own keeps its period through any answer.
import { describe, expect, it } from 'vitest';
import type { Brief } from '../../bot/brief.js';
import { briefDefaults, withDefaults } from '../../bot/brief-defaults.js';
import { buildPlan } from '../../bot/plan.js';
import { nextPrompt, readAnswer, type PromptContext } from '../../bot/prompts.js';
import { readRequest } from '../../bot/reading/read-request.js';
import { NOW, publicFacts, UNEMPLOYMENT_CONFIG } from '../reading/public-data.js';

describe('a restricted request keeps its restriction through the measure prompt and into the plan', () => {
  it('"how joblessness changed in construction from 2007 through 2009": every item is about Construction, 2007 to 2009', async () => {
    const facts = await publicFacts(UNEMPLOYMENT_CONFIG);
    const ctx: PromptContext = { dataset: facts.dataset, coverage: facts.coverage, facts, now: NOW, locale: 'en-IE' };
    const brief = readRequest("Hey, with the recession on everyone's mind, can you show me how joblessness changed in construction from 2007 through 2009? Would love something I can drop in a deck.", facts, { now: NOW });
    const prompt = nextPrompt(brief, ctx)!;
    expect(prompt.topic).toBe('metrics');
    const answered = readAnswer(prompt, 'count', brief, ctx);
    if (!answered.ok) throw new Error(answered.message);
    const done = withDefaults(answered.brief, briefDefaults(answered.brief, facts.dataset, facts.coverage));
    const plan = buildPlan(done, facts.dataset, facts.coverage);
    expect(plan.notCovered).toEqual([]);
    expect(plan.items.length).toBeGreaterThan(0);
    for (const item of plan.items) {
      expect(item.metrics).toEqual(['count']);
      expect(item.filters).toEqual([{ dimension: 'series', values: ['Construction'] }]);
      // Half-open: 1 January 2007 up to (not including) 1 January 2010.
      expect(item.window).toEqual({ start: '2007-01-01', end: '2010-01-01' });
      expect(item.launchDate).toBeUndefined();
    }
  });
});

describe('a brief that holds no question of its own', () => {
  it('keeps its period and comparison through the measure and values prompts, and into the plan', async () => {
    const facts = await publicFacts(UNEMPLOYMENT_CONFIG);
    const ctx: PromptContext = { dataset: facts.dataset, coverage: facts.coverage, facts, now: NOW, locale: 'en-IE' };
    const window = { start: '2008-01-01', end: '2009-01-01' };
    const compareWindow = { start: '2007-01-01', end: '2008-01-01' };
    const bare: Brief = { requestText: 'the figures for 2008 against 2007', questions: [], kinds: ['growth'], metrics: [], dimensions: [], unknownTerms: [], window, compareWindow };
    const metrics = readAnswer(nextPrompt(bare, ctx)!, 'rate', bare, ctx);
    if (!metrics.ok) throw new Error(metrics.message);
    expect(metrics.brief.questions).toEqual([expect.objectContaining({ metrics: ['rate'], window, compareWindow, kind: 'growth' })]);
    const values = { topic: 'values' as const, question: '', options: [{ value: JSON.stringify({ dimension: 'series', value: 'Construction' }), label: 'Construction (industry)' }], recommended: { value: JSON.stringify({ dimension: 'series', value: 'Construction' }), label: 'Construction (industry)', reason: '' }, many: true };
    const ambiguous: Brief = { ...bare, metrics: ['rate'], ambiguousValues: [{ text: 'construction', candidates: [{ dimension: 'series', value: 'Construction' }] }] };
    const picked = readAnswer(values, 'ok', ambiguous, ctx);
    if (!picked.ok) throw new Error(picked.message);
    expect(picked.brief.questions).toEqual([expect.objectContaining({ filters: [{ dimension: 'series', values: ['Construction'] }], window, compareWindow })]);
    const plan = buildPlan(picked.brief, facts.dataset, facts.coverage);
    expect(plan.items.length).toBeGreaterThan(0);
    for (const item of plan.items) {
      expect(item.filters).toEqual([{ dimension: 'series', values: ['Construction'] }]);
      expect(item.compareWindow).toEqual(compareWindow);
    }
  });
});
