// Like-for-like growth in growth_drivers: a segment that was not there through both spans is left
// out of the like-for-like total and named beside it. Checked on two invented datasets against
// reductions the test does itself: the Skerrywake demo's kiosk channel (opened 2023-06-01,
// demo-scenario.md effect 7), read back from DuckDB as raw rows, and the subscription app's Poland
// (sign-ups from 2024-03-01, test/fixtures/datasets/README.md), read from its CSV with arquero's
// own CSV parser (npm arquero), never through the templates' SQL. That fixture sets a minimum group
// size, so the fold branch of the SQL runs too.
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { DuckDBInstance } from '@duckdb/node-api';
import * as aq from 'arquero';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { BarsSpec } from '../../../analysis/charts/spec.js';
import type { GrowthDriversFinding } from '../../../analysis/findings/growth.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import { presenceToleranceDays } from '../../../analysis/presence.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { loadConfig } from '../../../config/load.js';
import { presentContext } from '../../../bot/present-answer.js';
import { captionProblems } from '../../helpers/caption-checks.js';
import { demoFixture } from '../../helpers/demo-fixture.js';

const fixture = (path: string) => fileURLToPath(new URL(`../../fixtures/datasets/${path}`, import.meta.url));

let demo: Workspace;
let app: Workspace;
let demoRows: { day: string; cents: number; channel: string | null }[];
beforeAll(async () => {
  const d = await demoFixture();
  demo = await openWorkspace(loadConfig(d.configPath));
  app = await openWorkspace(loadConfig(fixture('subscription-app/chatterwren.yaml')));
  const inst = await DuckDBInstance.create(d.databasePath, { access_mode: 'READ_ONLY' });
  const con = await inst.connect();
  demoRows = (await con.runAndReadAll('SELECT sail_date, fare_total, channel FROM bookings')).getRowsJson().map((r) => ({
    day: String(r[0]).slice(0, 10),
    cents: Math.round(Number(r[1]) * 100),
    channel: r[2] === null ? null : String(r[2]),
  }));
  con.closeSync();
  inst.closeSync();
});
afterAll(async () => {
  await demo?.source.close();
  await app?.source.close();
});

const drivers = (extra: Partial<SubQuestion>): SubQuestion => ({
  id: 'lfl',
  kind: 'growth',
  lens: 'breakdown',
  template: 'growth_drivers',
  metrics: ['revenue'],
  dimension: 'channel',
  grain: 'month',
  window: { start: '2024-01-01', end: '2025-01-01' },
  filters: [],
  ...extra,
});

describe('like-for-like growth', () => {
  it('the demo: kiosk opened in June 2023, so 2024 against 2023 is also given without it', async () => {
    const answer = await answerSubQuestion(drivers({}), demo);
    const f = answer.findings.find((x): x is GrowthDriversFinding => x.type === 'growth_drivers')!;
    const sum = (start: string, end: string, keep: (ch: string | null) => boolean) =>
      demoRows.filter((r) => r.day >= start && r.day < end && keep(r.channel)).reduce((a, r) => a + r.cents, 0) / 100;
    const firstKiosk = demoRows.filter((r) => r.channel === 'kiosk').reduce((m, r) => (r.day < m ? r.day : m), '9999');
    expect(firstKiosk > '2023-01-01').toBe(true);
    const lfl = f.likeForLike!;
    expect(lfl.excluded).toEqual([{ segment: 'kiosk', opened: true, closed: false, firstDay: firstKiosk, lastDay: expect.any(String) }]);
    const before = sum('2023-01-01', '2024-01-01', (ch) => ch !== 'kiosk');
    const after = sum('2024-01-01', '2025-01-01', (ch) => ch !== 'kiosk');
    expect(lfl.before).toBeCloseTo(before, 6);
    expect(lfl.after).toBeCloseTo(after, 6);
    expect(lfl.relative).toBeCloseTo(after / before - 1, 10);
    expect(f.total.after).toBeCloseTo(sum('2024-01-01', '2025-01-01', () => true), 6);

    for (const audience of ['leadership', 'managers', 'analysts'] as const) {
      const p = SUB_QUESTIONS.growth_drivers.present(answer, presentContext(demo, audience));
      expect(captionProblems(answer, p)).toEqual([]);
      expect(p.caption).toMatch(/Like for like, leaving out what was not there through both spans \(kiosk, opened on \d+ \w+ 2023\), revenue (rose|fell) \d/);
    }
    // The bar of the segment left out says so.
    const chart = SUB_QUESTIONS.growth_drivers.present(answer, presentContext(demo, 'managers')).chart as BarsSpec;
    expect(chart.bars.map((b) => b.label)).toContain('kiosk (new)');
  });

  it('the demo: a whole year named as the comparison (2025 so far against 2023) is compared whole, per day', async () => {
    // The reader cuts "2025 compared with 2023" to the same dates itself (bot/reading/read-request.ts
    // compareOf), and the card shows that cut. A whole year handed to the template is what the card
    // said ("2023"), so it is all of 2023 in the SQL and the caption, never a silent cut.
    const answer = await answerSubQuestion(drivers({ window: { start: '2025-01-01', end: '2025-06-19' }, compareWindow: { start: '2023-01-01', end: '2024-01-01' } }), demo);
    const f = answer.findings.find((x): x is GrowthDriversFinding => x.type === 'growth_drivers')!;
    const sum = (start: string, end: string) => demoRows.filter((r) => r.day >= start && r.day < end).reduce((a, r) => a + r.cents, 0) / 100;
    expect(f.current).toEqual({ start: '2025-01-01', end: '2025-06-19' });
    expect(f.prior).toEqual({ start: '2023-01-01', end: '2024-01-01' });
    // 169 days against 365: totals differ by the days more than by anything asked, so every figure
    // is per day (the span's total over its days), with the plain totals kept beside.
    expect(f.perDay?.days).toEqual({ after: 169, before: 365 });
    expect(f.perDay!.totals.after).toBeCloseTo(sum('2025-01-01', '2025-06-19'), 6);
    expect(f.perDay!.totals.before).toBeCloseTo(sum('2023-01-01', '2024-01-01'), 6);
    expect(f.total.after).toBeCloseTo(sum('2025-01-01', '2025-06-19') / 169, 6);
    expect(f.total.before).toBeCloseTo(sum('2023-01-01', '2024-01-01') / 365, 6);
    // Not the year-earlier base (2024), which the request did not ask about.
    expect(Math.abs(f.perDay!.totals.before! - sum('2024-01-01', '2025-01-01'))).toBeGreaterThan(1);
    const p = SUB_QUESTIONS.growth_drivers.present(answer, presentContext(demo, 'managers'));
    expect(captionProblems(answer, p)).toEqual([]);
    expect(p.caption).toMatch(/against 2023/);
    expect(p.caption).toMatch(/divided by its days.*169 days and 2023 365/);
  });

  it('the demo: summers 2024 and 2023 both have kiosk from its first day, so there is no like-for-like figure apart', async () => {
    const answer = await answerSubQuestion(drivers({ window: { start: '2024-06-01', end: '2024-09-01' } }), demo);
    const f = answer.findings.find((x): x is GrowthDriversFinding => x.type === 'growth_drivers')!;
    expect(f.likeForLike).toBeNull();
    expect(SUB_QUESTIONS.growth_drivers.present(answer, presentContext(demo, 'managers')).caption).not.toMatch(/like for like/i);
  });

  it('the subscription app: Poland starts in March 2024; sign-ups by country, 2024 against 2023, counted from the CSV by arquero', async () => {
    const answer = await answerSubQuestion(drivers({ metrics: ['signups'], dimension: 'country' }), app);
    const f = answer.findings.find((x): x is GrowthDriversFinding => x.type === 'growth_drivers')!;
    const events = aq.fromCSV(readFileSync(fixture('subscription-app/events.csv'), 'utf8'), { parse: { event_date: String } });
    const signups = (start: string, end: string, keep: (country: string) => boolean) =>
      (events.objects() as Record<string, unknown>[]).filter((r) => r.event_type === 'signup' && String(r.event_date) >= start && String(r.event_date) < end && keep(String(r.country))).length;
    const lfl = f.likeForLike!;
    expect(lfl.excluded.map((s) => [s.segment, s.opened, s.closed])).toEqual([['Poland', true, false]]);
    expect(lfl.before).toBe(signups('2023-01-01', '2024-01-01', (c) => c !== 'Poland'));
    expect(lfl.after).toBe(signups('2024-01-01', '2025-01-01', (c) => c !== 'Poland'));
    expect(f.total.after).toBe(signups('2024-01-01', '2025-01-01', () => true));
    const p = SUB_QUESTIONS.growth_drivers.present(answer, presentContext(app, 'managers'));
    expect(captionProblems(answer, p)).toEqual([]);
    // Both growth figures head the answer when they differ as printed.
    expect(p.title).toMatch(/sign-ups [+\u2212]\d+(\.\d)?% like for like against [+\u2212]\d+(\.\d)?% overall/);
  });

  it('the tolerance is a twelfth of the span, between 1 and 31 days (our rule)', () => {
    expect(presenceToleranceDays({ start: '2024-01-01', end: '2025-01-01' })).toBe(30);
    expect(presenceToleranceDays({ start: '2023-01-01', end: '2025-01-01' })).toBe(31);
    expect(presenceToleranceDays({ start: '2024-06-01', end: '2024-09-01' })).toBe(7);
    expect(presenceToleranceDays({ start: '2024-06-01', end: '2024-06-05' })).toBe(1);
  });
});
