// Per-day figures keep enough digits to be read: a count's "1.4 a day" is not "1 a day". Checked
// on vega-datasets' seattle-weather.csv (public daily record, 2012–2015): rain days per day of each
// calendar month over the four full years, computed here in plain JavaScript and rounded with
// Number.prototype.toPrecision (three significant figures), never through the project's formatter.
// Counts of periods in notes come from the grammar helper ("1 month", "3 weeks"), never "period(s)".
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import { caveatFlag, caveatNote } from '../../../analysis/captions/caveat-text.js';
import { formatValue } from '../../../analysis/format.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { presentContext } from '../../../bot/present-answer.js';
import { loadSeattleWeather, seattleWeatherConfig } from '../stats/seattle-weather.js';

// toPrecision keeps trailing zeros ("1.40"), as the caption does beside "1.43".
// Three significant figures, two below 0.1 (analysis/format.ts: a third figure there is past any metric's precision).
const threeFigures = (x: number) => x.toPrecision(Math.abs(x) < 0.1 ? 2 : 3);

describe('a rate of a count keeps three significant figures below 100', () => {
  it('matches toPrecision(3) for small rates and whole units from 100', () => {
    for (const x of [1.4, 1.43333, 0.0347, 0.5, 12.345, 99.94]) expect(formatValue(x, { unit: 'count', locale: 'en' }, { rate: true })).toBe(threeFigures(x));
    expect(formatValue(11999.09, { unit: 'count', locale: 'en' }, { rate: true })).toBe('11,999');
    // A total stays whole.
    expect(formatValue(1.4, { unit: 'count', locale: 'en' })).toBe('1');
  });
});

describe('seasonality of rain days per day, Seattle 2012–2015', () => {
  let ws: Workspace;
  beforeAll(async () => {
    ws = await openWorkspace(seattleWeatherConfig());
  });
  afterAll(async () => ws?.source.close());

  it('names the busiest and quietest month per day with the CSV figures to three significant figures', async () => {
    const rain = Array.from({ length: 12 }, () => 0);
    const all = Array.from({ length: 12 }, () => 0);
    for (const d of loadSeattleWeather()) {
      const m = Number(d.date.slice(5, 7)) - 1;
      all[m]!++;
      if (d.weather === 'rain') rain[m]!++;
    }
    const perDay = rain.map((n, i) => n / all[i]!);
    const top = perDay.indexOf(Math.max(...perDay));
    const bottom = perDay.indexOf(Math.min(...perDay));
    const name = (m: number) => new Date(Date.UTC(2020, m, 1)).toLocaleString('en', { month: 'long', timeZone: 'UTC' });
    const sq: SubQuestion = {
      id: 'season',
      kind: 'trend',
      lens: 'time_pattern',
      template: 'trend_seasonality',
      metrics: ['days'],
      grain: 'month',
      window: { start: '2012-01-01', end: '2016-01-01' },
      filters: [{ dimension: 'weather', values: ['rain'] }],
    };
    const answer = await answerSubQuestion(sq, ws);
    const caption = SUB_QUESTIONS.trend_seasonality.present(answer, presentContext(ws, 'managers')).caption;
    expect(caption).toContain(`the busiest month is ${name(top)} (${threeFigures(perDay[top]!)} a day) and the quietest ${name(bottom)} (${threeFigures(perDay[bottom]!)} a day)`);
  });

  it('fog days (rare, rising): three full years of a rare count show no steady month pattern, and the title names no busiest months', async () => {
    // Fog days per calendar month over the full years the series covers (fog is first recorded in
    // July 2012, so 2013–2015), counted here from the CSV: the months trade places year to year.
    const byYear = new Map<string, number[]>();
    for (const d of loadSeattleWeather()) {
      if (d.weather !== 'fog' || d.date < '2013-01-01') continue;
      const counts = byYear.get(d.date.slice(0, 4)) ?? Array.from({ length: 12 }, () => 0);
      counts[Number(d.date.slice(5, 7)) - 1]!++;
      byYear.set(d.date.slice(0, 4), counts);
    }
    const tops = [...byYear.values()].map((c) => c.indexOf(Math.max(...c)));
    expect(new Set(tops).size).toBeGreaterThan(1);
    const sq: SubQuestion = {
      id: 'fog',
      kind: 'trend',
      lens: 'time_pattern',
      template: 'trend_seasonality',
      metrics: ['days'],
      grain: 'month',
      window: { start: '2012-01-01', end: '2016-01-01' },
      filters: [{ dimension: 'weather', values: ['fog'] }],
    };
    const answer = await answerSubQuestion(sq, ws);
    const season = answer.findings.find((f) => f.type === 'trend_seasonality');
    // X-11's F-test for stable seasonality, present below p = 0.001 (Lothian & Morry 1978).
    expect(season && 'stable' in season ? season.stable!.pValue : 0).toBeGreaterThanOrEqual(0.001);
    const shown = SUB_QUESTIONS.trend_seasonality.present(answer, presentContext(ws, 'managers'));
    expect(shown.title).toMatch(/no steady seasonal pattern/);
    expect(shown.title).not.toMatch(/busiest/);
  });
});

describe('counts of periods in notes', () => {
  it('say "1 month" and "3 weeks", never "period(s)"', () => {
    const one = caveatNote({ code: 'series_gap', data: { metric: 'days', periods: 1, firstGap: '2013-07-01', grain: 'month' } }, 'en');
    const three = caveatNote({ code: 'segment_gap', data: { segment: 'fog', periods: 3, firstGap: '2013-07-01', grain: 'week' } }, 'en');
    expect(one).toBe('1 month has no data at all: July 2013.');
    expect(three).toMatch(/^fog has no data for 3 weeks, from /);
    for (const note of [one, three]) expect(note).not.toMatch(/\(s\)/);
  });

  it('a filtered series that starts late says where it starts, in the note and the chart flag', () => {
    const lead = { code: 'empty_period' as const, data: { leading: true, periods: 6, firstEmpty: '2012-01-01', firstMatch: '2012-07-01', grain: 'month' } };
    expect(caveatNote(lead, 'en')).toBe('No rows match the filter before July 2012 (the 6 months from January 2012), so the series starts there.');
    expect(caveatFlag(lead)).toBe('The series starts at the first period with matching rows.');
    expect(caveatFlag({ code: 'empty_period', data: { periods: 2, firstEmpty: '2012-05-01', grain: 'month' } })).toBe('Some periods have no rows that match the filter.');
  });
});
