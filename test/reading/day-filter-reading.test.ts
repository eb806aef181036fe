// Days of the week named as a restriction ("on Fridays", "weekend orders", "business days") are
// read as a day-of-week filter that every sub-question of the plan carries, never dropped as an
// unknown word; dates ("last Friday"), deadlines ("by Friday") and a breakdown by day ("by
// weekday") are not. Read on vega-datasets' flights-20k.json (US domestic flights, January to March
// 2001) with the hand-written config of the other reading tests. ISO day numbers: 1 = Monday ...
// 7 = Sunday (ISO 8601). Phrasings were written for this test.
import { beforeAll, describe, expect, it } from 'vitest';
import { DAY_OF_WEEK, isDayFilter } from '../../analysis/day-of-week.js';
import { briefDefaults, withDefaults } from '../../bot/brief-defaults.js';
import type { Brief } from '../../bot/brief.js';
import { buildPlan } from '../../bot/plan.js';
import { type DatasetFacts, readRequest } from '../../bot/reading/read-request.js';
import { FLIGHTS_CONFIG } from './open-data-configs.js';
import { publicFacts } from './public-data.js';

let flights: DatasetFacts;
const NOW = new Date('2026-12-05T01:00:00Z');
beforeAll(async () => {
  flights = await publicFacts(FLIGHTS_CONFIG);
}, 120_000);

const read = (text: string): Brief => readRequest(text, flights, { now: NOW, locale: 'en-GB' });
const planOf = (b: Brief) => buildPlan(withDefaults(b, briefDefaults(b, flights.dataset, flights.coverage)), flights.dataset, flights.coverage);
const daysOf = (b: Brief) => b.questions.map((q) => q.filters.filter(isDayFilter).flatMap((f) => f.values.map(Number)));

describe('a day set in the request is a filter on the day of the week', () => {
  it.each([
    ['average delay on fridays', [5]],
    ['whats the avg delay on a Sunday', [7]],
    ['Sunday flights by origin', [7]],
    ['delays sat and sun', [6, 7]],
    ['weekend flights please', [6, 7]],
    ['how are delays on the weekends trending', [6, 7]],
    ['mean delay on business days', [1, 2, 3, 4, 5]],
    ['delay on working days in February', [1, 2, 3, 4, 5]],
    ['flights Mon-Fri', [1, 2, 3, 4, 5]],
    ['delays Tuesday through Thursday', [2, 3, 4]],
    ['flights tue-thu', [2, 3, 4]],
    ['midweek delays', [2, 3, 4]],
    ['delays on mondays and fridays', [1, 5]],
    ['late share excluding weekends', [1, 2, 3, 4, 5]],
    ['total delay minutes except Sundays by origin', [1, 2, 3, 4, 5, 6]],
  ])('%s', (text, days) => {
    const b = read(text);
    expect(b.unknownTerms).toEqual([]);
    expect(daysOf(b)).toEqual([days]);
    // Every sub-question of the plan carries it.
    const plan = planOf(b);
    expect(plan.items.length).toBeGreaterThan(0);
    for (const sq of plan.items) expect(sq.filters.filter(isDayFilter).flatMap((f) => f.values)).toEqual(days);
  });

  it('"midweek" is an assumption, said back', () => {
    expect(read('midweek delays').saidBack?.join(' ')).toMatch(/midweek.*Tuesdays to Thursdays/);
  });

  it.each(['average delay last friday', 'flights by weekday', 'which day of the week has the worst delays', 'delays by origin, by Friday please', 'flights this weekend'])('no day filter: %s', (text) => {
    expect(daysOf(read(text)).flat()).toEqual([]);
  });
});

describe("a day in the pleasantries is the writer's time, not a filter", () => {
  it.each([
    'sorry to bother you on a Friday, could you show me how delays moved by month?',
    'Happy Monday! how have flights moved?',
    "I know it's Friday but can you show flights by origin",
    'hope your Tuesday is going well - average delay by month please',
    'have a great weekend when you get there, but first: flights by origin',
    'apologies for pinging you on a Sunday, what is the average delay by origin?',
    "Enjoy the rest of your Wednesday! Could I get delays by month",
  ])('no day filter: %s', (text) => {
    const b = read(text);
    expect(daysOf(b).flat()).toEqual([]);
    expect(b.unknownTerms.map((t) => t.text.toLowerCase())).not.toContain('happy');
  });

  it.each([
    // The same days about the data still filter, even beside a pleasantry.
    ['Happy Monday! Could you show me flights on Saturdays by origin?', [6]],
    ["I know it's Friday, but send me weekend flights by month", [6, 7]],
    ['how many flights leave on a Friday', [5]],
    ['what were our Sunday flights like by month', [7]],
    // A person before the day without "on" asks for the data's days.
    ['show me a weekend breakdown of flights by origin', [6, 7]],
    ['give us a Saturday view of delays by month', [6]],
  ])('still a filter: %s', (text, days) => {
    expect(daysOf(read(text))).toEqual([days]);
  });
});

describe('two day sets set against each other', () => {
  it.each([
    ['flights on weekends vs weekdays', '6,7', '1,2,3,4,5'],
    ['compare weekend and weekday delays', '6,7', '1,2,3,4,5'],
    ['delay on fridays versus other days', '5', '1,2,3,4,6,7'],
  ])('%s', (text, a, b) => {
    const brief = read(text);
    expect(brief.unknownTerms).toEqual([]);
    expect(brief.questions[0]!.contrast).toEqual({ dimension: DAY_OF_WEEK, values: [a, b] });
    // The plan answers each day set on its own filter, both sides for every answer.
    const sides = new Set(planOf(brief).items.map((sq) => sq.filters.filter(isDayFilter).map((f) => f.values.join(',')).join()));
    expect([...sides].sort()).toEqual([a, b].sort());
  });
});

describe('a statistic named in the request', () => {
  it.each([
    ['median delay by origin', 0.5],
    ['whats the 90th percentile delay', 0.9],
    ['p90 delay by origin', 0.9],
    ['delay upper quartile on weekends', 0.75],
  ])('%s', (text, quantile) => {
    const b = read(text);
    expect(b.unknownTerms).toEqual([]);
    expect(b.questions[0]!.statistic?.quantile).toBe(quantile);
    const items = planOf(b).items;
    // Items that take it carry it; none of the averaged metric's other items (a mean under its name) is left in.
    expect(items.some((sq) => sq.statistic?.quantile === quantile)).toBe(true);
    for (const sq of items) if (sq.metrics.length === 1 && sq.metrics[0] === 'avg_delay') expect(sq.statistic?.quantile).toBe(quantile);
  });

  it('a count has no median: said back, answered as it stands', () => {
    const b = read('median flights by origin');
    expect(b.saidBack?.join(' ')).toMatch(/"median" of flights: it is a count of rows/);
    expect(planOf(b).items.every((sq) => sq.statistic === undefined)).toBe(true);
  });
});
