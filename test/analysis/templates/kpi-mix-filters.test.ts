// kpi_mix with the brief's filters (issue 16): the filters go inside the aggregates (periodScope,
// as kpi_by_segment), and a segment with rows in the period but none that pass the filters is not
// listed at a 0 share. Checked on an open dataset the project was not built on: vega-datasets
// flights-20k.json (US domestic flights of Q1 2001), every expected number counted in this file
// from the raw file with plain JavaScript.
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { KpiMixFinding } from '../../../analysis/findings/kpi.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { captionProblems } from '../../helpers/caption-checks.js';
import { FLIGHTS_JSON, flightsWorkspace } from './open-data-tables.js';

const flights: { date: string; origin: string }[] = JSON.parse(readFileSync(FLIGHTS_JSON, 'utf8'));
let ws: Awaited<ReturnType<typeof flightsWorkspace>>;
beforeAll(async () => {
  ws = await flightsWorkspace();
});
afterAll(async () => ws?.source.close());

const mix = (filters: SubQuestion['filters']): SubQuestion => ({
  id: 'mix',
  kind: 'kpi',
  lens: 'distribution',
  template: 'kpi_mix',
  metrics: ['flights'],
  dimension: 'origin',
  grain: 'month',
  window: { start: '2001-01-01', end: '2001-04-01' },
  filters,
});

describe('kpi_mix on flights-20k (vega-datasets) with the brief filters', () => {
  // March 2001 is the latest complete month; the file's dates read "2001/03/05 14:10".
  const march = flights.filter((f) => f.date.startsWith('2001/03'));
  const count = (origin: string) => march.filter((f) => f.origin === origin).length;

  it('only the origins asked for are listed, with their shares of the flights that pass the filter', async () => {
    const picked = ['SFO', 'LAX'];
    const a = await answerSubQuestion(mix([{ dimension: 'origin', values: picked }]), ws);
    const f = a.findings.find((x): x is KpiMixFinding => x.type === 'kpi_mix')!;
    expect(f.period).toBe('2001-03-01');
    expect(f.segments.map((s) => s.key).sort()).toEqual([...picked].sort());
    const total = picked.reduce((t, o) => t + count(o), 0);
    expect(f.total).toBe(total);
    for (const s of f.segments) expect(s.share!).toBeCloseTo(count(String(s.key)) / total, 12);
    const p = SUB_QUESTIONS.kpi_mix.present(a, { dataset: ws.dataset, locale: 'en-GB', audience: 'managers', chart: { width: 1200, height: 675, scale: 1 }, dataAsOf: ws.coverage.lastDate });
    expect(captionProblems(a, p)).toEqual([]);
  });

  it('excluding origins: every other origin with a March flight is listed, none at a 0 share', async () => {
    const a = await answerSubQuestion(mix([{ dimension: 'origin', values: ['SFO', 'LAX'], exclude: true }]), ws);
    const f = a.findings.find((x): x is KpiMixFinding => x.type === 'kpi_mix')!;
    const others = new Set(march.map((x) => x.origin).filter((o) => o !== 'SFO' && o !== 'LAX'));
    expect(new Set(f.segments.map((s) => String(s.key)))).toEqual(others);
    expect(f.segments.every((s) => (s.share ?? 0) > 0)).toBe(true);
    expect(f.total).toBe(march.filter((x) => x.origin !== 'SFO' && x.origin !== 'LAX').length);
  });
});
