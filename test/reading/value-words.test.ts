// How the words of a request are matched to the data's values and breakdowns, on two open datasets
// the reader was never tuned to (vega-datasets: birdstrikes.csv, FAA wildlife strike reports
// 1990-2002; flights-20k.json, US domestic flights January to March 2001) and on the demo catalog.
// The configs are the ones a newcomer wrote for them by hand from `threadcount init`'s draft. Each
// expectation is what a person reading the request would take from it, written before the reader
// was changed: "from LAX to SFO" is an origin and a destination, "day to day" is no airport, "large
// wildlife" is the wildlife size, a mistyped "species" is still the species breakdown, "by day of
// week" asks for the weekday pattern.
import { beforeAll, describe, expect, it } from 'vitest';
import type { Brief } from '../../bot/brief.js';
import { briefDefaults, withDefaults } from '../../bot/brief-defaults.js';
import { buildPlan } from '../../bot/plan.js';
import { briefToJson, type BriefJson } from '../../bot/reading/brief-json.js';
import { changesSomething, readCorrection } from '../../bot/reading/corrections.js';
import { type DatasetFacts, readRequest } from '../../bot/reading/read-request.js';
import { exampleFacts } from '../helpers/example-facts.js';
import { publicFacts } from './public-data.js';
import { BIRDSTRIKES_CONFIG, FLIGHTS_CONFIG } from './open-data-configs.js';

type Data = 'flights' | 'birdstrikes' | 'demo';
const facts = {} as Record<Data, DatasetFacts>;
const NOW: Record<Data, Date> = {
  flights: new Date('2026-12-05T01:00:00Z'),
  birdstrikes: new Date('2026-12-05T01:00:00Z'),
  demo: new Date('2025-06-20T09:00:00Z'),
};

beforeAll(async () => {
  facts.flights = await publicFacts(FLIGHTS_CONFIG);
  facts.birdstrikes = await publicFacts(BIRDSTRIKES_CONFIG);
  facts.demo = exampleFacts;
}, 120_000);

interface Reading {
  json: BriefJson;
  brief: Brief;
  data: Data;
}
const read = (data: Data, text: string): Reading => {
  const brief = readRequest(text, facts[data], { now: NOW[data], locale: 'en-GB' });
  return { json: briefToJson(brief, facts[data].dataset.name), brief, data };
};

type Check = (r: Reading) => void;
const sorted = (b: BriefJson) =>
  b.questions.flatMap((q) => q.filters).map((f) => ({ ...f, values: [...f.values].sort() })).sort((x, y) => x.dimension.localeCompare(y.dimension));
/** Exactly these filters, over all questions, and nothing left to ask about values. */
const filters = (...want: [string, string[], boolean?][]): Check => ({ json }) => {
  expect(sorted(json)).toEqual(want.map(([dimension, values, exclude]) => ({ dimension, values: [...values].sort(), ...(exclude ? { exclude: true } : {}) })).sort((x, y) => x.dimension.localeCompare(y.dimension)));
  expect(json.ambiguousValues).toEqual([]);
};
/** No value read as a filter, none asked about. */
const noValue: Check = ({ json }) => {
  expect(json.questions.flatMap((q) => q.filters)).toEqual([]);
  expect(json.ambiguousValues).toEqual([]);
};
/** The words stand for values of several breakdowns: asked, not pooled into one filter. */
const asked = (words: string): Check => ({ json }) => {
  expect(json.ambiguousValues.map((a) => a.text.toLowerCase())).toContain(words.toLowerCase());
  for (const f of json.questions.flatMap((q) => q.filters)) expect(f.values.length).toBe(1);
};
/** Broken down by this dimension. */
const breakdown = (dimension: string): Check => ({ json }) => {
  expect(json.questions.flatMap((q) => q.dimensions)).toContain(dimension);
};
/** The plan answers how the days of the week differ (the time-pattern item, which reads weekdays on daily data). */
const weekdayPattern: Check = ({ brief, data }) => {
  const f = facts[data];
  const plan = buildPlan(withDefaults(brief, briefDefaults(brief, f.dataset, f.coverage)), f.dataset, f.coverage);
  expect(plan.items.map((i) => i.template)).toContain('trend_seasonality');
};
const all = (...checks: Check[]): Check => (r) => {
  for (const c of checks) c(r);
};

type Case = [Data, string, Check];

// 1. "from X to Y": X in the from-like breakdown, Y in the to-like one; asked when it cannot tell.
export const ROUTE_CASES: Case[] = [
  ['flights', 'How many flights went from LAX to SFO each week?', filters(['origin', ['LAX']], ['destination', ['SFO']])],
  ['flights', 'average delay on flights from ORD to ATL by month', filters(['origin', ['ORD']], ['destination', ['ATL']])],
  ['flights', 'LAX to SFO delays, weekly', filters(['origin', ['LAX']], ['destination', ['SFO']])],
  ['flights', 'flights LAX→SFO per week', filters(['origin', ['LAX']], ['destination', ['SFO']])],
  ['flights', 'how late are flights into SFO from LAX?', filters(['origin', ['LAX']], ['destination', ['SFO']])],
  ['flights', 'flights between DFW and ORD per week', filters(['origin', ['DFW']], ['destination', ['ORD']])],
  ['flights', 'weekly flights out of DFW', filters(['origin', ['DFW']])],
  ['flights', 'avg delay for flights arriving at SEA', filters(['destination', ['SEA']])],
  // Nothing says which end: asked, never pooled into "SAN or SEA" of one breakdown.
  ['flights', 'delays at SAN vs SEA by week', asked('SAN')],
  // Both ends in one breakdown (a route): the value that joins them.
  ['demo', 'bookings from Mainland to Saltreach by month', filters(['route', ['Mainland–Saltreach']])],
];

// 2. An everyday word in lower case is not a code of the data; in capitals, quoted or after its breakdown's word it is.
export const EVERYDAY_CASES: Case[] = [
  ['flights', 'how have flight numbers moved day to day since January?', noValue],
  ['flights', "what's the average delay by day?", noValue],
  ['flights', 'split the average delay by day of week please', noValue],
  ['flights', 'flights to DAY each week', filters(['destination', ['DAY']])],
  ['flights', 'average delay for flights from DAY', filters(['origin', ['DAY']])],
  ['flights', 'weekly flights into destination airport day', filters(['destination', ['DAY']])],
  ['flights', 'how did average delay move in march?', noValue],
  ['birdstrikes', 'strikes by day of week', noValue],
  ['birdstrikes', 'how many strikes happen a day on average?', noValue],
  ['birdstrikes', 'strikes at night by year', filters(['time_of_day', ['Night']])],
  ['birdstrikes', 'Night vs day: how do strike numbers compare?', ({ json }) => {
    const named = [...json.questions.flatMap((q) => q.filters.filter((f) => f.dimension === 'time_of_day').flatMap((f) => f.values)), ...json.questions.flatMap((q) => q.contrast?.dimension === 'time_of_day' ? q.contrast.values : [])];
    expect(new Set(named)).toEqual(new Set(['Night', 'Day']));
  }],
  ['birdstrikes', 'total cost in new york by year', filters(['origin_state', ['New York']])],
  ['demo', 'how have bookings moved day to day this year?', noValue],
];

// 3. A whole value of one breakdown beats part of a longer value of another.
export const WHOLE_VALUE_CASES: Case[] = [
  ['birdstrikes', 'How many strikes involving large wildlife happened in Texas each year?', filters(['wildlife_size', ['Large']], ['origin_state', ['Texas']])],
  ['birdstrikes', 'strikes involving large wildlife in Texas', filters(['wildlife_size', ['Large']], ['origin_state', ['Texas']])],
  ['birdstrikes', 'small birds hitting planes during climb, by year', filters(['wildlife_size', ['Small']], ['phase_of_flight', ['Climb']])],
  ['birdstrikes', 'total cost of strikes with medium damage by year', filters(['effect_amount_of_damage', ['Medium']])],
  ['birdstrikes', 'strikes of medium sized birds by year', filters(['wildlife_size', ['Medium']])],
];

// 4. A breakdown's word is found through typos nearby, and one it cannot place is said back.
export const TYPO_CASES: Case[] = [
  ['birdstrikes', 'wich species cuase the most damge costs?', breakdown('wildlife_species')],
  ['birdstrikes', 'which speceis cost the most?', breakdown('wildlife_species')],
  ['birdstrikes', 'break the costs down by wildlife species', breakdown('wildlife_species')],
  ['birdstrikes', 'strikes per speices, by year', breakdown('wildlife_species')],
  ['flights', 'whcih origin airprots have the worst delays?', breakdown('origin')],
];

// 5. The days of the week compared: the weekday pattern, on daily-stamped data.
export const WEEKDAY_CASES: Case[] = [
  ['flights', 'which day of the week has the longest average delays?', weekdayPattern],
  ['flights', 'split the average delay by day of week please', weekdayPattern],
  ['flights', 'which weekday has the most flights?', weekdayPattern],
  ['flights', 'flights by weekday', weekdayPattern],
  ['birdstrikes', 'which day of the week do most strikes happen on?', weekdayPattern],
  ['birdstrikes', 'strikes by day of week', weekdayPattern],
  ['demo', 'bookings by day of week', weekdayPattern],
  ['demo', 'which weekday is busiest for bookings?', weekdayPattern],
];

// The groups the reader answers right (each joins as its rule lands).
const READ_RIGHT: Record<string, Case[]> = {
  'an everyday word in lower case is not a code of the data': EVERYDAY_CASES,
  'a whole value beats part of a longer one': WHOLE_VALUE_CASES,
  'from X to Y is an origin and a destination': ROUTE_CASES,
  'a breakdown word is found through typos nearby': TYPO_CASES,
  'the days of the week compared': WEEKDAY_CASES,
};

describe.each(Object.entries(READ_RIGHT))('value words: %s', (_name, cases) => {
  it.each(cases.map(([data, text, check]) => ({ data, text, check })))('$data: $text', ({ data, text, check }) => {
    check(read(data, text));
  });
});

/** Every case of every group, for a look at how many read right (`npx vitest run test/reading/value-words.test.ts -t "all value cases"`). */
describe('all value cases', () => {
  it('counts the cases read right', () => {
    const every = [...ROUTE_CASES, ...EVERYDAY_CASES, ...WHOLE_VALUE_CASES, ...TYPO_CASES, ...WEEKDAY_CASES];
    const wrong = every.filter(([data, text, check]) => {
      try {
        check(read(data, text));
        return false;
      } catch {
        return true;
      }
    });
    console.log(`value cases read right: ${every.length - wrong.length} of ${every.length}\n${wrong.map(([d, t]) => `  wrong: ${d}: ${t}`).join('\n')}`);
    expect(every.length - wrong.length).toBeGreaterThanOrEqual(Object.values(READ_RIGHT).flat().length);
  });
});

// 6. A follow-up naming only a value reruns the last brief with it: the value takes the breakdown
// the brief already restricts when several hold it (origin or destination).
describe('a follow-up that names only a value', () => {
  const followUp = (data: Data, first: string, then: string) => {
    const brief = readRequest(first, facts[data], { now: NOW[data], locale: 'en-GB' });
    return readCorrection(then, facts[data], NOW[data], 'en-GB', brief);
  };
  it.each([
    ['flights', 'Weekly number of flights out of DFW', 'same for ORD', 'origin', 'ORD'],
    ['flights', 'average delay of flights into SFO by week', 'and for LAX?', 'destination', 'LAX'],
    ['birdstrikes', 'strikes in California by year', 'and for Texas?', 'origin_state', 'Texas'],
    ['demo', 'bookings on the app by month', 'what about the web channel', 'channel', 'web'],
  ] as [Data, string, string, string, string][])('%s: "%s", then "%s"', (data, first, then, dimension, value) => {
    const c = followUp(data, first, then);
    expect(changesSomething(c)).toBe(true);
    expect(c.filters).toContainEqual({ dimension, values: [value] });
  });
  it('a value both ends hold, after a brief restricting neither, is not placed on a guess', () => {
    const c = followUp('flights', 'weekly flights', 'same for ORD');
    expect(c.filters).toEqual([]);
  });
});
