// A filtered series whose rows start late says its own span in the chart subtitle, not the window
// asked for. On vega-datasets' seattle-weather.csv (daily weather, 2012–2015): the first "fog" day
// is in July 2012, read from the CSV here in plain JavaScript.
import { afterAll, beforeAll, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { loadSeattleWeather, seattleWeatherConfig } from '../stats/seattle-weather.js';

let ws: Workspace;
beforeAll(async () => {
  ws = await openWorkspace(seattleWeatherConfig());
});
afterAll(async () => {
  await ws?.source.close();
});

it('fog days by month over 2012–2015: the subtitle starts in July 2012, where the rows do', async () => {
  const firstFog = loadSeattleWeather().find((d) => d.weather === 'fog')!.date;
  expect(firstFog.slice(0, 7)).toBe('2012-07');
  const sq: SubQuestion = { id: 's', kind: 'trend', lens: 'time_pattern', template: 'series', metrics: ['days'], grain: 'month', window: { start: '2012-01-01', end: '2016-01-01' }, filters: [{ dimension: 'weather', values: ['fog'] }] };
  const answer = await answerSubQuestion(sq, ws);
  const shown = SUB_QUESTIONS.series.present(answer, { dataset: ws.dataset, locale: 'en-GB', audience: 'managers', chart: { width: 1200, height: 675, scale: 1 }, dataAsOf: ws.coverage.lastDate });
  const subtitle = shown.chart && 'subtitle' in shown.chart ? String(shown.chart.subtitle) : '';
  expect(subtitle).toMatch(/1 Jul 2012 to 31 Dec 2015/);
  expect(subtitle).not.toMatch(/1 Jan 2012/);
  // Unfiltered, the same window starts in January.
  const all = await answerSubQuestion({ ...sq, filters: [] }, ws);
  const allShown = SUB_QUESTIONS.series.present(all, { dataset: ws.dataset, locale: 'en-GB', audience: 'managers', chart: { width: 1200, height: 675, scale: 1 }, dataAsOf: ws.coverage.lastDate });
  expect(allShown.chart && 'subtitle' in allShown.chart ? String(allShown.chart.subtitle) : '').toMatch(/1 Jan 2012 to 31 Dec 2015/);
});
