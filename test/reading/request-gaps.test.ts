// Requests written for four reading gaps (issue 16), in several registers, on four datasets:
// the support-desk fixture (invented; ends 29 November 2024), the demo catalog (invented; ends
// 18 June 2025), Seattle weather and stocks from vega-datasets (public; 2012-2015 daily, 2000-2010
// monthly). Each expectation is what a person reading the request would take from it, not what
// the reader happened to give: a filter said once for the request reaches every question, two
// values of one breakdown set against each other are a contrast, a bare "volume" is said back
// or asked, and a period outside the data is asked about, not run on another period.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { briefToJson, type BriefJson } from '../../bot/reading/brief-json.js';
import { type DatasetFacts, readRequest } from '../../bot/reading/read-request.js';
import { exampleFacts } from '../helpers/example-facts.js';
import { publicFacts, STOCKS_CONFIG } from './public-data.js';

const here = dirname(new URL(import.meta.url).pathname);
const TICKETS_CONFIG = join(here, '../fixtures/datasets/support-desk/ledgerlark.yaml');
const vega = join(dirname(dirname(createRequire(import.meta.url).resolve('vega-datasets'))), 'data');
const weatherConfig = join(mkdtempSync(join(tmpdir(), 'tc-gaps-')), 'weather.yaml');
// The config `threadcount init` drafts for seattle-weather.csv, unedited.
writeFileSync(
  weatherConfig,
  `version: 1
datasets:
  - name: seattle_weather
    label: Seattle weather
    source: { kind: csv, paths: [${join(vega, 'seattle-weather.csv')}] }
    time_column: date
    timezone: UTC
    metrics:
      - { name: rows, label: Rows, count: rows, unit: count, higher_is_better: true, kind: flow }
      - { name: precipitation, label: Precipitation, sum: precipitation, unit: number, higher_is_better: true, kind: flow }
      - { name: temp_max, label: Temp max, average: temp_max, unit: number, higher_is_better: true, kind: level }
      - { name: wind, label: Wind, average: wind, unit: number, higher_is_better: true, kind: level }
    dimensions:
      - { name: weather, label: Weather, column: weather }
`,
);

type Data = 'tickets' | 'demo' | 'weather' | 'stocks' | 'demoNoVolume';
const facts = {} as Record<Data, DatasetFacts>;
const NOW: Record<Data, Date> = {
  tickets: new Date('2024-12-02T10:00:00Z'),
  demo: new Date('2025-06-20T09:00:00Z'),
  demoNoVolume: new Date('2025-06-20T09:00:00Z'),
  weather: new Date('2026-12-05T01:00:00Z'),
  stocks: new Date('2026-12-05T01:00:00Z'),
};

beforeAll(async () => {
  facts.tickets = await publicFacts(TICKETS_CONFIG);
  facts.weather = await publicFacts(weatherConfig);
  facts.stocks = await publicFacts(STOCKS_CONFIG);
  facts.demo = exampleFacts;
  // The demo catalog as a newcomer might write it: bookings not also called "volume", so a bare
  // "volume" could be bookings, passengers or customers.
  facts.demoNoVolume = {
    ...exampleFacts,
    dataset: { ...exampleFacts.dataset, metrics: exampleFacts.dataset.metrics.map((m) => ({ ...m, synonyms: m.synonyms.filter((s) => !/volume/.test(s)) })) },
  };
}, 120_000);

const read = (data: Data, text: string): BriefJson => briefToJson(readRequest(text, facts[data], { now: NOW[data], locale: 'en-GB' }), facts[data].dataset.name);

type Check = (b: BriefJson) => void;
/** Every question is restricted to these values (and no question drops the filter). */
const filteredEverywhere = (dimension: string, values: string[], exclude = false): Check => (b) => {
  expect(b.questions.length).toBeGreaterThanOrEqual(1);
  for (const q of b.questions) expect(q.filters).toContainEqual({ dimension, values, ...(exclude ? { exclude: true } : {}) });
};
/** Two values of one breakdown set against each other. */
const contrasted = (dimension: string, values: string[]): Check => (b) => {
  const c = b.questions.map((q) => q.contrast).find((x) => x !== null);
  expect(c?.dimension).toBe(dimension);
  expect([...(c?.values ?? [])].sort()).toEqual([...values].sort());
};
/** Read as one metric, with the reading said back on the card. */
const volumeSaidBack = (metric: string, words: RegExp): Check => (b) => {
  expect(b.questions.flatMap((q) => q.metrics)).toContain(metric);
  expect(b.saidBack.join(' ')).toMatch(words);
};
const volumeStated = (metric: string): Check => (b) => {
  expect(b.questions.flatMap((q) => q.metrics)).toContain(metric);
  expect(b.saidBack.join(' ')).not.toMatch(/volume/i);
};
const measureAsked: Check = (b) => {
  expect(b.toAsk).toContain('metrics');
};
/** A period outside the data: the range said back, a window asked for, no window run in its place. */
const windowAsked = (range: RegExp): Check => (b) => {
  expect(b.toAsk).toContain('window');
  expect(b.saidBack.join(' ')).toMatch(range);
  for (const q of b.questions) expect(q.window).toBeNull();
};

type Case = [Data, string, Check];

// 1. A filter said once for the request reaches every question.
export const FILTER_CASES: Case[] = [
  ['tickets', 'For email tickets, how have volumes moved this year and which teams handle most of them?', filteredEverywhere('channel', ['email'])],
  ['tickets', "for urgent tickets - how's resolution time trending, and which product areas are worst?", filteredEverywhere('priority', ['urgent'])],
  ['tickets', 'Looking only at enterprise customers: how has satisfaction changed since last year, and which channels do they use most?', filteredEverywhere('customer_tier', ['enterprise'])],
  ['tickets', 'Just the Billing team please. Tickets by month, and how has first response time changed?', filteredEverywhere('team', ['Billing'])],
  ['tickets', 'on phone tickets: whats the reopen rate doing, also which priorities get reopened most', filteredEverywhere('channel', ['phone'])],
  ['demo', 'For app bookings, how has revenue moved month by month and which routes bring in the most?', filteredEverywhere('channel', ['app'])],
  ['demo', "Excluding kiosk, what's the revenue trend and which fare classes grew fastest?", filteredEverywhere('channel', ['kiosk'], true)],
  ['demo', 'For car bookings, how did revenue do this year? And which routes carried the most passengers?', filteredEverywhere('fare_class', ['car'])],
  ['weather', 'On rainy days, how has wind changed over the years and what is the typical max temp by month?', filteredEverywhere('weather', ['rain'])],
  // A question naming its own value of the same breakdown keeps it.
  ['tickets', 'For email tickets, how have volumes moved, and how do phone tickets split by team?', (b) => {
    expect(b.questions[0]!.filters).toEqual([{ dimension: 'channel', values: ['email'] }]);
    expect(b.questions[b.questions.length - 1]!.filters).toEqual([{ dimension: 'channel', values: ['phone'] }]);
  }],
];

// 2. Two values of one breakdown set against each other.
export const CONTRAST_CASES: Case[] = [
  ['tickets', 'How do email tickets compare with phone tickets?', contrasted('channel', ['email', 'phone'])],
  ['tickets', 'email vs phone tickets this year', contrasted('channel', ['email', 'phone'])],
  ['tickets', 'chat against web form - ticket volumes by month', contrasted('channel', ['chat', 'web form'])],
  ['tickets', 'Billing compared to Tech Support on satisfaction?', contrasted('team', ['Billing', 'Tech Support'])],
  ['tickets', 'Enterprise or business tier: which raises more tickets?', contrasted('customer_tier', ['enterprise', 'business'])],
  ['tickets', 'Could you compare urgent tickets against high priority ones, month by month please?', contrasted('priority', ['urgent', 'high'])],
  ['tickets', 'how r chat tickets doing compared w/ email', contrasted('channel', ['chat', 'email'])],
  ['demo', 'app vs web bookings this year', contrasted('channel', ['app', 'web'])],
  ['demo', 'How does revenue on the app compare to the web?', contrasted('channel', ['app', 'web'])],
  ['demo', 'phone or kiosk: which brings in more revenue?', contrasted('channel', ['phone', 'kiosk'])],
  ['demo', 'Car versus van bookings since January, please.', contrasted('fare_class', ['car', 'van'])],
  ['stocks', 'MSFT vs AAPL share price since 2005', contrasted('symbol', ['MSFT', 'AAPL'])],
  ['weather', 'temp max on rain days compared with sun days', contrasted('weather', ['rain', 'sun'])],
];

// 3. A bare "volume".
export const VOLUME_CASES: Case[] = [
  ['tickets', "what's our volume by month?", volumeSaidBack('tickets', /volume.*number of tickets/i)],
  ['tickets', 'volumes this year pls', volumeSaidBack('tickets', /volume.*number of tickets/i)],
  ['tickets', 'How has our volume trended since the summer?', volumeSaidBack('tickets', /volume.*number of tickets/i)],
  ['tickets', 'ticket volume by team', volumeStated('tickets')],
  ['demo', "what's our volume by month?", volumeStated('bookings')],
  ['demoNoVolume', "what's our volume by month?", measureAsked],
  ['demoNoVolume', 'Has volume picked up on the Saltreach route this year?', measureAsked],
  ['weather', 'volume by month', volumeSaidBack('rows', /volume.*number of rows/i)],
];

// 4. A period outside the data.
export const OUTSIDE_CASES: Case[] = [
  ['tickets', 'tickets in 2031', windowAsked(/September 2021 to 29 November 2024/)],
  ['tickets', 'How many tickets did we get in 2019, by channel?', windowAsked(/September 2021 to 29 November 2024/)],
  ['demo', 'sales in 2031', windowAsked(/2025/)],
  ['weather', 'How much rain fell in 2020?', windowAsked(/2012 to 31 December 2015/)],
  ['stocks', 'share prices in 2018 pls', windowAsked(/2000 to/)],
  // The impossible-date say-back stays, and runs on the month it names.
  ['tickets', 'tickets on 30 February 2023', (b) => {
    expect(b.saidBack.join(' ')).toMatch(/30 February 2023 is not a real date/);
    expect(b.toAsk).not.toContain('window');
    expect(b.questions[0]!.window).toEqual({ from: '2023-02-01', to: '2023-02-28' });
  }],
  // Partly inside the data: clipped to it, nothing to ask.
  ['tickets', 'tickets from 2024 to 2031', (b) => {
    expect(b.toAsk).not.toContain('window');
    expect(b.questions[0]!.window?.from).toBe('2024-01-01');
  }],
];

// Cases still read wrong for a reason outside the rule their group checks, named here so none is
// hidden: "rainy" is not matched to the value "rain".
const KNOWN_MISSES = new Set(['On rainy days, how has wind changed over the years and what is the typical max temp by month?']);

// The groups the reader answers right (each joins as its reading rule lands).
const READ_RIGHT: Record<string, Case[]> = {
  'a filter said once reaches every question': FILTER_CASES,
  'two values of one breakdown are set against each other': CONTRAST_CASES,
  'a period outside the data is asked about, not run on another': OUTSIDE_CASES,
  'a bare "volume" is said back, or asked when the data counts several things': VOLUME_CASES,
};

describe.each(Object.entries(READ_RIGHT))('reading gaps: %s', (_name, cases) => {
  it.each(cases.filter(([, text]) => !KNOWN_MISSES.has(text)).map(([data, text, check]) => ({ data, text, check })))('$data: $text', ({ data, text, check }) => {
    check(read(data, text));
  });
});

/** Every case of every group, for a look at how many read right (`npx vitest run -t "all gap cases"`). */
describe('all gap cases', () => {
  it('counts the cases read right', () => {
    const all = [...FILTER_CASES, ...CONTRAST_CASES, ...VOLUME_CASES, ...OUTSIDE_CASES];
    const right = all.filter(([data, text, check]) => { try { check(read(data, text)); return true; } catch { return false; } });
    // At least the groups that landed; the count is printed for the report.
    console.log(`gap cases read right: ${right.length} of ${all.length}`);
    expect(right.length).toBeGreaterThanOrEqual(Object.values(READ_RIGHT).flat().filter(([, text]) => !KNOWN_MISSES.has(text)).length);
  });
});

describe('`threadcount read` prints what the card says back', () => {
  it('a date no calendar has, said back in the JSON', async () => {
    const { readBrief } = await import('../../cli/read.js');
    const b = await readBrief({ configFile: TICKETS_CONFIG, text: 'tickets on 30 February 2023', now: NOW.tickets });
    expect(b.saidBack).toEqual(['30 February 2023 is not a real date, so I read it as February 2023.']);
  });
});

describe('through the bot (`threadcount ask`, real DuckDB): what the thread shows', () => {
  const converse = async (configFile: string, request: string, answers: string, now: Date) => {
    const { ask } = await import('../../cli/ask.js');
    const dir = mkdtempSync(join(tmpdir(), 'tc-gaps-ask-'));
    writeFileSync(join(dir, 'answers.yaml'), answers);
    const r = await ask({ configFile, request, answersFile: join(dir, 'answers.yaml'), outDir: join(dir, 'out'), now });
    return r.thread.thread.posts.filter((p) => p.author === 'threadcount');
  };
  const card = (posts: { text: string }[]) => posts.find((p) => p.text.startsWith('*Here is what I understood.*'))?.text ?? '';

  it('a year after the data is asked about with the data\'s range; the period chosen is the one run', async () => {
    const posts = await converse(TICKETS_CONFIG, 'how many tickets did we get in 2031, by channel?', 'window: "2023"\nplan: go\n', NOW.tickets);
    const prompt = posts.find((p) => p.promptTopic === 'window');
    expect(prompt?.text).toMatch(/The data runs from 1 September 2021 to 29 November 2024; 2031 is after it/);
    expect(prompt?.text).toMatch(/All the data/);
    expect(card(posts)).toMatch(/\*Period:\* January 1 to December 31, 2023/);
  }, 300_000);

  it('"last year" on data that ended years ago is asked about; the recommendation is the data\'s latest whole year, as relative periods count back from its end', async () => {
    const posts = await converse(STOCKS_CONFIG, 'how did share prices do last year?', 'plan: go\n', NOW.stocks);
    const prompt = posts.find((p) => p.promptTopic === 'window');
    expect(prompt?.text).toMatch(/last year \(1 January 2025 to 31 December 2025\) is after it/);
    // stocks.csv is stamped monthly to March 2010 (the file itself): its latest whole year is 2009.
    expect(prompt?.text).toMatch(/Recommended: \*2009 \(the data's latest year\)\*/);
    expect(card(posts)).toMatch(/\*Period:\* January 2009 to December 2009/);
  }, 300_000);

  it('two values set against each other are said as such on the card and head the plan', async () => {
    const posts = await converse(TICKETS_CONFIG, 'How do email tickets compare with phone tickets?', 'plan: go\n', NOW.tickets);
    expect(card(posts)).toMatch(/How email and phone compare in tickets/);
  }, 300_000);
});

describe('a bare "volume": on the card, or in the prompt', () => {
  it('the one count of the data is said back on the card', async () => {
    const { cardNotes } = await import('../../bot/replies.js');
    const brief = readRequest("what's our volume by month?", facts.tickets, { now: NOW.tickets });
    expect(cardNotes(brief, facts.tickets.dataset)).toContain('"volume" read as the number of tickets.');
  });

  it('several counts: the prompt names them and offers them first, taking none unasked', async () => {
    const { nextPrompt, readAnswer } = await import('../../bot/prompts.js');
    const f = facts.demoNoVolume;
    const ctx = { dataset: f.dataset, coverage: f.coverage, facts: f, now: NOW.demoNoVolume, locale: 'en-GB' };
    const brief = readRequest("what's our volume by month?", f, { now: NOW.demoNoVolume });
    const prompt = nextPrompt(brief, ctx)!;
    expect(prompt.topic).toBe('metrics');
    expect(prompt.question).toBe('"volume" could be counted as bookings or passengers in Skerrywake bookings. Which did you mean?');
    expect(prompt.options.slice(0, 2).map((o) => o.value)).toEqual(['bookings', 'passengers']);
    const answered = readAnswer(prompt, 'passengers', brief, ctx);
    expect(answered.ok && answered.brief.questions[0]!.metrics).toEqual(['passengers']);
    expect(answered.ok && nextPrompt(answered.brief, ctx)).toBeNull();
  });
});

describe('"email" the channel is not the requester\'s email', () => {
  it('a filter on email tickets refuses no personal data; a requester\'s email still is refused', () => {
    const b = read('tickets', 'For email tickets, how have volumes moved this year and which teams handle most of them?');
    expect(b.personalData).toEqual([]);
    expect(read('tickets', 'tickets by requester email').personalData).toEqual(['requester_email']);
    expect(read('tickets', 'show their email addresses').personalData).toEqual(['requester_email']);
  });
});
