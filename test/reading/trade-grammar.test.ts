// The trade's ordinary grammar, on requests a newcomer typed against two public datasets the reader
// was never tuned to: vega-datasets' us-employment.csv (BLS nonfarm payrolls by sector, monthly,
// 2006-2015, in thousands) and unemployment-across-industries.json (BLS unemployed and rates by
// industry, January 2000 to February 2010). A verb is not a season, a month before its year is a
// period, not a deadline day, "trending up?" asks for the trend test, and a head noun after a
// measure ("construction employment") is that measure, not a second one.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { readBrief } from '../../cli/read.js';
import type { BriefJson } from '../../bot/reading/brief-json.js';
import { vegaDataFile } from '../helpers/open-data.js';
import { NOW, readUnemployment } from './public-data.js';
import { FLIGHTS_CONFIG } from './open-data-configs.js';

// The sectors as init drafts them (averages of a headcount level, in thousands), with the other
// names a newcomer adds to the total: "jobs", "employment".
const sector = (name: string, label: string, also: string[] = []) =>
  `      - { name: ${name}, label: ${label}, also_called: [${also.join(', ')}], average: ${name}, unit: number, unit_label: thousand, kind: level }`;
const dir = mkdtempSync(join(tmpdir(), 'tc-grammar-'));
const JOBS_CONFIG = join(dir, 'jobs.yaml');
writeFileSync(JOBS_CONFIG, `version: 1
datasets:
  - name: us_employment
    label: US employment
    source: { kind: csv, paths: ["${vegaDataFile('us-employment.csv')}"] }
    time_column: month
    timezone: UTC
    metrics:
      - { name: rows, label: Rows, count: rows, unit: count, kind: flow }
${sector('nonfarm', 'Nonfarm employment', ['total employment', 'payrolls', 'jobs', 'employment', 'headcount'])}
${sector('construction', 'Construction')}
${sector('manufacturing', 'Manufacturing')}
${sector('retail_trade', 'Retail trade')}
${sector('leisure_and_hospitality', 'Leisure and hospitality', ['hospitality', 'leisure'])}
${sector('government', 'Government', ['public sector'])}
      - { name: nonfarm_change, label: Jobs added, also_called: [net jobs added, job gains], sum: nonfarm_change, unit: number, unit_label: thousand, kind: flow }
    dimensions: []
`);
const readJobs = (text: string): Promise<BriefJson> => readBrief({ configFile: JOBS_CONFIG, text, now: NOW });

describe('"fall" the verb is a direction, "fall" after a season word is the season', () => {
  it('"did construction employment fall faster than manufacturing between 2008 and 2009": a change over 2008-2009, no autumn', async () => {
    const b = await readJobs('Did construction employment fall faster than manufacturing between 2008 and 2009?');
    expect(b.questions).toHaveLength(1);
    expect(b.questions[0]).toMatchObject({ kind: 'growth', metrics: ['construction', 'manufacturing'] });
    expect(b.window).toEqual({ from: '2008-01-01', to: '2009-12-31' });
    expect(JSON.stringify(b.evidence)).not.toMatch(/'fall'|"fall"/);
  });

  it.each([
    ['did payrolls fall in 2009?', { from: '2009-01-01', to: '2009-12-31' }],
    ['How far did construction jobs fall from 2007 to 2010?', { from: '2007-01-01', to: '2010-12-31' }],
    ['manufacturing expected to fall by how much in 2009', { from: '2009-01-01', to: '2009-12-31' }],
  ])('%s', async (text, window) => {
    const b = await readJobs(text);
    expect(b.window).toEqual(window);
  });

  it.each([
    // Meteorological autumn, September to November (docs/reading.md).
    ['payrolls in the fall of 2012', { from: '2012-09-01', to: '2012-11-30' }],
    ['construction jobs, fall 2014', { from: '2014-09-01', to: '2014-11-30' }],
    ['how did retail trade do during fall 2010?', { from: '2010-09-01', to: '2010-11-30' }],
  ])('%s stays the season', async (text, window) => {
    expect((await readJobs(text)).window).toEqual(window);
  });
});

describe('a month before a four-digit year is a period of the data, not a deadline day', () => {
  it('"share of unemployed persons by industry for January 2010": January 2010, no deadline of the 20th', async () => {
    const b = await readUnemployment('Please provide the share of unemployed persons by industry for January 2010.');
    expect(b.deadline).toBeNull();
    expect(b.window).toEqual({ from: '2010-01-01', to: '2010-01-31' });
    expect(b.questions[0]!.dimensions).toEqual(['series']);
  });

  it('"for the meeting on January 20" and "by 20 January" are still deadlines', async () => {
    expect((await readUnemployment('unemployment by industry in 2009, for the meeting on January 20')).deadline).toBe('2027-01-20');
    expect((await readUnemployment('unemployment by industry in 2009 by 20 January')).deadline).toBe('2027-01-20');
  });
});

describe('"trending up?" asks whether there is a trend: the trend test over the window', () => {
  it.each(['Is the unemployment rate trending up? monthly, 2007 to 2009', 'is unemployment trending down from 2003 to 2006?', 'Is there an upward trend in the unemployment rate between 2006 and 2009?'])('%s', async (text) => {
    const b = await readUnemployment(text);
    expect(b.questions).toHaveLength(1);
    expect(b.questions[0]!.kind).toBe('trend');
    expect(b.window).not.toBeNull();
  });

  it('a trend set against another period is still a change between periods', async () => {
    expect((await readUnemployment('is unemployment trending up in 2009 compared with 2008?')).questions[0]!.kind).toBe('growth');
  });
});

describe('a head noun after a measure names that measure, it adds no second one', () => {
  it.each([
    ['retail trade jobs by month in 2009', ['retail_trade']],
    ['How has leisure and hospitality employment changed since 2010?', ['leisure_and_hospitality']],
    ['goverment jobs in 2012', ['government']],
    ['construction employment and manufacturing employment in 2009', ['construction', 'manufacturing']],
  ])('%s', async (text, metrics) => {
    expect((await readJobs(text)).questions[0]!.metrics).toEqual(metrics);
  });

  it('the head noun alone is still the total, and a different quantity beside it is still its own', async () => {
    expect((await readJobs('jobs in 2012')).questions[0]!.metrics).toEqual(['nonfarm']);
    expect((await readJobs('jobs and net jobs added in 2012')).questions[0]!.metrics).toEqual(['nonfarm', 'nonfarm_change']);
  });

  it('a typo inside a longer name is that name, not a shorter one written right ("unemplyment rate")', async () => {
    expect((await readUnemployment('unemplyment rate by industry in 2009')).questions[0]!.metrics).toEqual(['rate']);
    expect((await readUnemployment('unemplyment by industry in 2009')).questions[0]!.metrics).toEqual(['count']);
  });
});

describe('the same question in other spellings gets the same reading', () => {
  it.each(["What's the total unemployment rate in Jan 2010?", "Whats the unemployment rate in Jan 2010?", "what's the unemployment rate in Jan 2010"])('%s: a snapshot of January 2010', async (text) => {
    const b = await readUnemployment(text);
    expect(b.questions[0]).toMatchObject({ kind: 'kpi', metrics: ['rate'] });
    expect(b.window).toEqual({ from: '2010-01-01', to: '2010-01-31' });
  });
});

describe('an event dated by its year alone is the date a before/after turns on', () => {
  it.each([
    ['Has unemployment in construction changed since the 2005 reorganisation?', '2005-01-01'],
    ['unemployment rate before and after 2008', '2008-01-01'],
    ['compare unemployment before vs after 2008', '2008-01-01'],
  ])('%s', async (text, date) => {
    const q = (await readUnemployment(text)).questions[0]!;
    expect(q).toMatchObject({ kind: 'performance', launchDate: date });
  });

  it('a stretch named by its start is still a change over it, not an event', async () => {
    const q = (await readUnemployment('How has unemployment changed since 2005?')).questions[0]!;
    expect(q).toMatchObject({ kind: 'growth', launchDate: null });
  });
});

describe('the role a sentence gives two airports places both ("as an origin")', () => {
  const readFlights = (text: string): Promise<BriefJson> => readBrief({ configFile: FLIGHTS_CONFIG, text, now: NOW });
  it('"ORD vs ATL - which has worse average delays as an origin?" sets the two origins against each other', async () => {
    const q = (await readFlights('ORD vs ATL - which has worse average delays as an origin?')).questions[0]!;
    expect(q.contrast).toEqual({ dimension: 'origin', values: ['ORD', 'ATL'] });
    expect(q.metrics).toEqual(['avg_delay']);
  });

  it('"as destinations" places them at the other end; with no role they are asked about', async () => {
    expect((await readFlights('ORD vs ATL as destinations: which has the worse delays?')).questions[0]!.contrast).toEqual({ dimension: 'destination', values: ['ORD', 'ATL'] });
    expect((await readFlights('ORD vs ATL - which has worse average delays?')).toAsk).toContain('values');
  });
});
