// Compiling a series sub-question is a pure function: checked without a database.
import { describe, expect, it } from 'vitest';
import type { CompileContext } from '../../analysis/compile-context.js';
import { duckdbDialect } from '../../analysis/sql/dialect.js';
import { compileSeries } from '../../analysis/templates/series.js';
import type { SubQuestion } from '../../analysis/types.js';
import { exampleDataset } from '../helpers/example-config.js';

const ctx: CompileContext = { dataset: exampleDataset, dialect: duckdbDialect, timeColumnType: 'date' };
const base: SubQuestion = {
  id: 'q1',
  kind: 'trend',
  lens: 'time_pattern',
  template: 'series',
  metrics: ['revenue'],
  grain: 'month',
  window: { start: '2022-01-01', end: '2025-06-19' },
  filters: [],
};

describe('series template SQL', () => {
  it('groups by the period start and binds the window', () => {
    const q = compileSeries(base, ctx);
    expect(q.sql).toContain(`CAST(date_trunc('month', "sail_date") AS DATE) AS period`);
    expect(q.sql).toContain('CAST(SUM("fare_total") AS DOUBLE) AS "revenue"');
    expect(q.params).toEqual(['2022-01-01', '2025-06-19']);
    expect(q.sql).not.toContain('2022-01-01');
  });

  it('writes a ratio metric as a ratio of sums, never an average of ratios', () => {
    const q = compileSeries({ ...base, metrics: ['fare_per_passenger'] }, ctx);
    expect(q.sql).toContain('(CAST(SUM("fare_total") AS DOUBLE) / NULLIF(CAST(SUM("passengers") AS DOUBLE), 0))');
    expect(q.sql).not.toMatch(/AVG\(/);
  });

  it('writes a rate with its filter', () => {
    const q = compileSeries({ ...base, metrics: ['refund_rate'] }, ctx);
    expect(q.sql).toContain('COUNT(*) FILTER (WHERE "refunded")');
  });

  it('binds segment filter values, whatever they contain', () => {
    const hostile = "app'); DROP TABLE bookings; --";
    const q = compileSeries({ ...base, filters: [{ dimension: 'channel', values: [hostile, 'web'] }] }, ctx);
    expect(q.sql).toContain('"channel" IN ($3, $4)');
    expect(q.sql).not.toContain('DROP');
    expect(q.params).toEqual(['2022-01-01', '2025-06-19', hostile, 'web']);
  });

  it('refuses to filter on personal data and on unknown metrics', () => {
    expect(() => compileSeries({ ...base, filters: [{ dimension: 'customer_email', values: ['x'] }] }, ctx)).toThrow(/personal data/);
    expect(() => compileSeries({ ...base, metrics: ['churn'] }, ctx)).toThrow(/not a metric/);
  });

  it('converts a timestamp-with-zone time column to a local date in the configured zone', () => {
    const q = compileSeries(base, { ...ctx, timeColumnType: 'timestamptz' });
    expect(q.sql).toContain('CAST(timezone($1, "sail_date") AS DATE)');
    expect(q.params[0]).toBe('Europe/Dublin');
  });
});
