// Requests a newcomer typed on two public datasets (vega-datasets' stocks and US unemployment by
// industry, see public-data.ts), each one the reader once answered as a different question. The
// dates each check expects are the calendar's; the data's span is the files' own (BLS: January
// 2000 to February 2010; stocks: January 2000 to March 2010).
import { describe, expect, it } from 'vitest';
import { readRequest } from '../../bot/reading/read-request.js';
import { cardNotes } from '../../bot/replies.js';
import { NOW, publicFacts, readStocks, readUnemployment, STOCKS_CONFIG, UNEMPLOYMENT_CONFIG } from './public-data.js';

describe('a period with two ends is the period a change is asked over, not the date of an event', () => {
  it('"how joblessness changed in construction from 2007 through 2009", with a preamble and a closing line', async () => {
    const b = await readUnemployment("Hey, with the recession on everyone's mind, can you show me how joblessness changed in construction from 2007 through 2009? Would love something I can drop in a deck.");
    // One question: the closing line asks for a format, not a second question about a fall.
    expect(b.questions).toHaveLength(1);
    const q = b.questions[0]!;
    expect(q).toMatchObject({ kind: 'growth', launchDate: null, window: { from: '2007-01-01', to: '2009-12-31' }, filters: [{ dimension: 'series', values: ['Construction'] }] });
  });

  it.each([
    'Could you show how the number of unemployed rose in manufacturing between 2008 and 2009?',
    'Given the downturn, how did the unemployment rate change in Construction between 2007 and 2009? Happy to drop this in my slides.',
    'Was there a rise in unemployment in Finance from 2003 to 2005?',
  ])('%s', async (text) => {
    const b = await readUnemployment(text);
    expect(b.questions).toHaveLength(1);
    expect(b.questions[0]!.launchDate).toBeNull();
    expect(b.questions[0]!.kind).toBe('growth');
    expect(b.questions[0]!.window).not.toBeNull();
  });

  it('still dates an event: a change on one day, a launch at the start of a stretch', async () => {
    expect((await readUnemployment('the rate changed on 1 March 2008 - did unemployment go up after?')).questions[0]!.launchDate).toBe('2008-03-01');
  });
});

describe('two years named outright are the comparison, the later one the current', () => {
  it('"year over year, 2005 vs 2006" sets 2006 against 2005, not 2005 against 2004', async () => {
    const b = await readStocks('Need by Friday for the board: how did stock prices move year over year, 2005 vs 2006?');
    expect(b.questions).toHaveLength(1);
    expect(b.questions[0]).toMatchObject({ metrics: ['price'], window: { from: '2006-01-01', to: '2006-12-31' }, compareWindow: { from: '2005-01-01', to: '2005-12-31' } });
  });

  it.each([
    ['Share prices yoy please, 2003 versus 2004', '2004', '2003'],
    ['How did the stock price do in 2007 compared with 2008?', '2008', '2007'],
    ['Compare AAPL vs IBM price, 2008 against 2007', '2008', '2007'],
    ['prices y/y: 2001 against 2002, for the exec team', '2002', '2001'],
  ])('%s', async (text, current, base) => {
    const q = (await readStocks(text)).questions[0]!;
    expect(q.window).toEqual({ from: `${current}-01-01`, to: `${current}-12-31` });
    expect(q.compareWindow).toEqual({ from: `${base}-01-01`, to: `${base}-12-31` });
  });
});

describe('a measure the data lacks is said back, never swapped for one it has', () => {
  it('"trading volume" on monthly prices is not a count of rows', async () => {
    const b = await readStocks('Show me trading volume by ticker per month');
    expect(b.questions[0]!.metrics).toEqual([]);
    expect(b.unknownTerms.map((u) => u.text)).toEqual(['trading volume']);
    expect(b.toAsk).toContain('metrics');
  });

  it('"the average hourly wage by sector" on unemployment data is a measure it lacks', async () => {
    const b = await readUnemployment('What was the average hourly wage by sector last year?');
    expect(b.unknownTerms.map((u) => u.text)).toEqual(['average hourly wage']);
    expect(b.questions[0]!.dimensions).toEqual(['series']);
    expect(b.toAsk).toContain('metrics');
  });

  it.each([
    [readStocks, "what's the trade volume for AAPL in 2008?"],
    [readUnemployment, 'median weekly earnings by industry in 2009'],
    [readUnemployment, 'average salary per sector, 2008 vs 2009'],
  ] as const)('%#: %s', async (read, text) => {
    const b = await read(text);
    expect(b.questions.flatMap((q) => q.metrics)).toEqual([]);
    expect(b.unknownTerms.length).toBeGreaterThan(0);
    expect(b.toAsk).toContain('metrics');
  });
});

describe('a day no calendar has, and a period outside the data, are said back', () => {
  const brief = async (config: string, text: string) => readRequest(text, await publicFacts(config), { now: NOW });

  it('"30 February 2008" is not a real date: read as February 2008, and said so', async () => {
    const b = await brief(UNEMPLOYMENT_CONFIG, 'unemployment in Construction for 30 February 2008');
    expect(b.questions[0]!.window).toEqual({ start: '2008-02-01', end: '2008-03-01' });
    expect(b.saidBack).toEqual(['30 February 2008 is not a real date, so I read it as February 2008.']);
  });

  it.each(['jobless rate in Finance on 31 April 2009', 'what was AAPL on February 30th, 2007?'])('%s', async (text) => {
    const b = await brief(/AAPL/.test(text) ? STOCKS_CONFIG : UNEMPLOYMENT_CONFIG, text);
    expect(b.saidBack).toEqual([expect.stringMatching(/is not a real date, so I read it as (?:April 2009|February 2007)\.$/)]);
  });

  it('"GOOG\'s price in February 2031" is after the data, and said so with the data\'s span', async () => {
    const b = await brief(STOCKS_CONFIG, "What was GOOG's price in February 2031?");
    // stocks.csv runs from January 2000 to March 2010, one price a month.
    expect(b.saidBack).toEqual(['The data runs from January 2000 to March 2010; February 2031 is after it, so there is nothing to answer for it.']);
    // The brief card says it, among its notes.
    expect(cardNotes(b, (await publicFacts(STOCKS_CONFIG)).dataset)).toContain(b.saidBack![0]);
    const before = await brief(UNEMPLOYMENT_CONFIG, 'construction unemployment in 1995 vs 1996');
    expect(before.saidBack).toEqual(expect.arrayContaining([expect.stringMatching(/^The data runs from January 2000 to February 2010; 1995 is before it/)]));
    expect((await brief(STOCKS_CONFIG, 'MSFT price in March 2009')).saidBack).toBeUndefined();
  });
});

describe('a period outside the data, once a period is chosen instead, is no longer said on the card', () => {
  it.each(["What was GOOG's price in February 2031?", 'how did prices this year compare with last year?'])('%s', async (text) => {
    const { nextPrompt, readAnswer } = await import('../../bot/prompts.js');
    const f = await publicFacts(STOCKS_CONFIG);
    const ctx = { dataset: f.dataset, coverage: f.coverage, facts: f, now: NOW, locale: 'en-GB' };
    const b = readRequest(text, f, { now: NOW });
    // stocks.csv ends in March 2010: the period asked is outside it, said in the window prompt.
    const prompt = nextPrompt(b, ctx)!;
    expect(prompt.topic).toBe('window');
    expect(prompt.question).toMatch(/(?:is|are) after it, so there is nothing to answer for (?:it|them)/);
    const answered = readAnswer(prompt, '2009', b, ctx);
    if (!answered.ok) throw new Error(answered.message);
    expect(answered.brief.questions[0]!.window).toEqual({ start: '2009-01-01', end: '2010-01-01' });
    // The card shows the period answered, not the period the prompt already said was outside the data.
    expect(cardNotes(answered.brief, f.dataset).join(' ')).not.toMatch(/nothing to answer for/);
  });
});

describe('a word that looks like a value the reader cannot match never vanishes', () => {
  const brief = async (text: string) => readRequest(text, await publicFacts(STOCKS_CONFIG), { now: NOW });

  it('"amazn and microsfot prices": both are said back, not only the second', async () => {
    const b = await brief('amazn and microsfot prices quartely pls');
    expect(b.unknownTerms.map((u) => u.text)).toEqual(expect.arrayContaining(['amazn', 'microsfot']));
    expect(b.toAsk).toContain('values');
  });

  it.each([
    ["Hi! could you take a look at how Apple's share price did over the years?", 'apple'],
    ["how has Amazon's stock price done since 2005", 'amazon'],
    ['googl or amazn share price trend', 'googl'],
  ])('%s', async (text, word) => {
    const b = await brief(text);
    expect(b.unknownTerms.map((u) => u.text)).toContain(word);
  });
});
