// Which smaller plan a sub-question gets after failing for resources (analysis/smaller-plan.ts):
// the latest half of its period at whole periods of its grain, else a coarser grain, else none.
// Calendar facts (days per month, ISO weeks starting Monday) are ISO 8601's.
import { describe, expect, it } from 'vitest';
import { resourceFailure, smallerPlan } from '../../analysis/smaller-plan.js';
import { SourceError } from '../../analysis/sources/data-source.js';
import type { SubQuestion } from '../../analysis/types.js';
import type { Workspace } from '../../analysis/workspace.js';

// Only what smallerPlan reads of a workspace: the locale and the data's dates.
const ws = { config: { charts: { locale: 'en-IE' } }, coverage: { firstDate: '2024-01-01', lastDate: '2024-12-31', rows: 366 } } as unknown as Workspace;
const sq = (over: Partial<SubQuestion>): SubQuestion => ({ id: 'q1', kind: 'trend', lens: 'time_pattern', template: 'trend_summary', metrics: ['m'], grain: 'month', window: { start: '2024-01-01', end: '2025-01-01' }, filters: [], ...over });

describe('smallerPlan', () => {
  it('keeps the latest half of the period, at whole months, within the data', () => {
    const s = smallerPlan(sq({ window: { start: '2020-01-01', end: '2030-01-01' } }), ws)!;
    expect(s.subQuestion.window).toEqual({ start: '2024-07-01', end: '2030-01-01' });
    expect(s.change).toBe('the period cut to its latest half, 1 July to 31 December 2024 (instead of 1 January to 31 December 2024)');
  });

  it('moves a daily question with a period of comparison to weeks, and gives up on a monthly one', () => {
    const compareWindow = { start: '2023-01-01', end: '2024-01-01' };
    const daily = smallerPlan(sq({ grain: 'day', compareWindow }), ws)!;
    expect(daily.subQuestion).toMatchObject({ grain: 'week', window: { start: '2024-01-01', end: '2025-01-01' }, compareWindow });
    expect(daily.change).toBe('a weekly grain instead of daily');
    expect(smallerPlan(sq({ compareWindow }), ws)).toBeNull();
    // One month of data has no half to keep.
    expect(smallerPlan(sq({ window: { start: '2024-12-01', end: '2025-01-01' } }), ws)).toBeNull();
  });

  it('counts only running out of memory and running out of time as failures a smaller plan can mend', () => {
    expect(resourceFailure(new SourceError('timeout', 'the query ran past the 1000 ms limit and was stopped'))).toBe('ran past the 1000 ms limit and was stopped');
    expect(resourceFailure(new SourceError('query_failed', 'the query failed: Out of Memory Error: could not allocate block'))).toBe('ran out of memory');
    expect(resourceFailure(new SourceError('dataset_changed', 'column x is missing from the table'))).toBeNull();
    expect(resourceFailure(new Error('out of memory'))).toBeNull();
  });
});
