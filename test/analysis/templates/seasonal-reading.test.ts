// Seasonal series read as seasonal (issue 17 item 8), on a public record that is seasonal for
// certain: vega-datasets' seattle-weather.csv (daily Seattle weather, 2012–2015). The mean daily
// maximum temperature climbs every spring; over nine months a trend test on the raw values calls
// that a significant rise, so under two years the answer must say the season cannot be told apart,
// and a snapshot's headline compares a month with the same month a year earlier, not the one before.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { KpiSnapshotFinding } from '../../../analysis/findings/kpi.js';
import type { TrendTestFinding } from '../../../analysis/findings/segments.js';
import { mannKendall } from '../../../analysis/stats/index.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { presentContext } from '../../../bot/present-answer.js';
import { loadSeattleWeather, seattleWeatherConfig } from '../stats/seattle-weather.js';

const config = seattleWeatherConfig(`metrics:
  - { name: warmth, label: Daily high, description: mean of the daily maximum temperature, average: temp_max, unit: number, decimals: 1, higher_is_better: true }
dimensions:
  - { name: weather, label: Weather, column: weather }`);

/** Mean temp_max of one calendar month, from the CSV in plain JavaScript. */
function monthMean(ym: string): number {
  const days = loadSeattleWeather().filter((d) => d.date.startsWith(ym));
  return days.reduce((a, d) => a + d.tempMax, 0) / days.length;
}

let ws: Workspace;
beforeAll(async () => {
  ws = await openWorkspace(config);
}, 60_000);
afterAll(async () => ws?.source.close());

const base = { kind: 'trend' as const, lens: 'time_pattern' as const, template: 'trend_test' as const, metrics: ['warmth'], grain: 'month' as const, filters: [] };

describe('a trend over less than two years of a seasonal series', () => {
  it('is not declared: January to September 2012 rises with the season, and the answer says so', async () => {
    const sq: SubQuestion = { id: 't', ...base, window: { start: '2012-01-01', end: '2012-10-01' } };
    const answer = await answerSubQuestion(sq, ws);
    const test = answer.findings.find((f): f is TrendTestFinding => f.type === 'trend_test')!;
    // The raw test does call it a significant rise (the fault the issue reports)…
    const raw = mannKendall(['01', '02', '03', '04', '05', '06', '07', '08', '09'].map((m) => monthMean(`2012-${m}`)))!;
    expect(raw.pValue).toBeLessThan(0.05);
    expect(test.pValue).toBeCloseTo(raw.pValue, 12);
    // …but nine months cannot separate it from the season.
    expect(test.seasonUnresolved).toBe(true);
    for (const audience of ['leadership', 'managers', 'analysts'] as const) {
      const p = SUB_QUESTIONS.trend_test.present(answer, presentContext(ws, audience));
      expect(p.title).toBe('Daily high rose from January 2012 to September 2012: too short a span to tell a trend from the season');
      expect(p.caption).not.toMatch(/unlikely to be chance/);
      if (audience !== 'analysts') expect(p.caption).toContain('cannot be told apart from the usual seasonal pattern');
    }
  });

  it('is tested on seasonally adjusted values over the four full years', async () => {
    const sq: SubQuestion = { id: 't4', ...base, window: { start: '2012-01-01', end: '2016-01-01' } };
    const test = (await answerSubQuestion(sq, ws)).findings.find((f): f is TrendTestFinding => f.type === 'trend_test')!;
    expect(test.n).toBe(48);
    expect(test.seasonallyAdjusted).toBe(true);
    expect(test.seasonUnresolved).toBeUndefined();
  });
});

describe('a snapshot of a seasonal series', () => {
  it('leads with the same month a year earlier: May 2015 against May 2014, not against April', async () => {
    const sq: SubQuestion = { id: 'k', kind: 'kpi', lens: 'time_pattern', template: 'kpi_snapshot', metrics: ['warmth'], grain: 'month', filters: [], window: { start: '2012-01-01', end: '2015-06-01' } };
    const answer = await answerSubQuestion(sq, ws);
    const f = answer.findings.find((x): x is KpiSnapshotFinding => x.type === 'kpi_snapshot')!;
    expect(f.period).toBe('2015-05-01');
    expect(f.value).toBeCloseTo(monthMean('2015-05'), 9);
    expect(f.lastYear!.value).toBeCloseTo(monthMean('2014-05'), 9);
    expect(f.previous.value).toBeCloseTo(monthMean('2015-04'), 9);
    const p = SUB_QUESTIONS.kpi_snapshot.present(answer, presentContext(ws, 'managers'));
    const change = ((monthMean('2015-05') - monthMean('2014-05')) / monthMean('2014-05')) * 100;
    expect(p.title).toBe(`Daily high was ${monthMean('2015-05').toFixed(1)} in May 2015, ${change >= 0 ? 'up' : 'down'} ${Math.abs(change).toFixed(1)}% on May 2014`);
    // April is far cooler than May in Seattle every year: the month-on-month change is the season's.
    expect(monthMean('2015-05') - monthMean('2015-04')).toBeGreaterThan(3);
  });
});
