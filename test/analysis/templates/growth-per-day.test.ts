// "Did flights per day grow from January to June?": a growth answer asked per day compares each
// period's daily average (its total over the days the data covers), not its total, so a 31-day
// January meets a 30-day June on equal terms; the totals are said beside when they tell another
// story. On vega-datasets' flights-3m.parquet (US domestic flights, January to June 2001, public FAA
// on-time data as packaged by vega-datasets). Expected values come from the test's own SQL over the
// file: flights counted per calendar month and divided by the month's days.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import { metricByName } from '../../../analysis/catalog.js';
import { growthDriversWords } from '../../../analysis/captions/growth-drivers-caption.js';
import { growthPeriodsWords } from '../../../analysis/captions/growth-periods-caption.js';
import type { GrowthDriversFinding, GrowthPeriodsFinding } from '../../../analysis/findings/growth.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { parseConfigText } from '../../../config/load.js';
import { readBrief } from '../../../cli/read.js';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { NOW } from '../../reading/public-data.js';
import { flightsParquetConfigText, vegaDataFile } from '../../helpers/open-data.js';

const FLIGHTS = vegaDataFile('flights-3m.parquet');
const CONFIG_TEXT = `${flightsParquetConfigText()}    dimensions:\n      - { name: origin, label: Origin airport, column: origin }\n`;
const config = parseConfigText(CONFIG_TEXT, '/virtual/flights.yaml');
const FLIGHTS_CONFIG = join(mkdtempSync(join(tmpdir(), 'tc-per-day-growth-')), 'flights.yaml');
writeFileSync(FLIGHTS_CONFIG, CONFIG_TEXT);
const JUNE = { start: '2001-06-01', end: '2001-07-01' };
const JANUARY = { start: '2001-01-01', end: '2001-02-01' };
const base = { id: 'per-day-growth', kind: 'growth', lens: 'summary', metrics: ['flights'], window: JUNE, compareWindow: JANUARY, filters: [], grain: 'month', perDay: true } as const;

describe('growth asked per day (flights-3m.parquet, January against June 2001)', () => {
  let ws: Workspace;
  const own = async (sql: string) => (await ws.source.run({ sql, params: [] }, { maxRows: 1000, timeoutMs: 120_000 })).rows;
  let truth: { jan: number; jun: number; janDays: number; junDays: number };
  beforeAll(async () => {
    ws = await openWorkspace(config, 'flights', {}, new Date('2026-12-05T12:00:00Z'));
    // The test's own counts per month and days per month (calendar days: the data covers every day of both).
    const rows = await own(`SELECT strftime(date_trunc('month', date), '%m') AS m, CAST(COUNT(*) AS DOUBLE) AS n, CAST(COUNT(DISTINCT CAST(date AS DATE)) AS DOUBLE) AS days
      FROM read_parquet('${FLIGHTS}') WHERE date >= DATE '2001-01-01' AND date < DATE '2001-07-01' AND date_trunc('month', date) IN (DATE '2001-01-01', DATE '2001-06-01') GROUP BY 1 ORDER BY 1`);
    truth = { jan: Number(rows[0]!.n), jun: Number(rows[1]!.n), janDays: Number(rows[0]!.days), junDays: Number(rows[1]!.days) };
  }, 120_000);
  afterAll(async () => ws?.source.close());

  it('compares the two months by their daily averages, and says the totals fell', async () => {
    expect([truth.janDays, truth.junDays]).toEqual([31, 30]);
    const a = await answerSubQuestion({ ...base, template: 'growth_periods' } as unknown as SubQuestion, ws);
    const f = a.findings.find((x): x is GrowthPeriodsFinding => x.type === 'growth_periods')!;
    expect(f.perDay?.days).toEqual({ before: 31, after: 30 });
    expect(Math.abs(f.total.before! - truth.jan / 31)).toBeLessThan(1e-9);
    expect(Math.abs(f.total.after! - truth.jun / 30)).toBeLessThan(1e-9);
    expect(Math.abs(f.total.relative! - (truth.jun / 30 / (truth.jan / 31) - 1))).toBeLessThan(1e-12);
    expect(f.perDay?.totals.before).toBe(truth.jan);
    expect(f.perDay?.totals.after).toBe(truth.jun);
    // On this file the two stories differ: per day up, in total down (June has a day fewer).
    expect(truth.jun / 30 > truth.jan / 31 && truth.jun < truth.jan).toBe(true);
    const words = growthPeriodsWords(metricByName(ws.dataset, 'flights'), f, 'en-GB');
    expect(words.title).toMatch(/^Flights per day: [\d.,kK]+ in Jun 2001 against [\d.,kK]+ in Jan 2001$/);
    expect(words.caption).toMatch(/^Flights per day rose \d+\.\d% from Jan 2001 to Jun 2001/);
    expect(words.caption).toContain('Jun 2001 has 30 days and Jan 2001 31');
    expect(words.caption).toMatch(/In totals the story differs: flights fell \d+\.\d%/);
  }, 120_000);

  it('splits the change in flights per day by origin, the parts adding up to the total per day', async () => {
    const a = await answerSubQuestion({ ...base, lens: 'breakdown', template: 'growth_drivers', dimension: 'origin' } as unknown as SubQuestion, ws);
    const f = a.findings.find((x): x is GrowthDriversFinding => x.type === 'growth_drivers')!;
    expect(Math.abs(f.total.change! - (truth.jun / 30 - truth.jan / 31))).toBeLessThan(1e-9);
    const top = f.segments[0]!;
    const seg = await own(`SELECT CAST(COUNT(*) FILTER (WHERE date >= DATE '2001-06-01' AND date < DATE '2001-07-01') AS DOUBLE) AS jun, CAST(COUNT(*) FILTER (WHERE date >= DATE '2001-01-01' AND date < DATE '2001-02-01') AS DOUBLE) AS jan
      FROM read_parquet('${FLIGHTS}') WHERE origin = '${top.segment}'`);
    expect(Math.abs(top.change! - (Number(seg[0]!.jun) / 30 - Number(seg[0]!.jan) / 31))).toBeLessThan(1e-9);
    const parts = [...f.segments.map((s) => s.change!), f.others?.change ?? 0].reduce((x, y) => x + y, 0);
    expect(Math.abs(parts - f.total.change!)).toBeLessThan(1e-6);
    const words = growthDriversWords(metricByName(ws.dataset, 'flights'), f, ws.dataset, 'en-GB', 'managers');
    expect(words.title).toContain('flights per day');
    expect(words.caption).toMatch(/^Flights per day rose/);
  }, 120_000);

  it.each([
    'Did flights per day grow from January to June?',
    'how much did daily flights rise from January to June',
    'growth in flights a day from Jan to Jun',
    'Did the average number of flights per day go up from January to June?',
  ])('reads "%s" as June against January, per day', async (text) => {
    const b = await readBrief({ configFile: FLIGHTS_CONFIG, text, now: NOW });
    const q = b.questions[0]!;
    expect(q.kind).toBe('growth');
    expect(q.window).toEqual({ from: '2001-06-01', to: '2001-06-30' });
    expect(q.compareWindow).toEqual({ from: '2001-01-01', to: '2001-01-31' });
    expect(q.perDay).toBe(true);
    expect(q.launchDate).toBeNull();
  });
});
