// Growth never compares overlapping windows, and data stamped once a month covers its last
// month whole. Pure: windows and coverage only.
import { describe, expect, it } from 'vitest';
import { dataEnd } from '../../../analysis/coverage.js';
import { comparisonWindow } from '../../../analysis/templates/growth-compare.js';
import { readSeries } from '../../../analysis/templates/series.js';
import type { SubQuestion } from '../../../analysis/types.js';

describe('the window a growth comparison uses', () => {
  const demo = { firstDate: '2022-01-01', lastDate: '2025-06-18', rows: 1, stamps: 'daily' as const };

  it('keeps a window of a year or less as asked (compared with the same dates a year earlier)', () => {
    const summer = { start: '2024-06-01', end: '2024-09-01' };
    expect(comparisonWindow(summer, demo)).toEqual(summer);
    expect(comparisonWindow({ start: '2024-01-01', end: '2025-01-01' }, demo)).toEqual({ start: '2024-01-01', end: '2025-01-01' });
  });

  it('turns the whole history into the last complete calendar year, whose year before is in the data', () => {
    // Not "1 Jan 2023 to 18 Jun 2025 against 1 Jan 2022 to 18 Jun 2024", which overlap by 18 months.
    const w = comparisonWindow({ start: '2022-01-01', end: '2025-07-01' }, demo);
    expect(w).toEqual({ start: '2024-01-01', end: '2025-01-01' });
  });

  it('falls back to the last 12 complete months against the 12 before when two calendar years do not fit', () => {
    const short = { firstDate: '2023-03-15', lastDate: '2025-06-18', rows: 1, stamps: 'daily' as const };
    expect(comparisonWindow({ start: '2023-03-15', end: '2025-06-19' }, short)).toEqual({ start: '2024-06-01', end: '2025-06-01' });
  });

  it('leaves a window alone when not even two 12-month spans fit in the data', () => {
    const w = { start: '2024-01-01', end: '2025-06-19' };
    expect(comparisonWindow(w, demo.firstDate ? { ...demo, firstDate: '2024-01-01' } : demo)).toEqual(w);
  });
});

describe('data stamped once a month', () => {
  it('covers its last stamped month whole', () => {
    expect(dataEnd({ lastDate: '2024-04-01', stamps: 'monthly' })).toBe('2024-05-01');
    expect(dataEnd({ lastDate: '2024-06-18', stamps: 'daily' })).toBe('2024-06-19');
    expect(dataEnd({ lastDate: '2024-06-18' })).toBe('2024-06-19');
    expect(dataEnd({ lastDate: '2024-10-01', stamps: 'quarterly' })).toBe('2025-01-01');
  });

  it('so the last month is neither partial nor dropped from the highs', () => {
    const sq: SubQuestion = { id: 'q', kind: 'trend', lens: 'time_pattern', template: 'series', metrics: ['ppm'], grain: 'month', window: { start: '2024-01-01', end: '2024-05-01' }, filters: [] };
    const rows = ['2024-01-01', '2024-02-01', '2024-03-01', '2024-04-01'].map((period, i) => ({ period, ppm: 420 + i, row_count: 1 }));
    const table = { columns: [], rows, truncated: false };
    const monthly = readSeries(sq, table, { firstDate: '2024-01-01', lastDate: '2024-04-01', rows: 4, stamps: 'monthly' });
    expect(monthly.caveats.map((c) => c.code)).not.toContain('partial_period');
    expect(monthly.findings).toContainEqual({ type: 'peak', metric: 'ppm', period: '2024-04-01', value: 423 });
    // The same rows read as daily data end on 1 April: April is one day of a month, and partial.
    const daily = readSeries(sq, table, { firstDate: '2024-01-01', lastDate: '2024-04-01', rows: 4, stamps: 'daily' });
    expect(daily.caveats.map((c) => c.code)).toContain('partial_period');
  });
});

describe('unusual periods', () => {
  it('are counted in one note, naming the most extreme five, never one note per period', async () => {
    const { summariseOutliers } = await import('../../../analysis/quality/thread-notes.js');
    const { caveatNote } = await import('../../../analysis/captions/caveat-text.js');
    const days = Array.from({ length: 235 }, (_, i) => ({
      code: 'outlier' as const,
      data: { metric: 'visits', period: new Date(Date.UTC(2024, 0, 1 + i)).toISOString().slice(0, 10), grain: 'day', score: i === 7 ? 40 : 4 + i / 1000 },
    }));
    const out = summariseOutliers([...days, { code: 'small_sample', data: { n: 3 } }]);
    expect(out).toHaveLength(2);
    const note = caveatNote(out.find((c) => c.code === 'outlier')!, 'en-IE');
    expect(note).toMatch(/^235 days are unusual \(modified z-score above 3\.5\); the 5 most extreme: 8 January 2024, /);
    // A few are named together in one note, in time order; a lone one stays as it is.
    const few = summariseOutliers(days.slice(0, 3));
    expect(few).toHaveLength(1);
    expect(caveatNote(few[0]!, 'en-IE')).toBe('1 January 2024, 2 January 2024 and 3 January 2024 are unusual (modified z-score above 3.5).');
    expect(summariseOutliers(days.slice(0, 1))).toEqual(days.slice(0, 1));
  });
});

describe('no day-of-week pattern on data coarser than daily', () => {
  it('does not ask for one, and does not read one', async () => {
    const { trendSeasonalityTemplate } = await import('../../../analysis/templates/trend-seasonality.js');
    const { duckdbDialect } = await import('../../../analysis/sql/dialect.js');
    const { exampleDataset } = await import('../../helpers/example-config.js');
    const sq: SubQuestion = { id: 'q', kind: 'trend', lens: 'time_pattern', template: 'trend_seasonality', metrics: ['revenue'], grain: 'month', window: { start: '2022-01-01', end: '2025-01-01' }, filters: [] };
    const ctx = (stamps: 'daily' | 'monthly') => ({ dataset: exampleDataset, dialect: duckdbDialect, timeColumnType: 'date' as const, coverage: { firstDate: '2022-01-01', lastDate: '2024-12-01', rows: 36, stamps } });
    expect(trendSeasonalityTemplate.compile(sq, ctx('daily')).map((q) => q.name)).toEqual(['monthly', 'weekday']);
    expect(trendSeasonalityTemplate.compile(sq, ctx('monthly')).map((q) => q.name)).toEqual(['monthly']);
    const weekday = { columns: [], rows: [1, 2, 3, 4, 5, 6, 7].map((d) => ({ dow: d, revenue: 10 * d, row_count: 5 })), truncated: false };
    const reading = trendSeasonalityTemplate.read(sq, { monthly: { columns: [], rows: [], truncated: false }, weekday }, { dataset: exampleDataset, coverage: ctx('monthly').coverage });
    expect(reading.findings.some((f) => f.type === 'trend_weekday')).toBe(false);
  });
});
