// Which segments a members-vs-others breakdown (performance_by_segment) shows: those first by the
// metric asked over both groups, not by rows, or those the request names; and the caption says the
// rule whenever the rest are folded. Expected segments come from the test's own SQL over the demo
// file (invented Skerrywake bookings), on the comparison window (from the SkerryPass launch).
import { DuckDBInstance } from '@duckdb/node-api';
import { beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { PerformanceConsistencyFinding, PerformanceSegmentFinding } from '../../../analysis/findings/performance.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { Answer, SubQuestion } from '../../../analysis/types.js';
import { presentContext } from '../../../bot/present-answer.js';
import { demoFixture, useDemoWorkspace } from '../../helpers/demo-fixture.js';

const LAUNCH = '2023-04-01';
const END = '2025-06-19';
const workspace = useDemoWorkspace();

function sq(metric: string, extra: Partial<SubQuestion> = {}): SubQuestion {
  return {
    id: 'seg',
    kind: 'performance',
    lens: 'breakdown',
    template: 'performance_by_segment',
    metrics: [metric],
    dimension: 'route',
    grain: 'month',
    window: { start: '2022-01-01', end: END },
    filters: [],
    comparisonGroup: 'skerrypass',
    ...extra,
  };
}

/** Routes with their rows, revenue and refund rate since the launch, from the raw rows. */
type RouteRow = { route: string; rows: number; revenue: number; refundRate: number };
let routes: RouteRow[];

beforeAll(async () => {
  const db = await DuckDBInstance.create((await demoFixture()).databasePath, { access_mode: 'READ_ONLY' });
  const con = await db.connect();
  const r = await con.runAndReadAll(`SELECT route, COUNT(*)::DOUBLE AS n, SUM(fare_total)::DOUBLE AS rev, AVG(CASE WHEN refunded THEN 1.0 ELSE 0.0 END)::DOUBLE AS rr
    FROM bookings WHERE sail_date >= DATE '${LAUNCH}' AND sail_date < DATE '${END}' AND pass_holder IS NOT NULL GROUP BY route`);
  routes = (r.getRows() as [string, number, number, number][]).map(([route, rows, revenue, refundRate]) => ({ route, rows, revenue, refundRate }));
  con.closeSync();
  db.closeSync();
}, 300_000);

const shown = (a: Answer) => (a.findings.filter((f) => f.type === 'performance_segment') as PerformanceSegmentFinding[]).filter((s) => !s.folded).map((s) => s.segment);
const pick = (a: Answer) => (a.findings.find((f) => f.type === 'performance_consistency') as PerformanceConsistencyFinding).pick!;
const caption = (a: Answer) => SUB_QUESTIONS.performance_by_segment.present(a, presentContext(workspace(), 'managers')).caption;

describe('the segments shown are picked by the metric asked', () => {
  it('a rate: the routes with the highest refund rate, which are not the routes with the most rows', async () => {
    const a = await answerSubQuestion(sq('refund_rate', { rankLimit: 2 }), workspace());
    const byRate = [...routes].sort((x, y) => y.refundRate - x.refundRate).map((r) => r.route);
    const byRows = [...routes].sort((x, y) => y.rows - x.rows).map((r) => r.route);
    // The demo's data makes the two rankings differ, so a ranking by rows would fail here.
    expect(byRate.slice(0, 2)).not.toEqual(byRows.slice(0, 2));
    expect(shown(a)).toEqual(byRate.slice(0, 2));
    expect(pick(a)).toMatchObject({ rule: 'ranked', shown: 2, folded: routes.length - 2, order: 'highest' });
    // Every route has more rows than the rank floor (at most 100 rows, segments-fold-sql.ts), so all ranked by value.
    expect(Math.min(...routes.map((r) => r.rows))).toBeGreaterThan(100);
    expect(caption(a)).toContain(`Routes shown: the 2 with the highest refund rate over both groups (among routes with at least ${pick(a).floorRows} rows); the other ${routes.length - 2} are combined as "All others".`);
  });

  it('a sum: the routes with the most revenue; "lowest" asks for the least', async () => {
    const top = await answerSubQuestion(sq('revenue', { rankLimit: 3 }), workspace());
    const byRevenue = [...routes].sort((x, y) => y.revenue - x.revenue).map((r) => r.route);
    expect(shown(top)).toEqual(byRevenue.slice(0, 3));
    expect(caption(top)).toContain(`Routes shown: the 3 with the most revenue over both groups; the other ${routes.length - 3} are combined as "All others".`);
    const bottom = await answerSubQuestion(sq('revenue', { rankLimit: 2, rankOrder: 'lowest' }), workspace());
    expect(shown(bottom)).toEqual([...byRevenue].reverse().slice(0, 2));
    expect(caption(bottom)).toContain('Routes shown: the 2 with the lowest revenue over both groups;');
  });

  it('the routes the request names are all shown, whatever their rank, and the caption says they were named', async () => {
    const smallest = [...routes].sort((x, y) => x.revenue - y.revenue).slice(0, 2).map((r) => r.route);
    const a = await answerSubQuestion(sq('revenue', { rankLimit: 1, filters: [{ dimension: 'route', values: smallest }] }), workspace());
    expect([...shown(a)].sort()).toEqual([...smallest].sort());
    expect(pick(a)).toMatchObject({ rule: 'named', shown: 2, folded: 0 });
    expect(caption(a)).toContain('Routes shown: the 2 named in the request.');
  });

  it('says no rule when nothing is folded', async () => {
    const a = await answerSubQuestion(sq('revenue'), workspace());
    expect(shown(a)).toHaveLength(routes.length);
    expect(caption(a)).not.toContain('shown:');
  });
});
