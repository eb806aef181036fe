// Compiling the trend and segment templates is pure: checked without a database.
import { describe, expect, it } from 'vitest';
import { CatalogError } from '../../../analysis/catalog.js';
import type { CompileContext } from '../../../analysis/compile-context.js';
import { type Dialect, duckdbDialect, quoteIdentifier } from '../../../analysis/sql/dialect.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import { compileFoldedSegments, SEGMENT_TOP_N } from '../../../analysis/templates/segments-fold-sql.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { exampleDataset } from '../../helpers/example-config.js';

// The query shapes without small-group suppression (the example config turns it on; its SQL is
// tested in small-groups.test.ts).
const ctx: CompileContext = { dataset: { ...exampleDataset, min_group_size: 0 }, dialect: duckdbDialect, timeColumnType: 'date' };
const base: SubQuestion = {
  id: 'q1',
  kind: 'trend',
  lens: 'time_pattern',
  template: 'trend_test',
  metrics: ['bookings'],
  grain: 'month',
  window: { start: '2022-01-01', end: '2025-01-01' },
  filters: [],
};
const hostile = "web'); DROP TABLE bookings; --";

// A stand-in for a second engine: different placeholders and period SQL, so a template that
// hard-codes DuckDB's forms instead of asking the dialect shows up here.
const otherDialect: Dialect = {
  name: 'postgres',
  quoteIdent: quoteIdentifier,
  placeholder: (i) => `:p${i}`,
  periodStart: (grain, e) => `PERIOD_START_${grain.toUpperCase()}(${e})`,
  localDate: (e) => e,
  toDouble: (e) => `(${e})::double precision`,
  dateParam: (p) => `DATE_PARAM(${p})`,
  timeParam: (p, t) => `TIME_PARAM_${t.toUpperCase()}(${p})`,
};

describe('trend_test, trend_summary and trend_seasonality SQL', () => {
  it('trend_test and trend_summary run one grouped series query on the first metric, window bound', () => {
    for (const name of ['trend_test', 'trend_summary'] as const) {
      const qs = SUB_QUESTIONS[name].template.compile({ ...base, template: name, metrics: ['bookings', 'revenue'] }, ctx);
      expect(qs.map((q) => q.name)).toEqual(['series']);
      expect(qs[0]!.sql).toContain(`CAST(date_trunc('month', "sail_date") AS DATE) AS period`);
      expect(qs[0]!.sql).toContain('AS "bookings"');
      expect(qs[0]!.sql).not.toContain('"revenue"');
      expect(qs[0]!.params).toEqual(['2022-01-01', '2025-01-01']);
      expect(qs[0]!.sql).not.toContain('2022-01-01');
    }
  });

  it('trend_seasonality reads months whatever the grain, plus an ISO weekday query', () => {
    const qs = SUB_QUESTIONS.trend_seasonality.template.compile({ ...base, template: 'trend_seasonality', grain: 'week' }, ctx);
    expect(qs.map((q) => q.name)).toEqual(['monthly', 'weekday']);
    expect(qs[0]!.sql).toContain(`date_trunc('month'`);
    expect(qs[0]!.sql).not.toContain(`date_trunc('week'`);
    expect(qs[1]!.sql).toContain('EXTRACT(ISODOW FROM "sail_date")');
    expect(qs[1]!.sql).toMatch(/GROUP BY 1\s+ORDER BY 1/);
  });

  it('binds filter values, never writes them into the SQL', () => {
    for (const name of ['trend_test', 'trend_seasonality', 'trend_summary', 'segment_trend', 'segment_shares'] as const) {
      const qs = SUB_QUESTIONS[name].template.compile({ ...base, template: name, dimension: 'route', filters: [{ dimension: 'channel', values: [hostile] }] }, ctx);
      for (const q of qs) {
        expect(q.sql).not.toContain('DROP');
        expect(q.params).toContain(hostile);
        // Every placeholder in the text has a parameter, and no parameter is unused.
        const used = new Set([...q.sql.matchAll(/\$(\d+)/g)].map((m) => Number(m[1])));
        expect(Math.max(...used)).toBe(q.params.length);
        expect(used.size).toBe(q.params.length);
      }
    }
  });

  it('compiles through the dialect only: no DuckDB placeholder or period SQL leaks into another dialect', () => {
    for (const name of ['trend_test', 'trend_seasonality', 'trend_summary', 'segment_trend', 'segment_shares'] as const) {
      const qs = SUB_QUESTIONS[name].template.compile({ ...base, template: name, dimension: 'route' }, { ...ctx, dialect: otherDialect });
      for (const q of qs) {
        expect(q.sql).not.toMatch(/\$\d/);
        expect(q.sql).not.toContain('date_trunc');
        // The one CAST left is the standard text cast of segment values, not a dialect type cast.
        expect(q.sql.replace(/CAST\((f\.)?tc_value AS VARCHAR\)/g, '')).not.toMatch(/\bCAST\b/);
        expect(q.sql).toMatch(/:p1\b/);
      }
    }
  });
});

describe('segment SQL: the tail folded inside the database', () => {
  const seg: SubQuestion = { ...base, template: 'segment_shares', lens: 'distribution', dimension: 'route', metrics: ['revenue'] };

  it('ranks segments in a subquery and folds past the top N, with N bound', () => {
    const q = compileFoldedSegments(seg, ctx, { topN: SEGMENT_TOP_N, grain: null, totals: true });
    expect(q.sql).toContain('ROW_NUMBER() OVER (ORDER BY tc_thin, tc_size DESC NULLS LAST');
    expect(q.sql).toMatch(/tc_rank > \$\d+ AND tc_count > \$\d+/);
    expect(q.params).toContain(SEGMENT_TOP_N);
    expect(q.params).toContain(SEGMENT_TOP_N + 1);
    // Missing dimension values join their own segment rather than vanishing.
    expect(q.sql).toContain('"route" IS NOT DISTINCT FROM f.tc_value');
    expect(q.sql).toContain('SUM(tc_size * tc_size) OVER ()');
  });

  it('ranks every metric by its own value; only an average has a row floor', () => {
    const additive = compileFoldedSegments(seg, ctx, { topN: 8, grain: null });
    expect(additive.sql).toMatch(/SELECT "route" AS tc_value, CAST\(SUM\("fare_total"\) AS DOUBLE\) AS tc_size/);
    expect(additive.sql).not.toContain('rank_min_rows');
    const avg = compileFoldedSegments({ ...seg, metrics: ['average_fare'] }, ctx, { topN: 8, grain: null });
    expect(avg.sql).toMatch(/SELECT "route" AS tc_value, CAST\(AVG\("fare_total"\) AS DOUBLE\) AS tc_size/);
    expect(avg.sql).toContain('AS rank_min_rows');
  });

  it('segment_trend runs totals, per-period and per-year queries over the same fold', () => {
    const qs = SUB_QUESTIONS.segment_trend.template.compile({ ...seg, template: 'segment_trend', lens: 'breakdown', grain: 'quarter' }, ctx);
    expect(qs.map((q) => q.name)).toEqual(['segment_totals', 'segment_series', 'segment_years']);
    expect(qs[1]!.sql).toContain(`date_trunc('quarter'`);
    expect(qs[2]!.sql).toContain(`date_trunc('year'`);
    expect(qs[2]!.sql).toContain('AS months_with_rows');
  });

  it('refuses personal data and a missing dimension before any SQL is written', () => {
    for (const name of ['segment_trend', 'segment_shares'] as const) {
      const t = SUB_QUESTIONS[name].template;
      let err: unknown;
      try {
        t.compile({ ...seg, template: name, dimension: 'customer_email' }, ctx);
      } catch (e) {
        err = e;
      }
      expect(err).toBeInstanceOf(CatalogError);
      expect((err as CatalogError).code).toBe('personal_data');
      expect(() => t.compile({ ...seg, template: name, dimension: undefined }, ctx)).toThrow(/needs a dimension/);
      expect(() => t.compile({ ...seg, template: name, dimension: 'colour' }, ctx)).toThrow(/not a dimension/);
    }
  });
});
