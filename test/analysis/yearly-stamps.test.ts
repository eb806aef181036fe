// Data stamped once a year stands for the whole of each year, as monthly stamps stand for their
// month: the window words, chart subtitles and footers, the period prompt and the automatic "last
// complete year against the one before" all treat the stamp of 1 January 2017 as 2017. Checked on
// vega-datasets' iowa-electricity.csv (US EIA net generation in Iowa by source, one row per source
// per year stamped 1 January, 2001 to 2017 per the file itself), against plain SQL on the CSV.
import { DuckDBInstance } from '@duckdb/node-api';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../analysis/answer-sub-question.js';
import type { GrowthDriversFinding } from '../../analysis/findings/growth.js';
import { SUB_QUESTIONS } from '../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../analysis/types.js';
import { dataDateWords, describeWindow, shortWindow, windowWordsGrain } from '../../analysis/window-words.js';
import { datasetFacts, openWorkspace, type Workspace } from '../../analysis/workspace.js';
import { nextPrompt } from '../../bot/prompts.js';
import { readWindowAnswer } from '../../bot/reading/answers.js';
import { readRequest } from '../../bot/reading/read-request.js';
import { parseConfigText } from '../../config/load.js';
import { vegaDataFile } from '../helpers/open-data.js';

const IOWA = vegaDataFile('iowa-electricity.csv');

/** Net generation per year and source, summed by plain SQL on the CSV (the truth the answers are held to). */
async function yearlyTotals(): Promise<Map<number, number>> {
  const db = await DuckDBInstance.create(':memory:');
  const con = await db.connect();
  try {
    const r = await con.runAndReadAll(`SELECT year(CAST("year" AS DATE)) AS y, SUM(net_generation)::DOUBLE AS total FROM read_csv_auto('${IOWA.replace(/'/g, "''")}') GROUP BY 1 ORDER BY 1`);
    return new Map(r.getRowObjectsJS().map((row) => [Number(row.y), Number(row.total)]));
  } finally {
    con.closeSync();
    db.closeSync();
  }
}

describe('yearly stamps stand for their whole year (iowa-electricity.csv, vega-datasets)', () => {
  let ws: Workspace;
  let totals: Map<number, number>;
  beforeAll(async () => {
    const config = parseConfigText(
      `version: 1
datasets:
  - name: iowa
    label: Iowa electricity
    source: { kind: csv, paths: ["${IOWA}"] }
    time_column: year
    timezone: UTC
    metrics:
      - { name: net_generation, label: Net generation, sum: net_generation, unit: number, kind: flow }
    dimensions:
      - { name: source, label: Source, column: source }
`,
      '/virtual/yearly-stamps.yaml',
    );
    ws = await openWorkspace(config);
    totals = await yearlyTotals();
  });
  afterAll(async () => {
    await ws?.source.close();
  });

  it('reads the file as stamped yearly, 1 January 2001 to 1 January 2017', () => {
    expect(ws.coverage.stamps).toBe('yearly');
    expect(ws.coverage.firstDate).toBe('2001-01-01');
    expect(ws.coverage.lastDate).toBe('2017-01-01');
    expect([...totals.keys()]).toEqual(Array.from({ length: 17 }, (_, i) => 2001 + i));
  });

  it('says windows, chart subtitles and the data date in years', () => {
    const all = { start: '2001-01-01', end: '2018-01-01' };
    expect(windowWordsGrain(all, 'yearly')).toBe('year');
    expect(describeWindow(all, ws.coverage, 'en-GB')).toBe('2001 to 2017');
    expect(describeWindow({ start: '2017-01-01', end: '2018-01-01' }, ws.coverage, 'en-GB')).toBe('2017');
    expect(shortWindow(all, 'yearly', 'en-GB')).toBe('2001 to 2017');
    expect(dataDateWords(ws.coverage.lastDate!, 'yearly', 'en-GB')).toBe('2017');
    // A window past the data is said to end with its last year, not on 1 January.
    expect(describeWindow({ start: '2010-01-01', end: '2020-01-01' }, ws.coverage, 'en-GB')).toBe('2010 to 2019 (the data ends with 2017)');
    // A window that cuts a year is said in the months it keeps, never in days the data has not got.
    expect(describeWindow({ start: '2016-07-01', end: '2018-01-01' }, ws.coverage, 'en-GB')).toBe('July 2016 to December 2017');
    // Quarterly stamps follow the same rule; daily data keeps its days.
    expect(shortWindow({ start: '2024-04-01', end: '2025-01-01' }, 'quarterly', 'en-GB')).toBe('Q2 2024 to Q4 2024');
    expect(shortWindow(all, 'daily', 'en-GB')).toBe('1 Jan 2001 to 31 Dec 2017');
  });

  it('compares the last complete year with the whole year before, not with its first day', async () => {
    const def = SUB_QUESTIONS.growth_drivers;
    const sq: SubQuestion = { id: 'q', kind: def.kind, lens: def.lens, template: 'growth_drivers', metrics: ['net_generation'], dimension: 'source', grain: 'year', window: { start: '2001-01-01', end: '2018-01-01' }, filters: [] };
    const answer = await answerSubQuestion(sq, ws);
    const f = answer.findings.find((x): x is GrowthDriversFinding => x.type === 'growth_drivers')!;
    expect(f.current).toEqual({ start: '2017-01-01', end: '2018-01-01' });
    expect(f.prior).toEqual({ start: '2016-01-01', end: '2017-01-01' });
    expect(f.total.after).toBe(totals.get(2017));
    expect(f.total.before).toBe(totals.get(2016));
    const caption = def.present(answer, (await import('../../bot/present-answer.js')).presentContext(ws, 'managers')).caption;
    expect(caption).toContain('2017 against 2016');
    // Two whole years have the same number of days' worth of stamps: no per-day sentence.
    expect(caption).not.toMatch(/per day|1 Jan 2016/);
  });

  it('says the data in years on the period prompt, and offers no 12 months that are the last year again', () => {
    const facts = datasetFacts(ws);
    const now = new Date('2026-12-05T09:00:00Z');
    const brief = readRequest('net generation in 2031', facts, { now });
    const prompt = nextPrompt(brief, { dataset: ws.dataset, coverage: ws.coverage, facts, now, locale: 'en-GB' });
    expect(prompt?.topic).toBe('window');
    expect(prompt!.question).toContain('The data runs from 2001 to 2017; 2031 is after it');
    expect(prompt!.options.map((o) => o.label)).toEqual(['All the data (2001 to 2017)', '2017']);
  });

  // The file ends with 2017; on 5 December 2026 it is stale, so relative periods count back from its end.
  const now = new Date('2026-12-05T09:00:00Z');

  it('"this year vs last year" on data that ended years ago recommends the data\'s latest year against the one before', () => {
    const facts = datasetFacts(ws);
    const brief = readRequest('total net generation this year vs last year', facts, { now });
    expect(brief.anchor?.today).toBe('2018-01-01');
    expect(brief.toAsk).toContain('window');
    const prompt = nextPrompt(brief, { dataset: ws.dataset, coverage: ws.coverage, facts, now, locale: 'en-GB' })!;
    expect(prompt.recommended.value).toBe('2017 vs 2016');
    expect(prompt.recommended.label).toBe("2017 against 2016 (the data's latest year and the one before)");
    expect(prompt.recommended.reason).toContain('the data ends in 2017');
    expect(prompt.options[0]!.value).toBe('2017 vs 2016');
    // Taking it reads back as those two whole years.
    const taken = readWindowAnswer(prompt.recommended.value, facts, now);
    expect(taken).toEqual({ ok: true, value: { window: { start: '2017-01-01', end: '2018-01-01' }, compareWindow: { start: '2016-01-01', end: '2017-01-01' } } });
  });

  it('"the latest year" is the data\'s latest year, 2017, not the calendar year before today', () => {
    const brief = readRequest('KPI snapshot of net generation for the latest year, for leadership', datasetFacts(ws), { now });
    expect(brief.window).toEqual({ start: '2017-01-01', end: '2018-01-01' });
    expect(brief.toAsk ?? []).not.toContain('window');
    expect((brief.saidBack ?? []).join(' ')).not.toMatch(/2025/);
  });
});
