// Measure and breakdown words read against catalogs as `threadcount init` drafts them (labels, no
// other names), on two public files of vega-datasets: movies.json (3,201 films with grosses,
// budget, ratings, genre) and iowa-electricity.csv (net generation per source per year,
// 2001-2017). The configs are init's drafts for these files, trimmed to the entries used; the
// "fixed" one adds the other names an analyst would (films, genre), as a newcomer did.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { briefDefaults } from '../../bot/brief-defaults.js';
import { nextPrompt, readAnswer, type PromptContext } from '../../bot/prompts.js';
import { readRequest, type DatasetFacts } from '../../bot/reading/read-request.js';
import { vegaDataFile } from '../helpers/open-data.js';
import { publicFacts } from './public-data.js';

const metric = (name: string, label: string, def: string, synonyms = '[]') => `      - name: ${name}\n        label: ${label}\n        also_called: ${synonyms}\n        ${def}\n        unit: number\n        kind: flow\n`;
const rows = (label = 'Rows', synonyms = '[]') => `      - name: rows\n        label: ${label}\n        also_called: ${synonyms}\n        count: rows\n        unit: count\n        kind: flow\n`;
const movies = (fixed: boolean) => `version: 1
datasets:
  - name: movies
    label: Movies
    source:
      kind: json
      paths:
        - ${vegaDataFile('movies.json')}
    time_column:
      expr: strptime("Release Date", '%b %d %Y')
    timezone: UTC
    metrics:
${rows(fixed ? 'Films released' : 'Rows', fixed ? '[releases, films, movies]' : '[]')}${metric('us_gross', 'US Gross', `sum: '"US Gross"'`)}${metric('worldwide_gross', 'Worldwide Gross', `sum: '"Worldwide Gross"'`)}${metric('production_budget', 'Production Budget', `sum: '"Production Budget"'`)}${metric('imdb_votes', 'IMDB Votes', `sum: '"IMDB Votes"'`)}    dimensions:
      - name: mpaa_rating
        label: MPAA Rating
        also_called: []
        column: MPAA Rating
      - name: major_genre
        label: Major Genre
        also_called: []
        column: Major Genre
`;
const iowa = `version: 1
datasets:
  - name: iowa_electricity
    label: Iowa electricity
    source:
      kind: csv
      paths:
        - ${vegaDataFile('iowa-electricity.csv')}
    time_column: year
    timezone: UTC
    metrics:
${rows()}${metric('net_generation', 'Net generation', 'average: net_generation')}    dimensions:
      - name: source
        label: Source
        also_called: []
        column: source
`;
// birdstrikes.csv (FAA wildlife strikes 1990-2002): its three costs as init drafts them, the total last.
const strikes = `version: 1
datasets:
  - name: birdstrikes
    label: Birdstrikes
    source:
      kind: csv
      paths:
        - ${vegaDataFile('birdstrikes.csv')}
    time_column: Flight Date
    timezone: UTC
    metrics:
${rows()}${metric('cost_other', 'Cost Other', `sum: '"Cost Other"'`)}${metric('cost_repair', 'Cost Repair', `sum: '"Cost Repair"'`)}${metric('cost_total', 'Cost Total', `sum: '"Cost Total $"'`)}    dimensions:
      - name: origin_state
        label: Origin State
        also_called: []
        column: Origin State
      - name: aircraft_airline_operator
        label: Aircraft Airline Operator
        also_called: []
        column: Aircraft Airline Operator
`;
const dir = mkdtempSync(join(tmpdir(), 'tc-measures-'));
const files = { movies: join(dir, 'movies.yaml'), moviesFixed: join(dir, 'movies-fixed.yaml'), iowa: join(dir, 'iowa.yaml'), strikes: join(dir, 'strikes.yaml') };
writeFileSync(files.strikes, strikes);
writeFileSync(files.movies, movies(false));
writeFileSync(files.moviesFixed, movies(true));
writeFileSync(files.iowa, iowa);
const now = new Date('2026-12-05T07:00:00Z');
const facts = new Map<string, DatasetFacts>();
async function read(file: string, text: string) {
  if (!facts.has(file)) facts.set(file, await publicFacts(file));
  const f = facts.get(file)!;
  const ctx: PromptContext = { dataset: f.dataset, coverage: f.coverage, facts: f, now, locale: 'en-GB' };
  const brief = readRequest(text, f, { now });
  return { brief, ctx, prompt: nextPrompt(brief, ctx), defaults: briefDefaults(brief, f.dataset, f.coverage) };
}

describe('a word of a multi-word label names it', () => {
  it.each([
    ['what drove the change in generation in 2016 compared with 2015?', 'net_generation'],
    ['is generaton trending up?', 'net_generation'],
    ['share of generation by source', 'net_generation'],
  ])('Iowa: %s', async (text, want) => {
    const { brief, prompt } = await read(files.iowa, text);
    expect(brief.metrics).toEqual([want]);
    expect(prompt).toBeNull();
  });

  it.each([
    ['how did 2005 compare with 2004 for US gross, and which genres drove the change?', 'us_gross', 'major_genre'],
    ['Top 10 genres by worldwide gross', 'worldwide_gross', 'major_genre'],
    ['avg budget by genra', 'production_budget', 'major_genre'],
  ])('Movies: %s', async (text, m, d) => {
    const { brief } = await read(files.movies, text);
    expect(brief.metrics).toEqual([m]);
    expect(brief.dimensions).toEqual([d]);
  });
});

describe('the metric prompt recommends a real measure, by one ranking', () => {
  it('a one-measure dataset: its measure, not the row count, when none is named', async () => {
    const { prompt, defaults } = await read(files.iowa, 'Which source is biggest and how concentrated is the mix?');
    expect(prompt?.topic).toBe('metrics');
    expect(prompt?.recommended.value).toBe('net_generation');
    expect(defaults.metric?.value).toBe('net_generation');
  });

  it('money words ask for a gross, never "Stop here"', async () => {
    for (const text of ['Drama vs Comedy - which makes more money per film?', 'box office by year', 'how has movie revenue changed?']) {
      const { prompt } = await read(files.movies, text);
      expect(prompt?.topic, text).toBe('metrics');
      expect(prompt?.recommended.value, text).toBe('us_gross');
      expect(prompt?.question, text).toMatch(/US Gross, Worldwide Gross/);
    }
  });

  it('"gross" offers both grosses, the request\'s "US" recommending one', async () => {
    const { prompt } = await read(files.movies, 'R-rated vs PG-13 films: do they gross differently in the US?');
    expect(prompt?.question).toBe('"gross" could be measured as US Gross or Worldwide Gross in Movies. Which did you mean?');
    expect(prompt?.options.slice(0, 2).map((o) => o.value)).toEqual(['us_gross', 'worldwide_gross']);
    expect(prompt?.recommended.value).toBe('us_gross');
    const plain = await read(files.movies, 'gross by genre');
    expect(plain.prompt?.recommended.value).toBe('us_gross');
  });
});

describe('an answered prompt wins over words already read', () => {
  it('"ok" to US Gross is the measure, not the films the request names', async () => {
    const { brief, prompt, ctx } = await read(files.moviesFixed, 'R-rated vs PG-13 films: do they gross differently in the US?');
    expect(brief.metrics).toEqual([]);
    const answered = readAnswer(prompt!, 'ok', brief, ctx);
    expect(answered.ok && answered.brief.questions.map((q) => q.metrics)).toEqual([['us_gross']]);
  });

  it('"per film" is the unit of the measure, not a second measure', async () => {
    const { brief } = await read(files.moviesFixed, 'Drama vs Comedy: which earns more worldwide gross per film?');
    expect(brief.metrics).toEqual(['worldwide_gross']);
    expect(brief.saidBack?.some((l) => l.startsWith('"per film": the catalog has no average of Worldwide Gross per row'))).toBe(true);
    const counted = await read(files.moviesFixed, 'how many films per genre');
    expect(counted.brief.metrics).toEqual(['rows']);
  });
});

describe('a breakdown the catalog lacks is asked, never replaced by the first', () => {
  it('"by studio" on a change: asked, with no breakdown assumed', async () => {
    const { prompt, defaults } = await read(files.movies, 'what drove the drop in US gross in 2005 vs 2004 by studio');
    expect(prompt?.topic).toBe('dimensions');
    expect(prompt?.recommended.value).toBe('none');
    expect(prompt?.options.map((o) => o.value)).toEqual(['mpaa_rating', 'major_genre', 'none']);
    expect(defaults.breakdown).toBeUndefined();
  });

  it('an unqualified "cost" recommends the total of its parts; a qualifier picks its part', async () => {
    const { prompt } = await read(files.strikes, 'What did bird strikes cost us in 2000 compared with 1999?');
    expect(prompt?.topic).toBe('metrics');
    expect(prompt?.recommended.value).toBe('cost_total');
    expect(prompt?.options.slice(0, 3).map((o) => o.value)).toEqual(['cost_total', 'cost_other', 'cost_repair']);
    const repair = await read(files.strikes, 'how did repair cost change in 2000 against 1999?');
    expect(repair.brief.metrics.length === 1 ? repair.brief.metrics[0] : repair.prompt?.recommended.value).toBe('cost_repair');
    // "other" is a function word, and still the word that names Cost Other here.
    const other = await read(files.strikes, 'How did other costs from bird strikes change in 2000 compared with 1999?');
    expect(other.brief.metrics.length === 1 ? other.brief.metrics[0] : other.prompt?.recommended.value).toBe('cost_other');
  });

  it('a label\'s head noun names its breakdown though a value holds the word ("TRANS STATES AIRLINES")', async () => {
    const { brief } = await read(files.strikes, 'How many bird strikes did we have each year, and which states had the most?');
    expect(brief.questions[0]!.dimensions).toEqual(['origin_state']);
    // "bird strikes" is asked about (the count is labelled Rows); "states" is not.
    expect(brief.unknownTerms.filter((u) => u.role !== 'metric')).toEqual([]);
    expect(brief.grain).toBe('year');
    // The value is still found by its own words.
    const airline = await read(files.strikes, 'strikes for trans states airlines');
    expect(airline.brief.questions[0]!.filters).toEqual([{ dimension: 'aircraft_airline_operator', values: ['TRANS STATES AIRLINES'] }]);
  });
});
