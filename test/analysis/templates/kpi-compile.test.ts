// KPI templates compile without a database: which periods they read, that every value is bound,
// and that all engine-specific SQL goes through the Dialect.
import { describe, expect, it } from 'vitest';
import type { CompileContext } from '../../../analysis/compile-context.js';
import type { Coverage } from '../../../analysis/coverage.js';
import { type Dialect, duckdbDialect, quoteIdentifier } from '../../../analysis/sql/dialect.js';
import { compileKpiBySegment } from '../../../analysis/templates/kpi-by-segment.js';
import { kpiContextTemplate } from '../../../analysis/templates/kpi-context.js';
import { compileKpiMix, mixMeasure } from '../../../analysis/templates/kpi-mix.js';
import {
  comparisonPeriods,
  coveredInFull,
  latestCandidates,
  latestComplete,
  periodsToRead,
  sameLastYear,
  shiftPeriod,
} from '../../../analysis/templates/kpi-periods.js';
import { compileKpiSnapshot } from '../../../analysis/templates/kpi-snapshot.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { exampleDataset } from '../../helpers/example-config.js';

const coverage: Coverage = { firstDate: '2022-01-01', lastDate: '2025-06-18', rows: 200_000 };
const ctx: CompileContext = { dataset: exampleDataset, dialect: duckdbDialect, timeColumnType: 'date' };
const withCoverage = { ...ctx, coverage };
const sq: SubQuestion = {
  id: 'k1',
  kind: 'kpi',
  lens: 'time_pattern',
  template: 'kpi_snapshot',
  metrics: ['fare_per_passenger'],
  grain: 'month',
  window: { start: '2022-01-01', end: '2025-06-19' },
  filters: [],
};

// A dialect whose every method leaves a visible marker: any engine-specific SQL a template writes
// by itself (instead of asking the dialect) shows up as text the markers do not explain.
const markerDialect: Dialect = {
  name: 'postgres',
  quoteIdent: quoteIdentifier,
  placeholder: (i) => `:p${i}`,
  periodStart: (grain, e) => `PERIOD_START_${grain.toUpperCase()}(${e})`,
  localDate: (e) => `LOCAL_DATE(${e})`,
  toDouble: (e) => `TO_DOUBLE(${e})`,
  dateParam: (p) => `DATE_PARAM(${p})`,
  timeParam: (p, t) => `TIME_PARAM_${t.toUpperCase()}(${p})`,
};

describe('latest complete period', () => {
  it('data ending 2025-06-18 leaves June 2025 partial and May 2025 the latest complete month', () => {
    const r = latestComplete({ start: '2022-01-01', end: '2025-06-19' }, 'month');
    expect(r).toEqual({ latest: '2025-05-01', partial: { period: '2025-06-01', coveredFrom: '2025-06-01', coveredTo: '2025-06-18' } });
  });

  it('a window ending on a period boundary has no partial period', () => {
    expect(latestComplete({ start: '2025-01-01', end: '2025-06-01' }, 'month')).toEqual({ latest: '2025-05-01', partial: null });
  });

  it('a window shorter than one period has no complete period', () => {
    expect(latestComplete({ start: '2025-06-01', end: '2025-06-19' }, 'month').latest).toBeNull();
    expect(latestComplete({ start: '2025-05-10', end: '2025-06-01' }, 'month').latest).toBeNull();
  });

  it('weeks start on Monday (ISO 8601); 2025-06-16 is a Monday', () => {
    // Calendar fact checked independently with the JavaScript Date object.
    expect(new Date(Date.UTC(2025, 5, 16)).getUTCDay()).toBe(1);
    const r = latestComplete({ start: '2025-01-01', end: '2025-06-19' }, 'week');
    expect(r.latest).toBe('2025-06-09');
    expect(r.partial).toEqual({ period: '2025-06-16', coveredFrom: '2025-06-16', coveredTo: '2025-06-18' });
  });

  it('compares with the period before and the same period a year earlier', () => {
    expect(comparisonPeriods('2025-05-01', 'month')).toEqual({ latest: '2025-05-01', previous: '2025-04-01', lastYear: '2024-05-01' });
    expect(comparisonPeriods('2025-01-01', 'quarter')).toEqual({ latest: '2025-01-01', previous: '2024-10-01', lastYear: '2024-01-01' });
    // At the year grain the previous period already is last year.
    expect(comparisonPeriods('2024-01-01', 'year')).toEqual({ latest: '2024-01-01', previous: '2023-01-01', lastYear: null });
    // Weeks go back 52 weeks so the weekday lines up (both Mondays).
    const ly = sameLastYear('2025-06-09', 'week')!;
    expect(ly).toBe('2024-06-10');
    expect(new Date(`${ly}T00:00:00Z`).getUTCDay()).toBe(1);
    expect(shiftPeriod('2025-01-01', 'month', -1)).toBe('2024-12-01');
  });

  it('candidates: one with the coverage, two without (the data may end inside the window)', () => {
    expect(latestCandidates(sq.window, 'month', coverage)).toEqual(['2025-05-01']);
    expect(latestCandidates({ start: '2025-01-01', end: '2026-01-01' }, 'month', coverage)).toEqual(['2025-05-01']);
    expect(latestCandidates({ start: '2022-01-01', end: '2025-07-01' }, 'month', undefined)).toEqual(['2025-06-01', '2025-05-01']);
    expect(periodsToRead(['2025-05-01'], 'month')).toEqual(['2024-05-01', '2025-04-01', '2025-05-01']);
  });

  it('a comparison period counts only when the data covers all of it', () => {
    expect(coveredInFull('2022-01-01', 'month', coverage)).toBe(true);
    expect(coveredInFull('2021-12-01', 'month', coverage)).toBe(false);
    expect(coveredInFull('2025-06-01', 'month', coverage)).toBe(false);
    expect(coveredInFull('2022-01-01', 'month', { firstDate: '2022-01-05', lastDate: '2025-06-18', rows: 1 })).toBe(false);
  });
});

describe('kpi_snapshot SQL', () => {
  it('reads only the three periods, as date ranges on the time column itself, every date bound', () => {
    const q = compileKpiSnapshot(sq, withCoverage);
    // May 2024 alone; April and May 2025 touch, so they read as one range.
    expect(q.sql).toContain(`WHERE (("sail_date" >= CAST($1 AS DATE) AND "sail_date" < CAST($2 AS DATE))
    OR ("sail_date" >= CAST($3 AS DATE) AND "sail_date" < CAST($4 AS DATE)))`);
    expect(q.params).toEqual(['2024-05-01', '2024-06-01', '2025-04-01', '2025-06-01']);
    // No function of the column in the conditions (the period is computed only to group by).
    expect(q.sql.slice(q.sql.indexOf('WHERE'))).not.toMatch(/date_trunc/);
    expect(q.sql).not.toMatch(/\d{4}-\d{2}-\d{2}/);
  });

  it('writes the ratio as a ratio of sums', () => {
    const q = compileKpiSnapshot(sq, withCoverage);
    expect(q.sql).toContain('(CAST(SUM("fare_total") AS DOUBLE) / NULLIF(CAST(SUM("passengers") AS DOUBLE), 0))');
    expect(q.sql).not.toMatch(/AVG\(/);
  });

  it('binds segment filter values, whatever they contain, and refuses personal data', () => {
    const hostile = "web'); DROP TABLE bookings; --";
    const q = compileKpiSnapshot({ ...sq, filters: [{ dimension: 'channel', values: [hostile] }] }, withCoverage);
    expect(q.sql).not.toContain('DROP');
    expect(q.params).toContain(hostile);
    expect(() => compileKpiSnapshot({ ...sq, filters: [{ dimension: 'customer_email', values: ['a@b.c'] }] }, withCoverage)).toThrow(/personal data/);
  });

  it('without the coverage also reads the month before, in case the data ends inside the last one', () => {
    const q = compileKpiSnapshot({ ...sq, window: { start: '2022-01-01', end: '2025-07-01' } }, ctx);
    // June 2025 and May 2025 as candidates: May and June 2024, and April to June 2025.
    expect(q.params.slice(0, 4)).toEqual(['2024-05-01', '2024-07-01', '2025-04-01', '2025-07-01']);
  });
});

describe('kpi_by_segment and kpi_mix SQL', () => {
  it('groups by a catalog dimension only, and never by personal data', () => {
    expect(() => compileKpiBySegment({ ...sq, dimension: 'customer_email' }, withCoverage)).toThrow(/personal data/);
    expect(() => compileKpiMix({ ...sq, dimension: 'customer_email' }, withCoverage)).toThrow(/personal data/);
    expect(() => compileKpiBySegment({ ...sq, dimension: 'nope' }, withCoverage)).toThrow(/not a dimension/);
    expect(() => compileKpiMix(sq, withCoverage)).toThrow(/needs a dimension/);
  });

  it('binds the top N and every date', () => {
    const q = compileKpiBySegment({ ...sq, dimension: 'route' }, withCoverage, 3);
    expect(q.params).toContain(3);
    expect(q.sql).not.toMatch(/\d{4}-\d{2}-\d{2}/);
    expect(q.sql).toContain('GROUPING SETS');
    expect(q.sql).toContain('IS NOT DISTINCT FROM');
  });

  it('shows the mix of what a ratio or rate is measured over', () => {
    const metric = (n: string) => exampleDataset.metrics.find((m) => m.name === n)!;
    expect(mixMeasure(exampleDataset, metric('fare_per_passenger'))?.name).toBe('passengers');
    expect(mixMeasure(exampleDataset, metric('refunded_revenue_share'))?.name).toBe('revenue');
    expect(mixMeasure(exampleDataset, metric('refund_rate'))?.name).toBe('bookings');
    expect(mixMeasure(exampleDataset, metric('average_fare'))?.name).toBe('bookings');
    expect(mixMeasure(exampleDataset, metric('revenue'))?.name).toBe('revenue');
    const q = compileKpiMix({ ...sq, dimension: 'route' }, withCoverage);
    expect(q.sql).toContain('CAST(SUM("passengers") AS DOUBLE) AS "_base_fare_per_passenger"');
    // The latest month and the same month a year earlier only.
    expect(q.params.slice(0, 4)).toEqual(['2024-05-01', '2024-06-01', '2025-05-01', '2025-06-01']);
  });
});

describe('every KPI template writes engine-specific SQL only through the Dialect', () => {
  const marker: CompileContext & { coverage: Coverage } = { ...withCoverage, dialect: markerDialect };
  const compiled = {
    snapshot: compileKpiSnapshot(sq, marker),
    bySegment: compileKpiBySegment({ ...sq, dimension: 'route' }, marker),
    context: kpiContextTemplate.compile({ ...sq, template: 'kpi_context' }, marker)[0]!,
    mix: compileKpiMix({ ...sq, dimension: 'route' }, marker),
  };
  for (const [name, q] of Object.entries(compiled)) {
    it(name, () => {
      expect(q.sql).not.toMatch(/date_trunc|\$\d|::|CAST\(/i);
      expect(q.sql).toContain('PERIOD_START_MONTH(');
      // Every placeholder the SQL uses has a parameter, and every parameter is used.
      const used = new Set([...q.sql.matchAll(/:p(\d+)/g)].map((m) => Number(m[1])));
      expect(used).toEqual(new Set(q.params.map((_, i) => i + 1)));
    });
  }
});
