// A segment that was not there through both spans gets no growth rate of its own in growth_drivers:
// it is named as new or gone, never given a percentage as if like for like. Checked on
// vega-datasets' seattle-weather.csv (public daily record, 2012–2015) by weather type, 2015 against
// 2014: drizzle has no day in 2014 and returns on 15 June 2015; snow falls only from 8 February to
// 29 November 2014 over the two years.
// Expected counts come from the CSV read in plain JavaScript (test/analysis/stats/seattle-weather.ts).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { GrowthDriversFinding } from '../../../analysis/findings/growth.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { presentContext } from '../../../bot/present-answer.js';
import { captionProblems } from '../../helpers/caption-checks.js';
import { loadSeattleWeather, seattleWeatherConfig } from '../stats/seattle-weather.js';

let ws: Workspace;
beforeAll(async () => {
  ws = await openWorkspace(seattleWeatherConfig());
});
afterAll(async () => ws?.source.close());

const days = loadSeattleWeather();
const count = (year: string, keep: (weather: string) => boolean) => days.filter((d) => d.date.startsWith(year) && keep(d.weather)).length;

describe('growth by weather type, 2015 against 2014', () => {
  const sq: SubQuestion = {
    id: 'drivers',
    kind: 'growth',
    lens: 'breakdown',
    template: 'growth_drivers',
    metrics: ['days'],
    dimension: 'weather',
    grain: 'month',
    window: { start: '2015-01-01', end: '2016-01-01' },
    filters: [],
  };

  it('names drizzle as new and snow as there only part of the time, leaves both out of the like-for-like total, and gives drizzle no percentage', async () => {
    expect(count('2014', (w) => w === 'drizzle')).toBe(0);
    const firstDrizzle2015 = days.find((d) => d.date.startsWith('2015') && d.weather === 'drizzle')!.date;
    const snow = days.filter((d) => d.weather === 'snow' && d.date >= '2014').map((d) => d.date);
    expect(firstDrizzle2015).toBe('2015-06-15');
    const answer = await answerSubQuestion(sq, ws);
    const f = answer.findings.find((x): x is GrowthDriversFinding => x.type === 'growth_drivers')!;
    const lfl = f.likeForLike!;
    expect(lfl.excluded.map((s) => [s.segment, s.opened, s.closed, s.firstDay]).sort()).toEqual([
      ['drizzle', true, true, firstDrizzle2015],
      ['snow', true, true, snow[0]],
    ]);
    expect(lfl.excluded.find((s) => s.segment === 'snow')!.lastDay).toBe(snow[snow.length - 1]);
    const through = (w: string) => w !== 'drizzle' && w !== 'snow';
    expect(lfl.before).toBe(count('2014', through));
    expect(lfl.after).toBe(count('2015', through));

    const p = SUB_QUESTIONS.growth_drivers.present(answer, presentContext(ws, 'managers'));
    expect(captionProblems(answer, p)).toEqual([]);
    const drizzle = count('2015', (w) => w === 'drizzle');
    expect(p.caption).toContain(`drizzle +${drizzle} (new in June 2015: not in the base, 2014)`);
    expect(p.caption).not.toMatch(/drizzle \+\d+, [+\u2212]/);
  });
});
