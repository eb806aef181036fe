// One run's sub-questions share identical queries (the run scope's results), and the
// optional phase timings record every step; both on the generated demo (invented data) in DuckDB.
// The growth drivers and share-shift templates compile the same SQL for the same window and
// dimension, so a plan asking both runs that query once.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../analysis/answer-sub-question.js';
import { openRunScope } from '../../analysis/run-scope.js';
import type { Phase, PhaseTimings } from '../../analysis/phase-timings.js';
import type { NamedQuery, ResultTable, SubQuestion } from '../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../analysis/workspace.js';
import { loadConfig } from '../../config/load.js';
import { demoFixture } from '../helpers/demo-fixture.js';

let ws: Workspace;
let runs: string[];

beforeAll(async () => {
  const demo = await demoFixture();
  ws = await openWorkspace(loadConfig(demo.configPath));
  // Count what reaches the engine.
  const run = ws.source.run.bind(ws.source);
  runs = [];
  ws.source.run = (q, o) => {
    runs.push(q.sql);
    return run(q, o);
  };
});

afterAll(async () => {
  await ws?.source.close();
});

const DRIVERS: SubQuestion = {
  id: 'drivers',
  kind: 'growth',
  lens: 'breakdown',
  template: 'growth_drivers',
  metrics: ['revenue'],
  dimension: 'route',
  grain: 'month',
  window: { start: '2024-06-01', end: '2024-09-01' },
  filters: [],
};
const SHARES: SubQuestion = { ...DRIVERS, id: 'shares', lens: 'distribution', template: 'growth_share_shift' };

describe('queries shared within a run', () => {
  it('runs a query two sub-questions compile identically once, and each answer gets the same rows', async () => {
    runs.length = 0;
    const alone = [await answerSubQuestion(DRIVERS, ws), await answerSubQuestion(SHARES, ws)];
    const unshared = runs.length;
    expect(alone[0]!.queries.map((q) => q.sql)).toEqual(alone[1]!.queries.map((q) => q.sql));

    runs.length = 0;
    const scope = openRunScope([], ws);
    const [drivers, shares] = await Promise.all([answerSubQuestion(DRIVERS, ws, { scope }), answerSubQuestion(SHARES, ws, { scope })]);
    expect(unshared).toBe(2);
    expect(runs.length).toBe(1);
    // Same tables and same findings as when each ran its own query.
    expect(drivers!.tables).toEqual(alone[0]!.tables);
    expect(shares!.tables).toEqual(alone[1]!.tables);
    expect(drivers!.findings).toEqual(alone[0]!.findings);
    expect(shares!.findings).toEqual(alone[1]!.findings);
  });

  it('gives each answer its own copy of a shared table', async () => {
    const scope = openRunScope([], ws);
    const a = await answerSubQuestion(DRIVERS, ws, { scope });
    const b = await answerSubQuestion(SHARES, ws, { scope });
    // The templates name their query differently ("drivers", "shares"); the SQL is the same.
    const ta = Object.values(a.tables)[0]!;
    const tb = Object.values(b.tables)[0]!;
    const before = JSON.stringify(tb);
    expect(tb.rows.length).toBeGreaterThan(0);
    ta.rows.length = 0;
    expect(JSON.stringify(tb)).toBe(before);
  });

  it('runs different windows separately', async () => {
    runs.length = 0;
    const scope = openRunScope([], ws);
    await answerSubQuestion(DRIVERS, ws, { scope });
    await answerSubQuestion({ ...SHARES, window: { start: '2024-05-01', end: '2024-08-01' } }, ws, { scope });
    expect(runs.length).toBe(2);
  });
});

describe('phase timings', () => {
  it('records each query as SQL with the query itself, and the reading, when a collector is given', async () => {
    const steps: { phase: Phase; ms: number; query?: NamedQuery }[] = [];
    const timings: PhaseTimings = { record: (phase, start, end, query) => steps.push({ phase, ms: end - start, ...(query ? { query } : {}) }) };
    const answer = await answerSubQuestion(DRIVERS, ws, { timings });
    const sql = steps.filter((s) => s.phase === 'sql');
    expect(sql.map((s) => s.query)).toEqual(answer.queries);
    expect(steps.filter((s) => s.phase === 'read')).toHaveLength(1);
    expect(steps.every((s) => s.ms >= 0)).toBe(true);
  });
});
