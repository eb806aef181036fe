// A segment's "trend" over less than two years of months is its seasonal swing: no segment is named
// as growing fastest. On open data: FAA wildlife strikes 1990–2002 (vega-datasets birdstrikes.csv);
// the span of complete months is checked by the test's own SQL.
import { DuckDBInstance } from '@duckdb/node-api';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { SegmentTrendOverviewFinding } from '../../../analysis/findings/segments.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { STRIKES_CONFIG, STRIKES_TABLE } from './open-data-tables.js';
import { memoryWorkspace } from './trend-memory-db.js';

const CONFIG = `${STRIKES_CONFIG.trimEnd()}
      - name: time_of_day
        label: Time of day
        column: Time of day
`;
let ws: Awaited<ReturnType<typeof memoryWorkspace>>;
beforeAll(async () => {
  ws = await memoryWorkspace([STRIKES_TABLE], CONFIG);
});
afterAll(async () => {
  await ws?.source.close();
});

const trend = (window: SubQuestion['window']): SubQuestion => ({ id: 'seg', kind: 'trend', lens: 'breakdown', template: 'segment_trend', metrics: ['strikes'], grain: 'month', window, filters: [], dimension: 'time_of_day' });
const present = (answer: Awaited<ReturnType<typeof answerSubQuestion>>) =>
  SUB_QUESTIONS.segment_trend.present(answer, { dataset: ws.dataset, locale: 'en-GB', audience: 'managers', chart: { width: 1200, height: 675, scale: 1 }, dataAsOf: ws.coverage.lastDate });

describe('segment trends over under two years are the season', () => {
  it('2001 alone (12 months): no time of day named as growing, the span said too short', async () => {
    const db = await DuckDBInstance.create(':memory:');
    const c = await db.connect();
    await c.run(STRIKES_TABLE);
    // Every month of 2001 has strikes (the file's own count), so the span is 12 complete months.
    const months = Number(((await c.runAndReadAll(`SELECT COUNT(DISTINCT month("Flight Date")) AS n FROM strikes WHERE year("Flight Date") = 2001`)).getRowObjectsJson()[0] as { n: unknown }).n);
    c.closeSync();
    db.closeSync();
    expect(months).toBe(12);
    const answer = await answerSubQuestion(trend({ start: '2001-01-01', end: '2002-01-01' }), ws);
    const overview = answer.findings.find((f): f is SegmentTrendOverviewFinding => f.type === 'segment_trend_overview')!;
    expect(overview.seasonUnresolved).toBe(true);
    const shown = present(answer);
    expect(shown.title).toBe("Strikes by time of day: too short a span to tell each one's trend from the season");
    expect(shown.caption).toContain('cannot be told apart from the usual seasonal pattern, so none is named as growing fastest');
    expect(shown.caption).not.toMatch(/grew fastest|rose most|\(trend\)/);
  });

  it('1991 to 2001 (full years): compound growth names the fastest as before', async () => {
    const answer = await answerSubQuestion(trend({ start: '1991-01-01', end: '2002-01-01' }), ws);
    const overview = answer.findings.find((f): f is SegmentTrendOverviewFinding => f.type === 'segment_trend_overview')!;
    expect(overview.seasonUnresolved).toBeUndefined();
    expect(overview.fastest?.measure).toBe('cagr');
    expect(present(answer).title).not.toContain('too short a span');
  });
});
