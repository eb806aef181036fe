// A request that asks which segments of a breakdown come first ("which species cause the most
// cost", "top 5 busiest origins and their share of all flights") is read as that ranking, in any
// register: terse, chatty, misspelt, a question or an order. Read on two open datasets of
// vega-datasets the reader was not tuned to (birdstrikes.csv, FAA wildlife strike reports
// 1990-2002; flights-20k.json, US domestic flights January to March 2001), with the configs a
// newcomer wrote by hand. The phrasings were written for this test, not taken from a log.
import { beforeAll, describe, expect, it } from 'vitest';
import { briefDefaults, withDefaults } from '../../bot/brief-defaults.js';
import type { Brief } from '../../bot/brief.js';
import { buildCard } from '../../bot/card.js';
import { buildPlan } from '../../bot/plan.js';
import { type DatasetFacts, readRequest } from '../../bot/reading/read-request.js';
import { BIRDSTRIKES_CONFIG, FLIGHTS_CONFIG } from './open-data-configs.js';
import { publicFacts } from './public-data.js';

let strikes: DatasetFacts;
let flights: DatasetFacts;
const NOW = new Date('2026-12-05T01:00:00Z');

beforeAll(async () => {
  strikes = await publicFacts(BIRDSTRIKES_CONFIG);
  flights = await publicFacts(FLIGHTS_CONFIG);
}, 120_000);

const read = (f: DatasetFacts, text: string): Brief => readRequest(text, f, { now: NOW, locale: 'en-GB' });
const planOf = (f: DatasetFacts, b: Brief) => buildPlan(withDefaults(b, briefDefaults(b, f.dataset, f.coverage)), f.dataset, f.coverage);

describe('"which X … the most Y" is a ranking of X by Y, and its answer heads the plan', () => {
  it.each([
    ['wich species cuase the most damge costs?', 'wildlife_species', 'cost_total'],
    ['Which speceis are resposible for the highest total costs?', 'wildlife_species', 'cost_total'],
    ['species with the biggest repair bills?', 'wildlife_species', 'cost_repair'],
    ['rank the specis by total cost please', 'wildlife_species', 'cost_total'],
    ['which phase costs us the most', 'phase_of_flight', 'cost_total'],
    ['hi - could you tell me which airport has had the most strikes? thanks!', 'airport_name', 'strikes'],
    ['what operator racks up the most repair costs', 'aircraft_airline_operator', 'cost_repair'],
    ['Show me the states with the fewest strikes', 'origin_state', 'strikes'],
  ])('%s', (text, dimension, metric) => {
    const f = /operator/.test(text) ? withOperator(strikes) : strikes;
    const b = read(f, text);
    expect(b.questions).toHaveLength(1);
    const q = b.questions[0]!;
    expect(q.ranking).toBe(true);
    expect(q.dimensions).toEqual([dimension]);
    expect(q.metrics).toContain(metric);
    const plan = planOf(f, b);
    // The first answer is the ranking of that breakdown by that measure, marked as the answer asked for.
    expect(plan.items[0]).toMatchObject({ template: 'segment_shares', dimension, metrics: [q.metrics[0]], answersAsked: true });
    // The card restates the ranking, not "how it moved over time".
    const card = buildCard(withDefaults(b, briefDefaults(b, f.dataset, f.coverage)), plan, cardContext(f, b));
    expect(card.questions[0]).toMatch(/^Which |^The top /);
    expect(card.questions[0]).not.toMatch(/moved|over time/);
  });

  it('a long request that breaks a measure down and then asks which segment costs the most', () => {
    const b = read(strikes, 'Could you break down the total cost of strikes by phase of flight…which phase costs us the most');
    expect(b.questions).toHaveLength(1);
    expect(b.questions[0]).toMatchObject({ ranking: true, dimensions: ['phase_of_flight'] });
    expect(planOf(strikes, b).items[0]).toMatchObject({ template: 'segment_shares', dimension: 'phase_of_flight', metrics: ['cost_total'], answersAsked: true });
  });

  it.each([
    // A superlative of time asks about the calendar, not a ranking of the breakdown.
    'strikes by airport, with the highest and lowest months marked',
    'how have strikes moved by phase of flight? which months are busiest?',
    'which months are busiest for strikes, by phase of flight',
    // No superlative at all.
    'total cost by species over time',
    'how has repair cost moved by phase of flight since 1995',
    // "at most", "most recent" are not rankings.
    'strikes by state, most recent year',
  ])('not a ranking: %s', (text) => {
    const b = read(strikes, text);
    expect(b.questions.some((q) => q.ranking)).toBe(false);
    expect(planOf(strikes, b).items.some((i) => i.answersAsked)).toBe(false);
  });
});

describe('"the fewest", "the least", "bottom N": a ranking from the smallest, and the card says so', () => {
  it.each([
    ['Which airports had the fewest strikes?', 'airport_name', 'strikes', null, /^Which airport has the fewest strikes/],
    ['which airports have the least strikes', 'airport_name', 'strikes', null, /^Which airport has the fewest strikes/],
    ['bottom 5 airports by strikes pls', 'airport_name', 'strikes', 5, /^The 5 airports with the fewest strikes/],
    ['the 10 airports with the fewest strikes', 'airport_name', 'strikes', 10, /^The 10 airports with the fewest strikes/],
    ['Which phase of flight has the lowest repair cost?', 'phase_of_flight', 'cost_repair', null, /^Which phase of flight has the least repair cost/],
    ['which species are the cheapest in repairs', 'wildlife_species', 'cost_repair', null, /^Which species has the least repair cost/],
    ['Could you list the states with the smallest number of strikes, please?', 'origin_state', 'strikes', null, /^Which state has the fewest strikes/],
  ] as const)('%s', (text, dimension, metric, limit, said) => {
    const b = read(strikes, text);
    expect(b.questions).toHaveLength(1);
    const q = b.questions[0]!;
    expect(q).toMatchObject({ ranking: true, rankOrder: 'lowest', dimensions: [dimension], metrics: [metric] });
    if (limit) expect(q.rankLimit).toBe(limit);
    // "fewest" is ordinary wording, never a value to look for.
    expect(b.unknownTerms).toEqual([]);
    const plan = planOf(strikes, b);
    expect(plan.items[0]).toMatchObject({ template: 'segment_shares', dimension, rankOrder: 'lowest', answersAsked: true });
    const card = buildCard(withDefaults(b, briefDefaults(b, strikes.dataset, strikes.coverage)), plan, cardContext(strikes, b));
    expect(card.questions[0]).toMatch(said);
    expect(card.questions[0]).not.toMatch(/\b(?:most|top|highest)\b/);
  });

  it.each(['top 5 airports by strikes', 'which airport has the most strikes', 'what is the bottom line on strikes by state'])('no order from the smallest: %s', (text) => {
    expect(read(strikes, text).questions[0]!.rankOrder).toBeUndefined();
  });
});

describe('the rows a measure is taken over are not a second measure', () => {
  it.each([
    ['Could you break down the total cost of strikes by phase of flight, please?', 'cost_total'],
    ['what is the cost of strikes by state', 'cost_total'],
    ['repair costs of bird strikes per year', 'cost_repair'],
    ['how much did strikes cost us in 2000', 'cost_total'],
    ['strike costs by species', 'cost_total'],
  ])('%s', (text, metric) => {
    expect(read(strikes, text).questions.map((q) => q.metrics)).toEqual([[metric]]);
  });

  it.each(['strikes and total cost by year', 'Night vs day: how do strike numbers and repair costs compare?'])('both asked: %s', (text) => {
    expect(read(strikes, text).questions[0]!.metrics).toHaveLength(2);
  });

  it('"flight delays by origin" is the delay of flights (flights-20k)', () => {
    expect(read(flights, 'flight delays by origin').questions[0]!.metrics).toEqual(['avg_delay']);
  });
});

describe('"top N … and what share of all Y do they handle": the share the top N carry, not a rate of the catalog', () => {
  it.each([
    ['top 5 busiest origin airports by number of flights, and what share of all flights do they handle?', 5, 'origin'],
    ['what percentage of flights do the 5 busiest origins account for', 5, 'origin'],
    ['top 10 destinations by flights - how much of the total do they make up?', 10, 'destination'],
    ['whats the share of total flights from the top 3 origin airports', 3, 'origin'],
    ['Please list the ten biggest destinations by flight count and the proportion of all flights they take.', 10, 'destination'],
  ])('%s', (text, n, dimension) => {
    const b = read(flights, text);
    // One question of the flights count: "share" names no rate here ("Share of flights late" is another measure).
    expect(b.questions).toHaveLength(1);
    expect(b.metrics).toEqual(['flights']);
    expect(b.questions[0]).toMatchObject({ ranking: true, rankLimit: n, dimensions: [dimension] });
    expect(planOf(flights, b).items[0]).toMatchObject({ template: 'segment_shares', dimension, rankLimit: n, answersAsked: true });
  });

  it.each([
    'share of late flights by destination airport, worst 10',
    'What share of flights are late, by origin?',
    'how has the late rate moved since January',
  ])('a rate named by its own words still reads as that rate: %s', (text) => {
    expect(read(flights, text).metrics).toContain('late_share');
  });
});

/** The card's context as the conversation builds it. */
describe("a named value's share: the card's question states the share asked, not how the whole moved", () => {
  it.each([
    ['what percentage of flights leave from ORD', 'ORD'],
    ['What share of all flights depart from ATL?', 'ATL'],
    ['how much of the total flights is from DFW in 2001?', 'DFW'],
  ])('%s', (text, code) => {
    const b = read(flights, text);
    const q = b.questions[0]!;
    expect(q.shareOf).toEqual({ dimension: 'origin', value: code });
    const card = buildCard(withDefaults(b, briefDefaults(b, flights.dataset, flights.coverage)), planOf(flights, b), cardContext(flights, b));
    expect(card.questions[0]).toMatch(new RegExp(`^${code}'s share of all flights \\(every origin airport\\)`));
    expect(card.questions[0]).not.toMatch(/^How flights moved/);
  });
});

function cardContext(f: DatasetFacts, b: Brief) {
  return { dataset: f.dataset, coverage: f.coverage, defaults: briefDefaults(b, f.dataset, f.coverage), locale: 'en-GB' };
}

/** The strikes config with the operator breakdown the newcomer's config has (material/birdstrikes.yaml). */
function withOperator(f: DatasetFacts): DatasetFacts {
  if (f.dataset.dimensions.some((d) => d.name === 'aircraft_airline_operator')) return f;
  return { ...f, dataset: { ...f.dataset, dimensions: [...f.dataset.dimensions, { ...f.dataset.dimensions[0]!, name: 'aircraft_airline_operator', label: 'Operator', synonyms: ['operator', 'operators', 'airline', 'airlines', 'carrier'], column: 'Aircraft Airline Operator' }] } };
}

describe('two values of one breakdown set against each other, with no change asked: the two side by side', () => {
  it.each([
    'Night vs day: how do strike numbers and repair costs compare?',
    'night versus day strikes',
    'compare night and day for repair costs',
    'how do night and day compare on strikes?',
    'Strikes: Night against Day, please',
    'day v night - repair costs??',
    'Do more strikes happen during the day or at night?',
    'how do night strikes compare to day ones',
  ])('%s', (text) => {
    const b = read(strikes, text);
    expect(b.questions).toHaveLength(1);
    const q = b.questions[0]!;
    expect(q.contrast?.dimension).toBe('time_of_day');
    expect([...q.contrast!.values].sort()).toEqual(['Day', 'Night']);
    const items = planOf(strikes, b).items;
    // Each measure's two totals side by side lead; no growth comparison nobody asked for, no pooled table.
    const firsts = items.slice(0, q.metrics.length);
    for (const [i, m] of q.metrics.entries()) expect(firsts[i]).toMatchObject({ template: 'segment_shares', dimension: 'time_of_day', metrics: [m], answersAsked: true });
    expect(items.map((i) => i.template)).not.toContain('value_compare');
    expect(items.map((i) => i.template)).not.toContain('period_table');
    // The card's breakdown line says the two values' breakdown the answers go through, never "none".
    const card = buildCard(withDefaults(b, briefDefaults(b, strikes.dataset, strikes.coverage)), planOf(strikes, b), cardContext(strikes, b));
    expect(card.lines.find((l) => l.topic === 'breakdowns')).toMatchObject({ value: expect.stringMatching(/^Time of day \((?:Night against Day|Day against Night)\)$/), how: 'read' });
  });

  it.each([
    ['night vs day strikes, 2001 against 2000', 'value_compare'],
  ])('a change asked keeps the comparison of growth: %s', (text, template) => {
    const b = read(strikes, text);
    expect(b.questions[0]!.contrast?.dimension).toBe('time_of_day');
    expect(planOf(strikes, b).items.map((i) => i.template)).toContain(template);
  });
});

describe('"each year" asks for yearly figures unless it qualifies a rate or a season', () => {
  // Our own phrasings on birdstrikes.csv (vega-datasets): "each year" had been dropped whenever it
  // appeared, so "how many strikes did we have each year" got monthly points.
  it.each([
    ['How many bird strikes did we have each year?', 'year'],
    ['How much did strikes cost us each year?', 'year'],
    ['total cost every year please', 'year'],
    ['which months are busiest each year', null],
    ['how fast are strikes rising per year?', null],
  ])('%s', (text, grain) => {
    expect(read(strikes, text).grain ?? null).toBe(grain);
  });
});
