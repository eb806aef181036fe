// "Which phase of flight is growing fastest": segments ranked by their own growth rate, small bases
// flagged, near-equal rates called about the same; and a non-additive metric's "moved most" is the
// segment with the largest own change. On open data: FAA wildlife strikes 1990–2002 (vega-datasets
// birdstrikes.csv). Every expected figure is computed here by the test's own SQL on the raw file.
import { DuckDBInstance, type DuckDBConnection } from '@duckdb/node-api';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { GrowthDriversFinding } from '../../../analysis/findings/growth.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { GrowthRank, SubQuestion } from '../../../analysis/types.js';
import { STRIKES_CONFIG, STRIKES_TABLE } from './open-data-tables.js';
import { memoryWorkspace } from './trend-memory-db.js';

// The newcomer's strikes config with a rate (the share of strikes that did damage) and two more breakdowns: the phase of flight (7 values), the time of day (4).
const CONFIG = `${STRIKES_CONFIG.replace(/    dimensions:\n/, `      - name: damaged_share
        label: Share of strikes with damage
        rate: { when: '"Effect Amount of damage" <> ''None''' }
        unit: percent
        higher_is_better: false
    dimensions:
`).trimEnd()}
      - name: phase
        label: Phase of flight
        column: Phase of flight
      - name: time_of_day
        label: Time of day
        column: Time of day
`;
let ws: Awaited<ReturnType<typeof memoryWorkspace>>;
let truthDb: DuckDBInstance;
let truth: DuckDBConnection;
beforeAll(async () => {
  ws = await memoryWorkspace([STRIKES_TABLE], CONFIG);
  truthDb = await DuckDBInstance.create(':memory:');
  truth = await truthDb.connect();
  await truth.run(STRIKES_TABLE);
});
afterAll(async () => {
  await ws?.source.close();
  truth?.closeSync();
  truthDb?.closeSync();
});

const YEAR_2001 = { start: '2001-01-01', end: '2002-01-01' };
const YEAR_2000 = { start: '2000-01-01', end: '2001-01-01' };
const drivers = (metric: string, growthRank?: GrowthRank): SubQuestion => ({
  id: 'drivers',
  kind: 'growth',
  lens: 'breakdown',
  template: 'growth_drivers',
  metrics: [metric],
  grain: 'month',
  window: YEAR_2001,
  compareWindow: YEAR_2000,
  filters: [],
  dimension: 'phase',
  ...(growthRank ? { growthRank } : {}),
});
const present = (answer: Awaited<ReturnType<typeof answerSubQuestion>>) =>
  SUB_QUESTIONS.growth_drivers.present(answer, { dataset: ws.dataset, locale: 'en-GB', audience: 'managers', chart: { width: 1200, height: 675, scale: 1 }, dataAsOf: ws.coverage.lastDate });
const pct = (r: number) => `${r >= 0 ? '+' : '−'}${Math.abs(r * 100).toFixed(1)}%`;

interface PhaseRow { phase: string; before: number; after: number; share: number; speed_before: number | null; speed_after: number | null }
const phases = () => segmentRows('"Phase of flight"');
const byTimeOfDay = () => segmentRows('"Time of day"');
async function segmentRows(column: string): Promise<PhaseRow[]> {
  const rows = (await truth.runAndReadAll(`SELECT ${column} AS phase,
      COUNT(*) FILTER (WHERE year("Flight Date") = 2000) AS before,
      COUNT(*) FILTER (WHERE year("Flight Date") = 2001) AS after,
      COUNT(*) FILTER (WHERE year("Flight Date") = 2000) / SUM(COUNT(*) FILTER (WHERE year("Flight Date") = 2000)) OVER () AS share,
      AVG("Speed IAS in knots") FILTER (WHERE year("Flight Date") = 2000) AS speed_before,
      AVG("Speed IAS in knots") FILTER (WHERE year("Flight Date") = 2001) AS speed_after
    FROM strikes GROUP BY 1 ORDER BY 1`)).getRowObjectsJson() as Record<string, unknown>[];
  const num = (v: unknown) => (v === null ? null : Number(v));
  return rows.map((r) => ({ phase: String(r.phase), before: Number(r.before), after: Number(r.after), share: Number(r.share), speed_before: num(r.speed_before), speed_after: num(r.speed_after) }));
}

describe('which segment grows fastest is ranked by its own rate', () => {
  it('strikes by phase, 2001 against 2000: ordered by rate, the tiny base flagged, the answer named among the rest', async () => {
    const rows = (await phases()).filter((r) => r.before > 0);
    const rate = (r: PhaseRow) => r.after / r.before - 1;
    const byRate = [...rows].sort((a, b) => rate(b) - rate(a));
    // From the file (SQL above): taxi 1 -> 6 (+500%) on 0.1% of 2000's strikes; take-off run 147 -> 170.
    expect(byRate.map((r) => r.phase).slice(0, 2)).toEqual(['Taxi', 'Take-off run']);
    const answer = await answerSubQuestion(drivers('strikes', 'fastest'), ws);
    const f = answer.findings.find((x): x is GrowthDriversFinding => x.type === 'growth_drivers')!;
    expect(f.byRate!.segments).toEqual(byRate.map((r) => r.phase));
    // A base under 5% of the total (common practice) swings on little: it is flagged, not the answer.
    const sized = byRate.filter((r) => r.share >= 0.05);
    const top = sized[0]!;
    expect(f.byRate!.aheadOnSmallBase).toEqual(byRate.slice(0, byRate.indexOf(top)).map((r) => r.phase));
    // About the same as the top: within two Poisson standard errors of the log ratio (or under 1 pt).
    const se = (r: PhaseRow) => Math.sqrt(1 / r.before + 1 / r.after);
    const close = (r: PhaseRow) => Math.abs(rate(top) - rate(r)) < 0.01 || Math.abs(Math.log(1 + rate(top)) - Math.log(1 + rate(r))) < 2 * Math.hypot(se(top), se(r));
    const leaders = [top, ...sized.slice(1).filter((r, i) => sized.slice(1, i + 2).every(close))];
    expect(f.byRate!.leaders).toEqual(leaders.map((r) => r.phase));
    const shown = present(answer);
    // The headline answers "fastest", by rate, and says the tiny base beside it (1 -> 6 reads "×6.0").
    const tail = '(Taxi ×6.0 on a small base)';
    if (leaders.length === 1) expect(shown.title).toBe(`${top.phase} grew fastest in strikes: ${pct(rate(top))} ${tail}`);
    else if (leaders.length === sized.length) {
      // On these counts every phase of some size is within counting noise of the first: none stands out.
      const low = leaders[leaders.length - 1]!;
      expect(shown.title).toBe(`No phase of flight stands out in strikes growth: ${pct(rate(low))} to ${pct(rate(top))}, within the noise ${tail}`);
      expect(shown.caption).toContain('differ by less than counting noise (two standard errors of a Poisson count)');
    } else expect(shown.title).toMatch(new RegExp(`^${top.phase}, .* grew fastest in strikes, at about the same rate`));
    const taxi = rows.find((r) => r.phase === 'Taxi')!;
    expect(shown.caption).toContain(`Taxi ×6.0 (+${taxi.after - taxi.before}; a small base, ${(taxi.share * 100).toFixed(1)}% of strikes in 2000`);
    // Who added most is said beside, not as the answer.
    const biggest = [...rows].sort((a, b) => Math.abs(b.after - b.before) - Math.abs(a.after - a.before))[0]!;
    expect(shown.caption).toContain(`By size of change, ${biggest.phase} moved strikes most`);
    expect(shown.chart?.kind).toBe('bars');
  });

  it('without "fastest" the same breakdown stays a drivers answer, by size of change', async () => {
    const answer = await answerSubQuestion(drivers('strikes'), ws);
    const f = answer.findings.find((x): x is GrowthDriversFinding => x.type === 'growth_drivers')!;
    expect(f.byRate).toBeUndefined();
    const rows = await phases();
    const biggest = [...rows].sort((a, b) => Math.abs(b.after - b.before) - Math.abs(a.after - a.before))[0]!;
    expect(present(answer).title).toMatch(new RegExp(`^${biggest.phase} drove the biggest change in strikes`));
  });
});

describe("an average's breakdown names the segment with the largest own change", () => {
  it("mean speed by time of day: 'moved most' is the largest relative change (dusk, from the SQL), not the largest weighted one (day)", async () => {
    // By time of day (Dawn, Day, Dusk, Night): every mean speed is above zero, so each has its own rate.
    const rows = (await byTimeOfDay()).filter((r) => r.speed_before !== null && r.speed_after !== null);
    expect(rows.every((r) => r.speed_before! > 0 && r.speed_after! > 0)).toBe(true);
    const own = (r: PhaseRow) => r.speed_after! / r.speed_before! - 1;
    const most = [...rows].sort((a, b) => Math.abs(own(b)) - Math.abs(own(a)))[0]!;
    const answer = await answerSubQuestion({ ...drivers('speed'), dimension: 'time_of_day' }, ws);
    const shown = present(answer);
    expect(shown.title).toContain(`Speed moved most for ${most.phase}: ${pct(own(most))}`);
  });
});

describe("a rate's breakdown names the segment with the largest change in points", () => {
  it('share of strikes with damage by time of day, 2001 against 2000', async () => {
    const rows = (await truth.runAndReadAll(`SELECT "Time of day" AS segment,
        AVG(CASE WHEN "Effect Amount of damage" <> 'None' THEN 1.0 ELSE 0.0 END) FILTER (WHERE year("Flight Date") = 2000) AS before,
        AVG(CASE WHEN "Effect Amount of damage" <> 'None' THEN 1.0 ELSE 0.0 END) FILTER (WHERE year("Flight Date") = 2001) AS after
      FROM strikes GROUP BY 1`)).getRowObjectsJson() as Record<string, unknown>[];
    const moves = rows.map((r) => ({ segment: String(r.segment), points: Number(r.after) - Number(r.before) }));
    const most = [...moves].sort((a, b) => Math.abs(b.points) - Math.abs(a.points))[0]!;
    const answer = await answerSubQuestion({ ...drivers('damaged_share'), dimension: 'time_of_day' }, ws);
    const title = present(answer).title;
    const pts = `${most.points >= 0 ? '+' : '−'}${Math.abs(most.points * 100).toFixed(1)} pts`;
    expect(title).toBe(`Share of strikes with damage moved most for ${most.segment}: ${pts}`);
  });
});
