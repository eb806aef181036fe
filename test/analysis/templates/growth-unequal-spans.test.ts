// Two asked spans of different lengths (issue 16: totals against per-day rates): March 2024 against
// February 2024 on the invented Ledgerlark support desk (test/fixtures/datasets/support-desk), 31
// days against 29. The totals are said as they are, and per day beside them with the days; every
// figure is checked against a count of tickets.csv's rows in this file.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { presentContext } from '../../../bot/present-answer.js';
import { loadConfig } from '../../../config/load.js';

const DIR = join(import.meta.dirname, '..', '..', 'fixtures', 'datasets', 'support-desk');
let ws: Workspace;
let days: string[];
beforeAll(async () => {
  ws = await openWorkspace(loadConfig(join(DIR, 'ledgerlark.yaml')));
  const [header, ...lines] = readFileSync(join(DIR, 'tickets.csv'), 'utf8').trim().split('\n');
  const at = header!.split(',').indexOf('opened_at');
  // A wall-clock timestamp in the dataset's zone: its date is its first ten characters.
  days = lines.map((l) => l.split(',')[at]!.slice(0, 10));
}, 60_000);
afterAll(async () => ws?.source.close());

const sq = (window: SubQuestion['window'], compareWindow: SubQuestion['compareWindow']): SubQuestion => ({
  id: 'drivers',
  kind: 'growth',
  lens: 'breakdown',
  template: 'growth_drivers',
  metrics: ['tickets'],
  grain: 'month',
  window,
  ...(compareWindow ? { compareWindow } : {}),
  filters: [],
  dimension: 'priority',
});

describe('growth over asked spans of different lengths', () => {
  it('March against February 2024: the totals, and per day with the days', async () => {
    const a = await answerSubQuestion(sq({ start: '2024-03-01', end: '2024-04-01' }, { start: '2024-02-01', end: '2024-03-01' }), ws);
    const p = SUB_QUESTIONS.growth_drivers.present(a, presentContext(ws, 'managers'));
    const march = days.filter((d) => d >= '2024-03-01' && d < '2024-04-01').length;
    const feb = days.filter((d) => d >= '2024-02-01' && d < '2024-03-01').length;
    expect(p.caption).toContain(`${feb.toLocaleString('en-US')} to ${march.toLocaleString('en-US')}`);
    const [a1, b1] = [march / 31, feb / 29];
    const rel = (a1 / b1 - 1) * 100;
    const verb = rel >= 0 ? 'rose' : 'fell';
    expect(p.caption).toContain(`Mar 2024 has 31 days and Feb 2024 29, so per day tickets ${verb} ${Math.abs(rel).toFixed(1)}% (${a1.toFixed(1)} against ${b1.toFixed(1)} a day).`);
  });

  it('says nothing per day for spans of one length, nor for a leap day', async () => {
    const same = await answerSubQuestion(sq({ start: '2024-04-01', end: '2024-05-01' }, { start: '2023-04-01', end: '2023-05-01' }), ws);
    expect(SUB_QUESTIONS.growth_drivers.present(same, presentContext(ws, 'managers')).caption).not.toMatch(/per day/);
    const leap = await answerSubQuestion(sq({ start: '2024-01-01', end: '2024-11-30' }, { start: '2023-01-01', end: '2023-11-30' }), ws);
    expect(SUB_QUESTIONS.growth_drivers.present(leap, presentContext(ws, 'managers')).caption).not.toMatch(/per day/);
  });
});
