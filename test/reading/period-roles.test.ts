// What a period named in a request is for, beyond "the window": a season put up as a guess to test
// ("I suspect winter is our worst season") is set against the other seasons over all the data,
// never the one winter looked at; "each quarter compared with a year earlier" asks for a series of
// year-on-year changes at that grain, never one stretch against another. Read on public data the
// reader was never tuned to: vega-datasets' seattle-weather.csv (NOAA, daily 2012-2015;
// test/helpers/open-data.ts) and unemployment-across-industries.json (US BLS; public-data.ts).
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { planFor } from '../../bot/card-edits.js';
import { buildCard, cardText } from '../../bot/card.js';
import { type DatasetFacts, readRequest } from '../../bot/reading/read-request.js';
import { writeSeattleConfig } from '../helpers/open-data.js';
import { NOW, publicFacts, UNEMPLOYMENT_CONFIG } from './public-data.js';

let weather: DatasetFacts;
let jobs: DatasetFacts;
beforeAll(async () => {
  const config = writeSeattleConfig(mkdtempSync(join(tmpdir(), 'tc-roles-')), 'weather.yaml', ['{ name: temp_max, label: Daily high temperature, average: temp_max, unit: number, kind: level, also_called: [temperature, high temperature] }', '{ name: wind, label: Wind speed, average: wind, unit: number, kind: level, also_called: [wind] }']);
  weather = await publicFacts(config);
  jobs = await publicFacts(UNEMPLOYMENT_CONFIG);
});

const plan = (facts: DatasetFacts, text: string) => {
  const brief = readRequest(text, facts, { now: NOW });
  const { plan: p, defaults } = planFor(brief, facts.dataset, facts.coverage, []);
  return { brief, plan: p, card: cardText(buildCard(brief, p, { dataset: facts.dataset, coverage: facts.coverage, locale: 'en-IE', defaults })) };
};

describe('a season put up as a guess is tested against the others, not used as the window', () => {
  const guesses: [string, string][] = [
    ['I suspect winter is our worst season for rainfall', 'winter'],
    ['I think summer is when the temperature peaks', 'summer'],
    ['is it true that we get the most rain in winter?', 'winter'],
    ['Is winter the wettest season?', 'winter'],
    ['my guess is autumn has the strongest wind', 'autumn'],
    ['My hunch: precipitation is highest in the fall. Can you check?', 'autumn'],
    ['We reckon spring gets the least rain, right?', 'spring'],
    // A comparative asked of a season of every year: how it compares with the rest of the year.
    ['do we get more rain in winter?', 'winter'],
    ['are winds stronger in the autumn?', 'autumn'],
    ['are temperatures higher during summer than the rest of the year?', 'summer'],
  ];
  for (const [text, season] of guesses) {
    it(`"${text}": ${season} against the other seasons, over all the data`, () => {
      const { brief, plan: p, card } = plan(weather, text);
      expect(brief.window).toBeUndefined();
      expect(brief.questions.some((q) => q.seasonTested === season)).toBe(true);
      // The month-of-year pattern heads the answers, over the whole history (2012-2015).
      expect(p.items[0]!.template).toBe('trend_seasonality');
      expect(p.items[0]!.window).toEqual({ start: '2012-01-01', end: '2016-01-01' });
      expect(brief.saidBack?.join(' ')).toMatch(new RegExp(`"${season}" is read as the season your guess is about, not the period`));
      expect(card).toMatch(new RegExp(`Whether ${season} is when .* highest or lowest, against the other seasons`));
    });
  }

  const windows: [string, { start: string; end: string }][] = [
    ['how was winter?', { start: '2015-12-01', end: '2016-01-01' }],
    ['rainfall in winter 2014', { start: '2013-12-01', end: '2014-03-01' }],
    ['What was the rainfall like in summer 2013?', { start: '2013-06-01', end: '2013-09-01' }],
    // A comparative with a dated season still looks at that season.
    ['was there more rain in summer 2014?', { start: '2014-06-01', end: '2014-09-01' }],
  ];
  for (const [text, window] of windows) {
    it(`"${text}" keeps the season as the window`, () => {
      const { brief } = plan(weather, text);
      expect(brief.window).toEqual(window);
      expect(brief.questions.every((q) => q.seasonTested === undefined)).toBe(true);
    });
  }
});

describe('a change on a year earlier asked per period is a series of changes at that grain', () => {
  const asks: [string, string][] = [
    ['unemployment rate each quarter compared with a year earlier', 'quarter'],
    ['jobless count every month vs the same month last year', 'month'],
    ['year-over-year unemployment by quarter', 'quarter'],
    ["show me each quarter's unemployment against the same quarter a year before", 'quarter'],
    ['monthly unemployment rate vs a year ago', 'month'],
  ];
  for (const [text, grain] of asks) {
    it(`"${text}": year-on-year changes per ${grain}, no two stretches`, () => {
      const { brief, plan: p } = plan(jobs, text);
      expect(brief.window).toBeUndefined();
      expect(brief.compareWindow).toBeUndefined();
      expect(brief.grain).toBe(grain);
      expect(p.items.some((i) => i.template === 'growth_periods')).toBe(false);
      const series = p.items.find((i) => i.template === 'growth_series')!;
      expect(series).toBeDefined();
      expect(series.grain).toBe(grain);
    });
  }

  it('"is unemployment up on last year?" (no grain asked) stays two stretches', () => {
    const { brief } = plan(jobs, 'is unemployment higher than last year?');
    expect(brief.window).toBeDefined();
  });
});
