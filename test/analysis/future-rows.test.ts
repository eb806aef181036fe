// Rows dated after today, and "this year" read against them. vega-datasets' movies.json dates its
// films as "Dec 31 1946"-style text whose two-digit years were read in the wrong century upstream:
// 24 films fall after 2010 and some as late as 2046 (counted below by plain SQL on the file).
// "this year" is the calendar year holding the anchor, run to the anchor, against the same dates a
// year earlier: never 2026 to 2046 against 2025 to 2045.
import { DuckDBInstance } from '@duckdb/node-api';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { datasetFacts, openWorkspace, type Workspace } from '../../analysis/workspace.js';
import { readRequest } from '../../bot/reading/read-request.js';
import { fullWindow } from '../../bot/reading/answers.js';
import { answerSubQuestion } from '../../analysis/answer-sub-question.js';
import { SUB_QUESTIONS } from '../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../analysis/types.js';
import { parseConfigText } from '../../config/load.js';
import { checkConfig, formatCheckReport } from '../../analysis/sources/dataset-check.js';
import { MOVIES_FILE, MOVIES_RELEASE, moviesConfigText, vegaDataFile } from '../helpers/open-data.js';

const MOVIES = MOVIES_FILE;
const RELEASE = MOVIES_RELEASE;
// The run's clock: the day the newcomer's trial ran.
const now = new Date('2026-12-05T09:00:00Z');

/** Films dated after a day, and the last date on or before it, by plain SQL on the file. */
async function datesAround(day: string): Promise<{ after: number; firstAfter: string; lastAfter: string; lastOnOrBefore: string }> {
  const db = await DuckDBInstance.create(':memory:');
  const con = await db.connect();
  try {
    const r = await con.runAndReadAll(`WITH m AS (SELECT CAST(${RELEASE} AS DATE) AS d FROM read_json_auto('${MOVIES.replace(/'/g, "''")}'))
SELECT COUNT(*) FILTER (WHERE d > DATE '${day}')::DOUBLE AS after, CAST(MIN(d) FILTER (WHERE d > DATE '${day}') AS VARCHAR) AS first_after,
  CAST(MAX(d) FILTER (WHERE d > DATE '${day}') AS VARCHAR) AS last_after, CAST(MAX(d) FILTER (WHERE d <= DATE '${day}') AS VARCHAR) AS last_before FROM m`);
    const row = r.getRowObjectsJS()[0]!;
    return { after: Number(row.after), firstAfter: String(row.first_after), lastAfter: String(row.last_after), lastOnOrBefore: String(row.last_before) };
  } finally {
    con.closeSync();
    db.closeSync();
  }
}

describe('rows dated after today (movies.json, vega-datasets)', () => {
  let ws: Workspace;
  let loaded: ReturnType<typeof parseConfigText>;
  let truth: Awaited<ReturnType<typeof datesAround>>;
  beforeAll(async () => {
    const config = parseConfigText(
      moviesConfigText([`{ name: worldwide_gross, label: Worldwide Gross, sum: '"Worldwide Gross"', unit: number, kind: flow }`]),
      '/virtual/future-rows.yaml',
    );
    loaded = config;
    ws = await openWorkspace(config, undefined, {}, now);
    truth = await datesAround('2026-12-05');
  });
  afterAll(async () => {
    await ws?.source.close();
  });

  it('the file has films dated after the run\'s day (plain SQL)', () => {
    expect(truth.after).toBe(16);
    expect(truth.lastAfter).toBe('2046-12-31');
  });

  it('the coverage ends on the last date up to the run\'s day, and counts and dates the rows after it', () => {
    expect(ws.coverage.lastDate).toBe(truth.lastOnOrBefore);
    expect(ws.coverage.afterToday).toEqual({ day: '2026-12-05', rows: truth.after, firstDate: truth.firstAfter, lastDate: truth.lastAfter });
  });

  it('the card says the rows left out, once', () => {
    const brief = readRequest('total worldwide gross by month', datasetFacts(ws), { now });
    const said = (brief.saidBack ?? []).filter((l) => /dated after/.test(l));
    expect(said).toEqual(['16 rows dated after 5 December 2026 (12 August 2027 to 31 December 2046) are left out: a date in the future is likely a mistake in the data.']);
  });

  it('"this year vs last year" is the anchor\'s calendar year against the same dates a year earlier, never 2026 to 2046', () => {
    // The data now ends on 30 December 2025, before today, so relative periods count back from there.
    const brief = readRequest('total worldwide gross this year vs last year', datasetFacts(ws), { now });
    expect(brief.anchor?.today).toBe('2025-12-31');
    expect(brief.window).toEqual({ start: '2025-01-01', end: '2025-12-31' });
    expect(brief.compareWindow).toEqual({ start: '2024-01-01', end: '2024-12-31' });
  });

  it('"this year vs last year" read against rows up to 2046 ends at today: 2026 to 5 December against the same dates of 2025', () => {
    // The reader alone, given the whole file's dates: the anchor is today and no window runs past it.
    const whole = { ...datasetFacts(ws), coverage: { ...ws.coverage, lastDate: truth.lastAfter } };
    delete (whole.coverage as { afterToday?: unknown }).afterToday;
    const brief = readRequest('total worldwide gross this year vs last year', whole, { now });
    expect(brief.window).toEqual({ start: '2026-01-01', end: '2026-12-06' });
    expect(brief.compareWindow).toEqual({ start: '2025-01-01', end: '2025-12-06' });
    const since = readRequest('monthly worldwide gross since 2000', whole, { now });
    expect(since.window).toEqual({ start: '2000-01-01', end: '2026-12-06' });
  });

  it('a whole-history series ends with the data up to today: no month after December 2025', async () => {
    const def = SUB_QUESTIONS.series;
    const sq: SubQuestion = { id: 'q', kind: def.kind, lens: def.lens, template: 'series', metrics: ['worldwide_gross'], grain: 'year', window: fullWindow(ws.coverage)!, filters: [] };
    const answer = await answerSubQuestion(sq, ws);
    const periods = Object.values(answer.tables).flatMap((t) => t.rows.flatMap((r) => Object.values(r).filter((v): v is string => typeof v === 'string' && /^\d{4}-\d{2}-\d{2}$/.test(v))));
    expect(periods.length).toBeGreaterThan(50);
    expect(periods.every((p) => p <= '2025-12-31')).toBe(true);
  });

  it('`check` warns with the count and the range of the rows dated after today (the real clock)', async () => {
    const today = new Date().toISOString().slice(0, 10);
    const expected = await datesAround(today);
    const text = formatCheckReport(await checkConfig(loaded));
    if (expected.after === 0) expect(text).not.toMatch(/dated after/);
    else expect(text).toMatch(new RegExp(`time_column: ${expected.after} rows? dated after .* \\(.*${expected.lastAfter.slice(0, 4)}\\) (?:is|are) left out`));
  });
});
