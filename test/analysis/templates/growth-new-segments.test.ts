// A segment that was not there through both spans gets no growth rate of its own in growth_drivers:
// it is named as new or gone, never given a percentage as if like for like; whether it was there is
// read from the whole record. Checked on vega-datasets' seattle-weather.csv (public daily record,
// 2012–2015) by weather type, 2015 against 2014: drizzle has no day in 2014 and returns on 15 June
// 2015, but it has days in 2012 and 2013, so it is a sparse type, not a new one.
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

  it('drizzle and snow have days from 2012, so neither is new: drizzle counts zero in 2014 with no percentage, and neither is said to have ended (both are sparse)', async () => {
    expect(count('2014', (w) => w === 'drizzle')).toBe(0);
    const firstDrizzle2015 = days.find((d) => d.date.startsWith('2015') && d.weather === 'drizzle')!.date;
    expect(firstDrizzle2015).toBe('2015-06-15');
    // The whole record says drizzle and snow are weather types of every year from 2012, not new ones.
    const first = (w: string) => days.find((d) => d.weather === w)!.date;
    expect(first('drizzle') < '2014-01-01').toBe(true);
    expect(first('snow') < '2014-01-01').toBe(true);
    const answer = await answerSubQuestion(sq, ws);
    const f = answer.findings.find((x): x is GrowthDriversFinding => x.type === 'growth_drivers')!;
    // Neither opened (both have days from 2012) nor closed: drizzle's last day (6 October 2015) and
    // snow's (29 November 2014) come before the record's end, but both are sparse, and a silence that
    // long is ordinary for them (the run test of analysis/presence.ts; the months are counted in
    // like-for-like-sparse.test.ts). So both stay in like for like and there is no separate figure.
    expect(f.likeForLike).toBeNull();
    const drizzleRow = f.segments.find((s) => s.segment === 'drizzle')!;
    expect(drizzleRow.before).toBe(0);
    expect(drizzleRow.after).toBe(count('2015', (w) => w === 'drizzle'));
    expect(drizzleRow.relative).toBeNull();
    expect(answer.caveats.filter((c) => c.code === 'late_segment' || c.code === 'segment_gap')).toEqual([]);

    const p = SUB_QUESTIONS.growth_drivers.present(answer, presentContext(ws, 'managers'));
    expect(captionProblems(answer, p)).toEqual([]);
    expect(p.caption).not.toMatch(/new in|opened|closed|last there|like for like/i);
    expect(p.caption).not.toMatch(/drizzle \+\d+, [+\u2212]/);
  });
});
