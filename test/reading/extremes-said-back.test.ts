// Superlatives of a period ("the hottest day", "the coldest month on record", "the busiest day"),
// breakdowns the data lacks said back ("top 5 carriers"), and ranking words read as asked, on
// public files of vega-datasets the reader was not written around: weather.csv (NOAA daily weather
// in Seattle and New York, 2012-2015), flights-20k.json (US flights, January to March 2001),
// movies.json and unemployment-across-industries.json (US BLS). Each config is written here, in a
// temp dir, as a newcomer would write it; the briefs are read through `threadcount read`'s own path
// (real DuckDB over the files).
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { readBrief } from '../../cli/read.js';
import { nextPrompt, type PromptContext } from '../../bot/prompts.js';
import { cardNotes } from '../../bot/replies.js';
import { readRequest, type DatasetFacts } from '../../bot/reading/read-request.js';
import { moviesConfigText, vegaDataFile, writeWeatherConfig } from '../helpers/open-data.js';
import { FLIGHTS_CONFIG } from './open-data-configs.js';
import { NOW, publicFacts, readUnemployment } from './public-data.js';

const dir = mkdtempSync(join(tmpdir(), 'tc-extremes-'));
const WEATHER = writeWeatherConfig(dir, [
  '{ name: days, label: Days recorded, count: rows, unit: count, kind: flow, also_called: [days] }',
  '{ name: precipitation, label: Precipitation, sum: precipitation, unit: number, unit_label: mm, kind: flow, also_called: [rain, rainfall] }',
  '{ name: temp_max, label: Daily high temperature, average: temp_max, unit: number, unit_label: "°C", kind: level, also_called: [high temperature, temperature] }',
  '{ name: temp_min, label: Daily low temperature, average: temp_min, unit: number, unit_label: "°C", kind: level, also_called: [low temperature] }',
  '{ name: wind, label: Wind speed, average: wind, unit: number, unit_label: m/s, kind: level }',
], [
  '{ name: location, label: City, column: location, also_called: [city] }',
]);
const MOVIES = join(dir, 'movies.yaml');
writeFileSync(MOVIES, moviesConfigText(
  ['{ name: rows, label: Rows, count: rows, unit: count, kind: flow }', `{ name: us_gross, label: US Gross, sum: '"US Gross"', unit: number, kind: flow }`],
  ['{ name: creative_type, label: Creative Type, column: Creative Type }'],
));
// The BLS file with a share of readings over 10% and no rate of its own: "rate" is not that share.
const UNEMPLOYMENT_SHARE = join(dir, 'unemployment-share.yaml');
writeFileSync(UNEMPLOYMENT_SHARE, `version: 1
datasets:
  - name: unemployment
    label: Unemployment across industries
    source: { kind: json, paths: ["${vegaDataFile('unemployment-across-industries.json')}"] }
    time_column: date
    timezone: UTC
    metrics:
      - { name: rows, label: Rows, count: rows, unit: count, kind: flow }
      - { name: count, label: Unemployed (thousands), also_called: [unemployed, unemployment], sum: count, unit: number, kind: flow }
      - { name: high_share, label: Unemployment share, rate: { when: "rate > 10" }, unit: percent }
    dimensions:
      - { name: series, label: Industry, also_called: [industry, industries], column: series }
`);

const read = (configFile: string, text: string) => readBrief({ configFile, text, now: NOW });
const facts = new Map<string, DatasetFacts>();
async function factsOf(file: string): Promise<DatasetFacts> {
  if (!facts.has(file)) facts.set(file, await publicFacts(file));
  return facts.get(file)!;
}

describe('a superlative of a period: the measure, the grain and the end asked (weather.csv)', () => {
  it.each([
    ['What was the hottest day in Seattle?', 'temp_max', 'day', 'highest'],
    ['Which was the coldest month on record in New York?', 'temp_min', 'month', 'lowest'],
    ['What was the wettest week in Seattle?', 'precipitation', 'week', 'highest'],
    ['windiest month', 'wind', 'month', 'highest'],
    ['Which day was the driest in 2014?', 'precipitation', 'day', 'lowest'],
    ["What's the calmest week ever in New York?", 'wind', 'week', 'lowest'],
  ])('%s', async (text, metric, grain, order) => {
    const b = await read(WEATHER, text);
    expect(b.questions).toHaveLength(1);
    expect(b.questions[0]!.metrics).toEqual([metric]);
    expect(b.grain).toBe(grain);
    expect(b.questions[0]!.rankOrder).toBe(order);
    // Neither the superlative, nor "record", nor the time noun is a term of the data; "day" is not the row count.
    expect(b.unknownTerms).toEqual([]);
    expect(b.toAsk).toEqual([]);
    // "on record", "ever": the whole history, no period.
    if (!/\d{4}/.test(text)) expect(b.window).toBeNull();
    expect(b.evidence.metrics?.how).toBe('inferred');
  });

  it('"the 3 hottest days of 2015": three extremes, daily, in 2015', async () => {
    const b = await read(WEATHER, 'the 3 hottest days of 2015');
    expect(b.questions[0]!.metrics).toEqual(['temp_max']);
    expect(b.questions[0]!.rankLimit).toBe(3);
    expect(b.grain).toBe('day');
    expect(b.window).toEqual({ from: '2015-01-01', to: '2015-12-31' });
  });

  it('a named measure keeps its own words, and "which month had the highest" is the grain', async () => {
    const b = await read(WEATHER, 'which month had the highest wind in Seattle');
    expect(b.questions[0]!.metrics).toEqual(['wind']);
    expect(b.grain).toBe('month');
    expect(b.questions[0]!.rankOrder).toBe('highest');
    expect(b.evidence.metrics?.how).toBe('stated');
  });
});

describe('a superlative of a period on flights-20k.json', () => {
  it.each([
    ['What was the busiest day?', 'flights', 'day', 'highest'],
    ['quietest week in February 2001', 'flights', 'week', 'lowest'],
    // "slowest" is the delay where the catalog measures one.
    ['slowest month', 'avg_delay', 'month', 'highest'],
    ['Which month had the most flights?', 'flights', 'month', 'highest'],
  ])('%s', async (text, metric, grain, order) => {
    const b = await read(FLIGHTS_CONFIG, text);
    expect(b.questions[0]!.metrics).toEqual([metric]);
    expect(b.grain).toBe(grain);
    expect(b.questions[0]!.rankOrder).toBe(order);
    expect(b.unknownTerms).toEqual([]);
  });

  it('"the busiest months" still asks when in the year, and "busiest day of the week" the weekdays: no grain', async () => {
    for (const text of ['busiest months for flights', 'busiest day of the week for flights']) {
      const b = await read(FLIGHTS_CONFIG, text);
      expect(b.grain, text).toBeNull();
    }
  });
});

describe('a breakdown the data lacks is said back, with the ones it has (flights-20k.json)', () => {
  it.each(['top 5 carriers by delay', 'rank carriers by delay', 'which carrier had the most flights'])('%s', async (text) => {
    const b = await read(FLIGHTS_CONFIG, text);
    const term = b.unknownTerms.find((u) => /^carriers?$/.test(u.text));
    expect(term?.role).toBe('dimension');
    expect(b.toAsk).toContain('dimensions');
    expect(b.questions[0]!.dimensions).toEqual([]);
    const f = await factsOf(FLIGHTS_CONFIG);
    const notes = cardNotes(readRequest(text, f, { now: NOW }), f.dataset).join('\n');
    expect(notes).toMatch(/There is no "carriers?" in this dataset/);
    expect(notes).toContain('origin airport');
    expect(notes).toContain('destination airport');
  });
});

describe('ranking words read as asked (flights-20k.json)', () => {
  it('"makes" is a verb, not a term', async () => {
    const b = await read(FLIGHTS_CONFIG, 'which origin makes the most flights');
    expect(b.questions[0]!.dimensions).toEqual(['origin']);
    expect(b.questions[0]!.ranking).toBe(true);
    expect(b.unknownTerms).toEqual([]);
  });

  it.each([
    ['Rank origins from top to bottom by flights', 'highest'],
    ['rank origins from lowest to highest by delay', 'lowest'],
    ['list destinations by delay, highest to lowest', 'highest'],
  ])('%s', async (text, order) => {
    const b = await read(FLIGHTS_CONFIG, text);
    expect(b.questions[0]!.ranking).toBe(true);
    expect(b.questions[0]!.dimensions).toHaveLength(1);
    expect(b.questions[0]!.rankOrder).toBe(order);
    expect(b.unknownTerms).toEqual([]);
  });
});

describe('counts and rates named by words the catalog lacks', () => {
  it('"number of releases" on movies.json recommends the row count, not "Stop here"', async () => {
    const f = await factsOf(MOVIES);
    const brief = readRequest('number of releases by creative type', f, { now: NOW });
    expect(brief.dimensions).toEqual(['creative_type']);
    const ctx: PromptContext = { dataset: f.dataset, coverage: f.coverage, facts: f, now: NOW, locale: 'en-GB' };
    const prompt = nextPrompt(brief, ctx);
    expect(prompt?.topic).toBe('metrics');
    expect(prompt?.recommended.value).toBe('rows');
    expect(prompt?.recommended.reason).toMatch(/counts the rows of Movies/);
  });

  it('"unemployment rate" is not the catalog\'s Unemployment share, nor the count: asked', async () => {
    const b = await read(UNEMPLOYMENT_SHARE, 'unemployment rate by industry');
    expect(b.questions[0]!.metrics).toEqual([]);
    expect(b.unknownTerms.map((u) => u.text)).toContain('unemployment rate');
    expect(b.toAsk).toContain('metrics');
  });

  it('with a rate in the catalog, "unemployment rate" is that rate alone', async () => {
    const b = await readUnemployment('unemployment rate by industry');
    expect(b.questions[0]!.metrics).toEqual(['rate']);
    expect(b.unknownTerms).toEqual([]);
  });
});
