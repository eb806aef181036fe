// Events named as a time that the data cannot date ("in the recession", "during the strike"): never
// dropped silently nor taken for a value the data lacks. With no other period named, the bot asks
// for the event's dates (a typed range works as the answer); beside a period that was named, the
// card says the event was not dated and which period runs. And a whole year named as the compared
// period ("vs 2007") is all of that year on the card and in the SQL: checked against the test's own
// DuckDB SQL over vega-datasets' unemployment-across-industries.json (US BLS, public data the
// reader was never tuned to; test/reading/public-data.ts).
import { DuckDBInstance } from '@duckdb/node-api';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../analysis/answer-sub-question.js';
import type { GrowthPeriodsFinding } from '../../analysis/findings/growth.js';
import { SUB_QUESTIONS } from '../../analysis/sub-questions/registry.js';
import { openWorkspace, type Workspace } from '../../analysis/workspace.js';
import { loadConfig } from '../../config/load.js';
import type { Brief } from '../../bot/brief.js';
import { planFor } from '../../bot/card-edits.js';
import { buildCard, cardText } from '../../bot/card.js';
import { presentContext } from '../../bot/present-answer.js';
import { nextPrompt, readAnswer, type PromptContext } from '../../bot/prompts.js';
import { type DatasetFacts, readRequest } from '../../bot/reading/read-request.js';
import { NOW, publicFacts, UNEMPLOYMENT_CONFIG } from './public-data.js';

const jsonFile = join(dirname(dirname(createRequire(import.meta.url).resolve('vega-datasets'))), 'data', 'unemployment-across-industries.json');

let facts: DatasetFacts;
let ctx: PromptContext;
beforeAll(async () => {
  facts = await publicFacts(UNEMPLOYMENT_CONFIG);
  ctx = { dataset: facts.dataset, coverage: facts.coverage, facts, now: NOW, locale: 'en-IE' };
});

const read = (text: string) => readRequest(text, facts, { now: NOW });

describe('an event named as the period, with no dates of its own, is asked about', () => {
  // Several wordings, most not written with the code in mind: the verb, the preposition and the event vary.
  const asked: [string, string][] = [
    ['Which industries were hit hardest in the recession vs 2007?', 'the recession'],
    ['How did jobless numbers move during the strike?', 'the strike'],
    ['what happened to the unemployment rate after the merger', 'the merger'],
    ['Show me unemployment by industry throughout the pandemic please', 'the pandemic'],
    ['were construction jobless counts worse during our loyalty promo?', 'the loyalty promo'],
    ['How did unemployment change since the financial crisis', 'the financial crisis'],
    ['any idea how the jobless rate held up over the lockdown?', 'the lockdown'],
  ];
  for (const [text, event] of asked) {
    it(`"${text}": "${event}" is asked about, never a value the data lacks`, () => {
      const brief = read(text);
      expect(brief.undatedEvents).toEqual([event]);
      expect(brief.toAsk).toContain('window');
      expect(brief.window).toBeUndefined();
      expect(brief.questions.every((q) => q.window === undefined)).toBe(true);
      expect(brief.unknownTerms.map((u) => u.text).filter((t) => event.includes(t))).toEqual([]);
    });
  }

  it('the prompt names the event and takes typed dates as the answer ("Dec 2007 to Jun 2009")', () => {
    const brief = read('Which industries were hit hardest in the recession vs 2007? Use the unemployment count.');
    const prompt = nextPrompt(brief, ctx)!;
    expect(prompt.topic).toBe('window');
    expect(prompt.question).toMatch(/"the recession"/);
    // The default beside "vs 2007": the stretch after 2007 to the data's end (February 2010).
    expect(prompt.recommended.value).toBe('2008-01 to 2010-02');
    for (const typed of ['Dec 2007 to Jun 2009', 'December 2007 - June 2009', 'from 2007-12 to 2009-06']) {
      const answered = readAnswer(prompt, typed, brief, ctx);
      if (!answered.ok) throw new Error(answered.message);
      expect(answered.brief.window).toEqual({ start: '2007-12-01', end: '2009-07-01' });
      // The comparison named beside the event stays whole.
      expect(answered.brief.questions[0]!.compareWindow).toEqual({ start: '2007-01-01', end: '2008-01-01' });
      expect(answered.brief.saidBack?.join(' ')).toMatch(/"the recession" read as Dec 2007 to Jun 2009/);
    }
  });
});

describe('an event beside a period that was named is said back, never dropped', () => {
  it('"unemployment in 2009 during the pandemic": 2009 runs, and the card says the pandemic was not dated', () => {
    const brief = read('unemployment in 2009 during the pandemic');
    expect(brief.window).toEqual({ start: '2009-01-01', end: '2010-01-01' });
    expect(brief.toAsk ?? []).not.toContain('window');
    expect(brief.saidBack?.join(' ')).toMatch(/can't tell the dates of "the pandemic".*2009/);
  });

  it('an event that is no time ("with the recession on everyone\'s mind") is left alone', () => {
    const brief = read("With the recession on everyone's mind, how did joblessness change in construction from 2007 through 2009?");
    expect(brief.undatedEvents).toBeUndefined();
    expect(brief.window).toEqual({ start: '2007-01-01', end: '2010-01-01' });
  });

  it('a calendar period is never an event: "in winter", "during Q3 2008", "since March 2009"', () => {
    for (const text of ['unemployment in winter 2009', 'jobless count during Q3 2008', 'unemployment rate since March 2009']) {
      const brief = read(text);
      expect(brief.undatedEvents).toBeUndefined();
      expect(brief.window).toBeDefined();
    }
  });
});

describe('a whole year named as the compared period is all of it, on the card and in the SQL', () => {
  let ws: Workspace;
  let sumOf: (from: string, to: string) => Promise<number>;
  let instance: DuckDBInstance;
  beforeAll(async () => {
    ws = await openWorkspace(loadConfig(UNEMPLOYMENT_CONFIG));
    instance = await DuckDBInstance.create(':memory:');
    const con = await instance.connect();
    // The test's own SQL over the JSON file: the unemployed count summed over the dates asked.
    sumOf = async (from, to) => Number((await con.runAndReadAll(`SELECT sum(count) FROM read_json_auto('${jsonFile}') WHERE CAST(date AS DATE) >= DATE '${from}' AND CAST(date AS DATE) < DATE '${to}'`)).getRows()[0]![0]);
  });
  afterAll(async () => {
    await ws?.source.close();
    instance?.closeSync();
  });

  async function agreedBrief(request: string, period: string): Promise<Brief> {
    let brief = read(request);
    for (const answer of ['count', period]) {
      const prompt = nextPrompt(brief, ctx);
      if (!prompt) break;
      const r = readAnswer(prompt, prompt.topic === 'metrics' ? 'count' : answer, brief, ctx);
      if (!r.ok) throw new Error(r.message);
      brief = r.brief;
    }
    return brief;
  }

  it('"hit hardest in the recession vs 2007", answered "Dec 2007 to Jun 2009": the card, the SQL and the caption all use the whole of 2007', async () => {
    const brief = await agreedBrief('Which industries were hit hardest in the recession vs 2007?', 'Dec 2007 to Jun 2009');
    const { plan, defaults } = planFor(brief, facts.dataset, facts.coverage, []);
    const text = cardText(buildCard(brief, plan, { dataset: facts.dataset, coverage: facts.coverage, locale: 'en-IE', defaults }));
    expect(text).toMatch(/December 2007 to June 2009 against January 2007 to December 2007/);
    const item = plan.items.find((i) => i.template === 'growth_periods')!;
    expect(item).toBeDefined();
    const answer = await answerSubQuestion(item, ws);
    const f = answer.findings.find((x): x is GrowthPeriodsFinding => x.type === 'growth_periods')!;
    expect(f.prior).toEqual({ start: '2007-01-01', end: '2008-01-01' });
    expect(f.current).toEqual({ start: '2007-12-01', end: '2009-07-01' });
    // 578 days against 365: a total that adds up over days is compared per day, the plain totals kept beside.
    expect(f.perDay?.days).toEqual({ after: 578, before: 365 });
    expect(f.perDay!.totals.before).toBeCloseTo(await sumOf('2007-01-01', '2008-01-01'), 6);
    expect(f.perDay!.totals.after).toBeCloseTo(await sumOf('2007-12-01', '2009-07-01'), 6);
    expect(f.total.before).toBeCloseTo((await sumOf('2007-01-01', '2008-01-01')) / 365, 6);
    const caption = SUB_QUESTIONS.growth_periods.present(answer, presentContext(ws, 'managers')).caption;
    expect(caption).not.toMatch(/Jan 2007 to (?:Feb|Jun|Jul) 2007/);
    expect(caption).toMatch(/2007/);
  });

  it('"how does the jobless count compare with 2007?" (no period of its own: 2010 so far): 2007 stays whole, as the card says', async () => {
    const brief = read('how does the jobless count compare with 2007?');
    const { plan, defaults } = planFor(brief, facts.dataset, facts.coverage, []);
    const text = cardText(buildCard(brief, plan, { dataset: facts.dataset, coverage: facts.coverage, locale: 'en-IE', defaults }));
    expect(text).toMatch(/against January 2007 to December 2007/);
    const item = plan.items.find((i) => i.template === 'growth_periods')!;
    const answer = await answerSubQuestion(item, ws);
    const f = answer.findings.find((x): x is GrowthPeriodsFinding => x.type === 'growth_periods')!;
    expect(f.prior).toEqual({ start: '2007-01-01', end: '2008-01-01' });
    expect(f.perDay!.totals.before).toBeCloseTo(await sumOf('2007-01-01', '2008-01-01'), 6);
  });
});
