// value_compare on the generated Skerrywake demo (invented data): two booking channels set
// against each other. Every figure is checked against a plain reduction of the raw rows read
// back with DuckDB, and the gap-in-growth test against @stdlib/stats-ttest2 (Welch) run on log
// ratios the test forms itself.
import { DuckDBInstance } from '@duckdb/node-api';
import ttest2 from '@stdlib/stats-ttest2';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { ValueCompareFinding } from '../../../analysis/findings/contrast.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { loadConfig } from '../../../config/load.js';
import { presentContext } from '../../../bot/present-answer.js';
import { captionProblems } from '../../helpers/caption-checks.js';
import { demoFixture } from '../../helpers/demo-fixture.js';

let ws: Workspace;
let dbPath: string;
beforeAll(async () => {
  const demo = await demoFixture();
  dbPath = demo.databasePath;
  ws = await openWorkspace(loadConfig(demo.configPath));
});
afterAll(async () => {
  await ws?.source.close();
});

async function plain(sql: string): Promise<Record<string, unknown>[]> {
  const db = await DuckDBInstance.create(dbPath, { access_mode: 'READ_ONLY' });
  const conn = await db.connect();
  try {
    return (await conn.runAndReadAll(sql)).getRowObjectsJson() as Record<string, unknown>[];
  } finally {
    conn.closeSync();
    db.closeSync();
  }
}

function withMinimum(n: number): Workspace {
  const dataset = { ...ws.dataset, min_group_size: n };
  return { ...ws, dataset, context: { ...ws.context, dataset } };
}

const base = (extra: Partial<SubQuestion>): SubQuestion => ({
  id: 'vc',
  kind: 'performance',
  lens: 'summary',
  template: 'value_compare',
  metrics: ['revenue'],
  dimension: 'channel',
  grain: 'month',
  window: { start: '2024-06-01', end: '2024-09-01' },
  filters: [],
  contrast: { dimension: 'channel', values: ['app', 'web'] },
  ...extra,
});

describe('value_compare', () => {
  it('states each value, its growth and the gap, as plain sums of the rows give them', async () => {
    const answer = await answerSubQuestion(base({}), ws);
    const f = answer.findings.find((x): x is ValueCompareFinding => x.type === 'value_compare')!;
    const sums = await plain(`SELECT channel, (sail_date >= DATE '2024-06-01') AS cur, SUM(fare_total)::DOUBLE AS v
      FROM bookings WHERE channel IN ('app','web') AND ((sail_date >= DATE '2024-06-01' AND sail_date < DATE '2024-09-01') OR (sail_date >= DATE '2023-06-01' AND sail_date < DATE '2023-09-01'))
      GROUP BY 1, 2`);
    const v = (ch: string, cur: boolean) => Number(sums.find((r) => r.channel === ch && r.cur === cur)!.v);
    expect(f.first.current).toBeCloseTo(v('app', true), 6);
    expect(f.first.prior).toBeCloseTo(v('app', false), 6);
    expect(f.second.current).toBeCloseTo(v('web', true), 6);
    expect(f.first.growth).toBeCloseTo(v('app', true) / v('app', false) - 1, 10);
    expect(f.growthGap).toBeCloseTo(v('app', true) / v('app', false) - v('web', true) / v('web', false), 10);
    expect(f.prior).toEqual({ start: '2023-06-01', end: '2023-09-01' });

    // 92 days a span: 13 whole 7-day blocks from each span's start, log(app / web) in each.
    const blocks = await plain(`SELECT (sail_date >= DATE '2024-06-01') AS cur,
        FLOOR((sail_date - CASE WHEN sail_date >= DATE '2024-06-01' THEN DATE '2024-06-01' ELSE DATE '2023-06-01' END) / 7) AS b,
        LN(SUM(fare_total) FILTER (WHERE channel = 'app') / SUM(fare_total) FILTER (WHERE channel = 'web')) AS r
      FROM bookings WHERE ((sail_date >= DATE '2024-06-01' AND sail_date < DATE '2024-09-01') OR (sail_date >= DATE '2023-06-01' AND sail_date < DATE '2023-09-01'))
      GROUP BY 1, 2 HAVING b < 13 ORDER BY 1, 2`);
    const after = blocks.filter((r) => r.cur === true).map((r) => Number(r.r));
    const before = blocks.filter((r) => r.cur === false).map((r) => Number(r.r));
    expect(after).toHaveLength(13);
    const ref = ttest2(after, before, { alpha: 0.05 }) as unknown as { pValue: number; ci: [number, number]; statistic: number };
    const rel = f.relativeGrowth!;
    expect(rel.periods).toBe('week');
    expect(rel.pValue).toBeCloseTo(ref.pValue, 8);
    expect(rel.ci[0]).toBeCloseTo(Math.expm1(ref.ci[0]), 8);
    expect(rel.ci[1]).toBeCloseTo(Math.expm1(ref.ci[1]), 8);

    for (const audience of ['leadership', 'managers', 'analysts'] as const) {
      const p = SUB_QUESTIONS.value_compare.present(answer, presentContext(ws, audience));
      expect(captionProblems(answer, p)).toEqual([]);
      expect(p.chart?.kind).toBe('line');
      expect(p.title).toMatch(/^App (grew faster than|and) web/i);
    }
  });

  it('moves a rate in points and tests the two levels (two-proportion z)', async () => {
    const answer = await answerSubQuestion(base({ metrics: ['refund_rate'], window: { start: '2024-01-01', end: '2025-01-01' } }), ws);
    const f = answer.findings.find((x): x is ValueCompareFinding => x.type === 'value_compare')!;
    expect(f.level?.test).toBe('two_proportion_z');
    // A rate's gap moves in points (catalog.ts changeBasisOf): the growth test is on per-month
    // differences of the two rates, not on their log ratios.
    expect(f.basis).toBe('points');
    expect(f.relativeGrowth).toBeNull();
    expect(f.gapShift?.periods).toBe('month');
    expect(f.first.growth).toBeNull();
    const p = SUB_QUESTIONS.value_compare.present(answer, presentContext(ws, 'managers'));
    expect(p.caption).toMatch(/pts/);
    expect(p.caption).not.toMatch(/[+\u2212]\d[\d.]*%/);
    expect(captionProblems(answer, p)).toEqual([]);
  });

  it('says so when one value has no data in the earlier span (kiosk opened in June 2023)', async () => {
    const answer = await answerSubQuestion(base({ contrast: { dimension: 'channel', values: ['phone', 'kiosk'] }, window: { start: '2023-06-01', end: '2023-09-01' } }), ws);
    const f = answer.findings.find((x): x is ValueCompareFinding => x.type === 'value_compare')!;
    expect(f.second.rowsPrior).toBe(0);
    expect(f.noGrowthTest).toBe('missing_side');
    const p = SUB_QUESTIONS.value_compare.present(answer, presentContext(ws, 'managers'));
    expect(p.title).toMatch(/^Kiosk has no revenue in the earlier span/);
    expect(p.caption).toMatch(/kiosk €[\d.]+K \(no data in the earlier span\)/);
    expect(captionProblems(answer, p)).toEqual([]);
    // A value below the minimum group size is withheld, not reported as missing.
    const small = await answerSubQuestion(base({ contrast: { dimension: 'channel', values: ['phone', 'kiosk'] }, window: { start: '2023-06-01', end: '2023-06-03' } }), withMinimum(5000));
    const g = small.findings.find((x): x is ValueCompareFinding => x.type === 'value_compare')!;
    expect(g.second.suppressed).toBe(true);
    expect(small.tables.days!.rows.some((r) => r.tc_key === 'kiosk')).toBe(false);
  });
});
