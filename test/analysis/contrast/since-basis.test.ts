// "How has it changed since 2001?" measured over the stretch asked about: its first whole period
// against its last, not its last two, and not a before/after around 1 January 2001. On open data
// the project was never built around: vega-datasets' iowa-electricity.csv (US EIA net generation
// in Iowa by source, one row per source per year, 2001–2017), with the catalog of
// test/helpers/open-data.ts. Every figure is checked against the test's own SQL on the CSV.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { GrowthDriversFinding } from '../../../analysis/findings/growth.js';
import type { ValueCompareFinding } from '../../../analysis/findings/contrast.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { datasetFacts, openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { briefDefaults, withDefaults } from '../../../bot/brief-defaults.js';
import { buildPlan } from '../../../bot/plan.js';
import { readRequest, type DatasetFacts } from '../../../bot/reading/read-request.js';
import { presentContext } from '../../../bot/present-answer.js';
import { loadConfig } from '../../../config/load.js';
import { captionProblems } from '../../helpers/caption-checks.js';
import { vegaDataFile, writeIowaConfig } from '../../helpers/open-data.js';

let ws: Workspace;
let facts: DatasetFacts;
const NOW = new Date('2026-12-05T09:00:00Z');
beforeAll(async () => {
  ws = await openWorkspace(loadConfig(writeIowaConfig(mkdtempSync(join(tmpdir(), 'tc-since-')))));
  facts = datasetFacts(ws);
}, 60_000);
afterAll(async () => {
  await ws?.source.close();
});

/** Net generation by source and year, as plain SQL on the CSV reads it. */
async function generation(): Promise<Map<string, number>> {
  const db = await DuckDBInstance.create(':memory:');
  const conn = await db.connect();
  try {
    const rows = (await conn.runAndReadAll(`SELECT source, year(CAST("year" AS DATE)) AS y, SUM(net_generation)::DOUBLE AS v
      FROM read_csv_auto('${vegaDataFile('iowa-electricity.csv')}') GROUP BY 1, 2`)).getRowObjectsJson();
    return new Map(rows.map((r) => [`${String(r.source)} ${String(r.y)}`, Number(r.v)]));
  } finally {
    conn.closeSync();
    db.closeSync();
  }
}

const read = (text: string) => readRequest(text, facts, { now: NOW, locale: 'en-GB' });

describe('reading a change since a start', () => {
  // The same question in several registers: each measures the change over the stretch from its start.
  it.each([
    'Renewables vs fossil fuels: how has their generation changed since 2001?',
    'Since 2001, how have renewables and fossil fuels compared in generation?',
    'renewables v fossil fuels generation from 2001 on - what changed?',
    'Has generation from renewables grown faster than fossil fuels since 2001?',
    'How much has generation changed for renewables against fossil fuels over the last 10 years?',
  ])('"%s" compares the stretch\'s ends, with no date something happened on', (text) => {
    const q = read(text).questions[0]!;
    expect(q.spanEnds).toBe('year');
    expect(q.launchDate).toBeUndefined();
    expect(q.kind).not.toBe('performance');
    expect(q.window?.end).toBe('2018-01-01');
  });

  // A date something happened on stays a before/after around it.
  it.each([
    ['Are pass holders travelling more since the launch in March?', '2017-03-01'],
    ['Has generation changed since the tariff changed in March 2015?', '2015-03-01'],
    ['Did renewables output go up after the subsidy was introduced on 1 July 2012?', '2012-07-01'],
    ['generation since the rollout in May 2014 - better or worse?', '2014-05-01'],
  ])('"%s" stays a before/after around its event', (text, date) => {
    const q = read(text).questions[0]!;
    expect(q.launchDate).toBe(date);
    expect(q.spanEnds).toBeUndefined();
  });

  it('a plain period is no stretch to measure from ("in 2010", "2016 against 2015")', () => {
    expect(read('How did renewables generation change in 2010?').questions[0]!.spanEnds).toBeUndefined();
    expect(read('Renewables generation in 2016 against 2015').questions[0]!.spanEnds).toBeUndefined();
    expect(read('Renewables generation over the last 12 months').questions[0]!.spanEnds).toBeUndefined();
  });
});

describe('answering a change since a start', () => {
  it('sets the first whole year against the last, and says a level\'s change in its units (catalog.ts changeBasisOf)', async () => {
    const truth = await generation();
    const brief = read('Renewables vs fossil fuels: how has their generation changed since 2001?');
    const plan = buildPlan(withDefaults(brief, briefDefaults(brief, ws.dataset, ws.coverage)), ws.dataset, ws.coverage);
    const sq = plan.items.find((x) => x.template === 'value_compare')!;
    expect(sq.spanEnds).toBe('year');
    const answer = await answerSubQuestion(sq, ws);
    const f = answer.findings.find((x): x is ValueCompareFinding => x.type === 'value_compare')!;
    expect(f.priorBasis).toBe('span_ends');
    expect(f.prior).toEqual({ start: '2001-01-01', end: '2002-01-01' });
    expect(f.current).toEqual({ start: '2017-01-01', end: '2018-01-01' });
    // Plain SQL: Renewables 1,437 → 21,933, Fossil Fuels 35,361 → 29,329.
    expect(truth.get('Renewables 2001')).toBe(1437);
    expect(truth.get('Renewables 2017')).toBe(21933);
    expect(f.first.prior).toBeCloseTo(truth.get('Renewables 2001')!, 6);
    expect(f.first.current).toBeCloseTo(truth.get('Renewables 2017')!, 6);
    expect(f.second.prior).toBeCloseTo(truth.get('Fossil Fuels 2001')!, 6);
    expect(f.second.current).toBeCloseTo(truth.get('Fossil Fuels 2017')!, 6);
    // Net generation is declared a level here (test/helpers/open-data.ts): its change is a
    // difference in its units, never a percentage of itself (catalog.ts changeBasisOf).
    expect(f.basis).toBe('units');
    expect(f.second.growth).toBeNull();
    expect(f.second.change).toBeCloseTo(truth.get('Fossil Fuels 2017')! - truth.get('Fossil Fuels 2001')!, 6);
    expect(f.changeGap).toBeCloseTo(21933 - 1437 - (29329 - 35361), 6);

    const p = SUB_QUESTIONS.value_compare.present(answer, presentContext(ws, 'managers'));
    expect(p.caption).toContain('2017 against 2001');
    // Renewables +20,496 and fossil fuels −6,032, in units: no percentage, multiple or points.
    expect(p.title).toContain('+20.5K');
    expect(p.title).toContain('\u22126.03K');
    expect(p.caption).not.toMatch(/%|pts|\u00d7/);
    expect(captionProblems(answer, p)).toEqual([]);
    // The chart shows the whole stretch, not only its two ends.
    const series = answer.findings.filter((x) => x.type === 'value_compare_series');
    expect(series.every((s) => s.type === 'value_compare_series' && s.points.length === 17)).toBe(true);
  });

  it('growth drivers since a start compare the same two years', async () => {
    const truth = await generation();
    const sq: SubQuestion = {
      id: 'drivers', kind: 'growth', lens: 'breakdown', template: 'growth_drivers', metrics: ['net_generation'], dimension: 'source',
      grain: 'year', window: { start: '2001-01-01', end: '2018-01-01' }, filters: [], spanEnds: 'year',
    };
    const answer = await answerSubQuestion(sq, ws);
    const f = answer.findings.find((x): x is GrowthDriversFinding => x.type === 'growth_drivers')!;
    expect(f.current).toEqual({ start: '2017-01-01', end: '2018-01-01' });
    expect(f.prior).toEqual({ start: '2001-01-01', end: '2002-01-01' });
    const renewables = f.segments.find((s) => s.segment === 'Renewables')!;
    expect(renewables.after! - renewables.before!).toBeCloseTo(truth.get('Renewables 2017')! - truth.get('Renewables 2001')!, 6);
    const p = SUB_QUESTIONS.growth_drivers.present(answer, presentContext(ws, 'managers'));
    expect(p.caption).toContain('2017 against 2001');
    // Renewables' 2001 base is under a tenth of the typical level: its change is said in units
    // (analysis/stats/growth.ts), never as +1,426%.
    expect(p.caption).not.toMatch(/1,4\d\d%/);
    expect(captionProblems(answer, p)).toEqual([]);
  });

  it('with fewer than two whole years in the stretch, compares as before (a year earlier)', async () => {
    const sq: SubQuestion = {
      id: 'vc', kind: 'growth', lens: 'summary', template: 'value_compare', metrics: ['net_generation'], dimension: 'source',
      grain: 'year', window: { start: '2017-01-01', end: '2018-01-01' }, filters: [], spanEnds: 'year',
      contrast: { dimension: 'source', values: ['Renewables', 'Fossil Fuels'] },
    };
    const f = (await answerSubQuestion(sq, ws)).findings.find((x): x is ValueCompareFinding => x.type === 'value_compare')!;
    expect(f.priorBasis).toBe('year_earlier');
    expect(f.prior).toEqual({ start: '2016-01-01', end: '2017-01-01' });
  });
});

// Two named months of different lengths, on vega-datasets' seattle-weather.csv (NOAA daily
// weather in Seattle, 2012–2015): rain days against sun days, February 2012 (29 days) against
// January 2012 (31). Counts and per-day figures checked against the test's own SQL.
describe('named periods of different lengths', () => {
  let seattle: Workspace;
  beforeAll(async () => {
    const dir = mkdtempSync(join(tmpdir(), 'tc-seattle-'));
    const file = join(dir, 'seattle.yaml');
    writeFileSync(file, `version: 1
datasets:
  - name: seattle_weather
    label: Seattle weather
    source: { kind: csv, paths: [${vegaDataFile('seattle-weather.csv')}] }
    time_column: date
    timezone: UTC
    metrics:
      - { name: days, label: Days, count: rows, unit: count, kind: flow }
      - { name: temp_max, label: Highest temperature, average: temp_max, unit: number, kind: level }
    dimensions:
      - { name: weather, label: Weather, column: weather }
`);
    seattle = await openWorkspace(loadConfig(file));
  }, 60_000);
  afterAll(async () => {
    await seattle?.source.close();
  });
  const sq = (metric: string): SubQuestion => ({
    id: 'vc', kind: 'growth', lens: 'summary', template: 'value_compare', metrics: [metric], dimension: 'weather', grain: 'day',
    window: { start: '2012-02-01', end: '2012-03-01' }, compareWindow: { start: '2012-01-01', end: '2012-02-01' }, filters: [],
    contrast: { dimension: 'weather', values: ['rain', 'sun'] },
  });

  it('gives a count per day when a 29-day month is set against a 31-day one', async () => {
    const db = await DuckDBInstance.create(':memory:');
    const conn = await db.connect();
    const rows = (await conn.runAndReadAll(`SELECT weather, month(date) AS m, COUNT(*)::DOUBLE AS n FROM read_csv_auto('${vegaDataFile('seattle-weather.csv')}')
      WHERE date >= DATE '2012-01-01' AND date < DATE '2012-03-01' AND weather IN ('rain', 'sun') GROUP BY 1, 2`)).getRowObjectsJson();
    conn.closeSync();
    db.closeSync();
    const n = (w: string, m: number) => Number(rows.find((r) => r.weather === w && Number(r.m) === m)!.n);
    const answer = await answerSubQuestion(sq('days'), seattle);
    const f = answer.findings.find((x): x is ValueCompareFinding => x.type === 'value_compare')!;
    expect(f.first.current).toBe(n('rain', 2));
    expect(f.first.prior).toBe(n('rain', 1));
    expect(f.lengths).not.toBeNull();
    expect([f.lengths!.current, f.lengths!.prior]).toEqual([29, 31]);
    expect(f.lengths!.perDay!.first.current).toBeCloseTo(n('rain', 2) / 29, 10);
    expect(f.lengths!.perDay!.first.growth).toBeCloseTo(n('rain', 2) / 29 / (n('rain', 1) / 31) - 1, 10);
    const p = SUB_QUESTIONS.value_compare.present(answer, presentContext(seattle, 'managers'));
    expect(p.caption).toContain('Feb 2012 has 29 days and Jan 2012 31, so per day: rain');
    expect(captionProblems(answer, p)).toEqual([]);
  });

  it('says an average is not changed by the days', async () => {
    const answer = await answerSubQuestion(sq('temp_max'), seattle);
    const p = SUB_QUESTIONS.value_compare.present(answer, presentContext(seattle, 'managers'));
    expect(p.caption).toContain('has 29 days and Jan 2012 31; highest temperature is not a total, so the days do not change it.');
  });
});
