// From a request on public data (vega-datasets' US unemployment by industry, test/reading/public-data.ts)
// to the plan the requester agrees: what the request restricted (an industry, a stretch of years)
// holds in every item after the measure prompt is answered, and a brief with no question of its
// own keeps its period through any answer.
import { describe, expect, it } from 'vitest';
import type { Brief } from '../../bot/brief.js';
import { briefDefaults, withDefaults } from '../../bot/brief-defaults.js';
import { buildPlan } from '../../bot/plan.js';
import { nextPrompt, readAnswer, STOP_HERE, type PromptContext } from '../../bot/prompts.js';
import { readRequest } from '../../bot/reading/read-request.js';
import { NOW, publicFacts, STOCKS_CONFIG, UNEMPLOYMENT_CONFIG } from '../reading/public-data.js';

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

describe('the measure prompt for a measure the data lacks', () => {
  const ask = async (config: string, text: string) => {
    const facts = await publicFacts(config);
    const ctx: PromptContext = { dataset: facts.dataset, coverage: facts.coverage, facts, now: NOW, locale: 'en-IE' };
    const brief = readRequest(text, facts, { now: NOW });
    return { brief, ctx, prompt: nextPrompt(brief, ctx)! };
  };

  it('says plainly there is none, and recommends stopping rather than a row count', async () => {
    for (const [config, text, missing] of [
      [STOCKS_CONFIG, 'Show me trading volume by ticker per month', 'trading volume'],
      [UNEMPLOYMENT_CONFIG, 'What was the average hourly wage by sector last year?', 'average hourly wage'],
    ] as const) {
      const { prompt, brief, ctx } = await ask(config, text);
      expect(prompt.topic).toBe('metrics');
      expect(prompt.question).toMatch(new RegExp(`^I don't have a metric called "${missing}": nothing in [^.]+ measures it\\.`));
      expect(prompt.recommended).toMatchObject(STOP_HERE);
      expect(prompt.recommended.reason).toContain(`no measure of "${missing}"`);
      // "ok" takes it: the request stops (the conversation says it is cancelled), nothing stands in.
      expect(readAnswer(prompt, 'ok', brief, ctx)).toEqual({ ok: true, brief, stop: true });
    }
  });

  it('recommends leaving it out when the request names a measure the data has too, and keeps that one', async () => {
    const { brief, ctx, prompt } = await ask(STOCKS_CONFIG, 'share price and trading volume for AAPL');
    expect(prompt.recommended.label).toBe('Leave it out');
    const read = readAnswer(prompt, 'ok', brief, ctx);
    if (!read.ok) throw new Error(read.message);
    expect(read.brief.questions[0]).toMatchObject({ metrics: ['price'], filters: [{ dimension: 'symbol', values: ['AAPL'] }] });
    expect(read.brief.unknownTerms).toEqual([]);
    expect(nextPrompt(read.brief, ctx)).toBeNull();
  });
});
