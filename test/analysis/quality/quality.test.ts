// Data-quality checks: pure compilation and caveat choice, then the demo's planted warts
// (invented data) against an independent reduction in plain JavaScript over raw rows.
import { createHash } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CompileContext } from '../../../analysis/compile-context.js';
import { qualityCaveats, daysSince } from '../../../analysis/quality/quality-caveats.js';
import { caveatNote } from '../../../analysis/captions/caveat-text.js';
import { compileQualityChecks, DUPLICATES_QUERY, QUALITY_QUERY, type QualityReport, readQuality } from '../../../analysis/quality/quality-checks.js';
import { seriesOutliers } from '../../../analysis/quality/series-outliers.js';
import { duckdbDialect } from '../../../analysis/sql/dialect.js';
import { compileSeries, readSeries } from '../../../analysis/templates/series.js';
import type { PeriodPoint, ResultTable, SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { loadConfig } from '../../../config/load.js';
import { demoFixture } from '../../helpers/demo-fixture.js';
import { exampleDataset } from '../../helpers/example-config.js';
import { monthOf, rawBookings, type RawBooking } from '../templates/kpi-raw-rows.js';

const ctx: CompileContext = { dataset: exampleDataset, dialect: duckdbDialect, timeColumnType: 'date' };

describe('compileQualityChecks', () => {
  it('counts by day first, with identifiers quoted and the amount threshold bound, and repeated keys in a query of their own', () => {
    const qs = compileQualityChecks(ctx, ['channel', 'fare_total', 'channel']);
    expect(qs.map((q) => q.name)).toEqual([QUALITY_QUERY, DUPLICATES_QUERY]);
    const q = qs[0]!;
    expect(q.sql).toContain('COUNT(*) FILTER (WHERE "channel" IS NULL) AS "nulls__channel"');
    // Each column once, even when asked twice (once per day, once in the total).
    expect(q.sql.match(/AS "nulls__channel"/g)).toHaveLength(2);
    expect(q.sql).toContain('COUNT(*) FILTER (WHERE "fare_total" < $1)');
    expect(q.sql).toContain('COUNT(*) FILTER (WHERE "refund_amount" < $2)');
    // One row per day from the table, then added up: the table's own column, no function of it.
    expect(q.sql).toMatch(/SELECT "sail_date" AS "tc_day",[\s\S]*FROM "bookings"\n\s*GROUP BY 1\n\) tc_days$/);
    expect(q.sql).toContain('MAX("tc_day") AS last_date');
    expect(q.params).toEqual([0, 0]);
    const dup = qs[1]!;
    expect(dup.sql).toContain('GROUP BY "booking_id"');
    expect(dup.sql).not.toContain('md5');
    expect(dup.params).toEqual([1, 0, 1, 1]);
  });

  it('counts repeated keys over a 1-in-16 sample of keys when asked, and not at all for none', () => {
    const [, dup] = compileQualityChecks(ctx, ['channel'], { duplicates: 'sampled' });
    expect(dup!.sql).toContain('AND substr(md5(CAST("booking_id" AS VARCHAR)), 1, 1) = $4');
    expect(dup!.params).toEqual([1, 0, 16, '0', 1]);
    expect(compileQualityChecks(ctx, ['channel'], { duplicates: 'none' }).map((q) => q.name)).toEqual([QUALITY_QUERY]);
  });

  it('refuses columns the catalog does not name', () => {
    expect(() => compileQualityChecks(ctx, ['channel"; DROP TABLE bookings; --'])).toThrow(/not a column/);
    expect(() => compileQualityChecks(ctx, ['secret_column'])).toThrow(/not a column/);
  });

  it('leaves out the duplicate check when the dataset has no key column', () => {
    const { key_column: _omit, ...rest } = exampleDataset;
    const qs = compileQualityChecks({ ...ctx, dataset: rest }, ['channel']);
    expect(qs.map((q) => q.name)).toEqual([QUALITY_QUERY]);
  });
});

describe('qualityCaveats', () => {
  const report: QualityReport = {
    rows: 1000,
    nulls: [
      { column: 'channel', count: 3, share: 0.003 },
      { column: 'route', count: 0, share: 0 },
      { column: 'fare_total', count: 2, share: 0.002 },
    ],
    duplicateKeys: { column: 'booking_id', keys: 4, extraRows: 5, sampledOneIn: 1 },
    negatives: [
      { column: 'fare_total', count: 7 },
      { column: 'refund_amount', count: 1 },
    ],
    lastDate: '2025-06-18',
  };
  const opts = { now: new Date('2025-06-20T09:00:00Z'), staleAfterDays: 7 };

  it('reports missing values and negatives only in the columns used; duplicates always', () => {
    expect(qualityCaveats(report, ['channel', 'fare_total'], opts)).toEqual([
      { code: 'null_share', data: { column: 'channel', share: 0.003, count: 3 } },
      { code: 'null_share', data: { column: 'fare_total', share: 0.002, count: 2 } },
      { code: 'duplicate_keys', data: { count: 5, column: 'booking_id', keys: 4 } },
      { code: 'negative_amounts', data: { count: 7, column: 'fare_total' } },
    ]);
    expect(qualityCaveats(report, ['route'], opts)).toEqual([{ code: 'duplicate_keys', data: { count: 5, column: 'booking_id', keys: 4 } }]);
  });

  it('flags stale data by whole calendar days', () => {
    // Independent day count with Date.UTC: 2025-06-18 to 2026-12-01 is 531 days.
    const days = (Date.UTC(2026, 11, 1) - Date.UTC(2025, 5, 18)) / 86_400_000;
    expect(daysSince('2025-06-18', new Date('2026-12-01T23:59:00Z'))).toBe(days);
    const stale = qualityCaveats(report, [], { now: new Date('2026-12-01T00:00:00Z'), staleAfterDays: 7 });
    expect(stale).toContainEqual({ code: 'stale_data', data: { lastDate: '2025-06-18', days } });
    expect(qualityCaveats(report, [], { now: new Date('2025-06-25T00:00:00Z'), staleAfterDays: 7 }).some((c) => c.code === 'stale_data')).toBe(false);
    expect(qualityCaveats(report, [], { now: new Date('2025-06-26T00:00:00Z'), staleAfterDays: 7 }).some((c) => c.code === 'stale_data')).toBe(true);
  });

  it('says nothing about a clean table', () => {
    const clean: QualityReport = { rows: 10, nulls: [{ column: 'channel', count: 0, share: 0 }], duplicateKeys: { column: 'booking_id', keys: 0, extraRows: 0, sampledOneIn: 1 }, negatives: [], lastDate: '2025-06-18' };
    expect(qualityCaveats(clean, ['channel'], opts)).toEqual([]);
  });
});

describe('seriesOutliers', () => {
  const pts = (values: (number | null)[], partialLast = false): PeriodPoint[] =>
    values.map((value, i) => ({ period: `2024-${String(i + 1).padStart(2, '0')}-01`, value, partial: partialLast && i === values.length - 1 }));

  it('flags a value far from the median by the modified z-score (worked by hand)', () => {
    // 1,2,3,4,100: median 3, absolute deviations 2,1,0,1,97, MAD 1; z(100) = 0.6745 × 97 = 65.4265.
    const c = seriesOutliers(pts([1, 2, 3, 4, 100]), 'month');
    expect(c).toHaveLength(1);
    expect(c[0]!.code).toBe('outlier');
    expect(c[0]!.data).toMatchObject({ period: '2024-05-01', grain: 'month', value: 100 });
    expect(c[0]!.data.score as number).toBeCloseTo(65.4265, 4);
  });

  it('ignores partial and missing periods, and says nothing with fewer than five complete periods', () => {
    expect(seriesOutliers(pts([1, 2, 3, 4, 5, 100], true), 'month')).toEqual([]);
    expect(seriesOutliers(pts([1, null, 2, 3, 100]), 'month')).toEqual([]);
    expect(seriesOutliers(pts([1, 2, 3, 4, 5]), 'month')).toEqual([]);
  });
});

describe('quality checks on the demo', () => {
  let ws: Workspace;
  let raw: RawBooking[];
  let report: QualityReport;

  beforeAll(async () => {
    const demo = await demoFixture();
    ws = await openWorkspace(loadConfig(demo.configPath));
    raw = await rawBookings(demo.databasePath);
    const tables: Record<string, ResultTable> = {};
    for (const q of compileQualityChecks(ws.context, ['channel', 'route', 'fare_total', 'passengers'])) tables[q.name] = await ws.source.run(q, ws.runOptions);
    report = readQuality(tables, ws);
  });
  afterAll(async () => {
    await ws?.source.close();
  });

  it('counts null channels exactly (demo scenario: about 0.3%)', () => {
    const nulls = raw.filter((r) => r.channel === null).length;
    const channel = report.nulls.find((n) => n.column === 'channel')!;
    expect(report.rows).toBe(raw.length);
    expect(channel.count).toBe(nulls);
    expect(channel.share).toBeCloseTo(nulls / raw.length, 15);
    expect(channel.share).toBeGreaterThan(0.002);
    expect(channel.share).toBeLessThan(0.004);
    expect(report.nulls.find((n) => n.column === 'route')!.count).toBe(raw.filter((r) => r.route === null).length);
  });

  it('counts duplicate booking ids and their extra rows exactly (demo scenario: a few dozen)', () => {
    const counts = new Map<string, number>();
    for (const r of raw) if (r.booking_id !== null) counts.set(r.booking_id, (counts.get(r.booking_id) ?? 0) + 1);
    const repeated = [...counts.values()].filter((c) => c > 1);
    expect(report.duplicateKeys).toEqual({ column: 'booking_id', keys: repeated.length, extraRows: repeated.reduce((s, c) => s + c - 1, 0), sampledOneIn: 1 });
    expect(report.duplicateKeys!.extraRows).toBeGreaterThanOrEqual(20);
    expect(report.duplicateKeys!.extraRows).toBeLessThanOrEqual(100);
  });

  it('counts them over the keys whose md5 starts with 0 when sampled, scaled by 16 (md5 from node:crypto)', async () => {
    const tables: Record<string, ResultTable> = {};
    for (const q of compileQualityChecks(ws.context, ['channel'], { duplicates: 'sampled' })) tables[q.name] = await ws.source.run(q, ws.runOptions);
    const sampled = readQuality(tables, ws).duplicateKeys!;
    const counts = new Map<string, number>();
    for (const r of raw) {
      if (r.booking_id !== null && createHash('md5').update(r.booking_id).digest('hex').startsWith('0')) counts.set(r.booking_id, (counts.get(r.booking_id) ?? 0) + 1);
    }
    const repeated = [...counts.values()].filter((c) => c > 1);
    // Not vacuous: the sample holds about a sixteenth of the keys.
    expect(counts.size).toBeGreaterThan(raw.length / 20);
    expect(counts.size).toBeLessThan(raw.length / 13);
    expect(sampled).toEqual({ column: 'booking_id', keys: 16 * repeated.length, extraRows: 16 * repeated.reduce((s, c) => s + c - 1, 0), sampledOneIn: 16 });
  });

  it('counts negative fares exactly (demo scenario: a handful)', () => {
    const negatives = raw.filter((r) => r.fare_total !== null && r.fare_total < 0).length;
    expect(report.negatives.find((n) => n.column === 'fare_total')!.count).toBe(negatives);
    expect(negatives).toBeGreaterThan(0);
    expect(negatives).toBeLessThan(20);
    expect(report.negatives.find((n) => n.column === 'refund_amount')!.count).toBe(raw.filter((r) => r.refund_amount !== null && r.refund_amount < 0).length);
  });

  it('finds the data ending 2025-06-18, stale by 2026-12-01', () => {
    const last = raw.reduce((m, r) => (r.sail_date > m ? r.sail_date : m), '');
    expect(report.lastDate).toBe(last);
    expect(last).toBe('2025-06-18');
    const caveats = qualityCaveats(report, ['channel', 'fare_total'], { now: new Date('2026-12-01T12:00:00Z'), staleAfterDays: 30 });
    expect(caveats.map((c) => c.code)).toEqual(['null_share', 'duplicate_keys', 'negative_amounts', 'stale_data']);
    expect(caveats.find((c) => c.code === 'stale_data')!.data).toEqual({ lastDate: '2025-06-18', days: 531 });
    // Said as a person would: 531 days is about 17 months (531 / 30.44 = 17.4), not "531 days ago".
    expect(caveatNote(caveats.find((c) => c.code === 'stale_data')!, 'en-IE')).toBe('The latest data is from 18 June 2025, about 17 months ago.');
    expect(caveatNote({ code: 'stale_data', data: { lastDate: '2010-03-01', days: 6123 } } as never, 'en-IE')).toMatch(/, about 17 years ago\.$/);
    expect(caveatNote({ code: 'stale_data', data: { lastDate: '2025-06-18', days: 40 } } as never, 'en-IE')).toMatch(/, 40 days ago\.$/);
  });

  it('flags the storm month (January 2024) in the monthly refund rate, from the engine and from raw rows alike', () => {
    const sq: SubQuestion = { id: 's', kind: 'trend', lens: 'time_pattern', template: 'series', metrics: ['refund_rate'], grain: 'month', window: { start: '2022-01-01', end: '2025-06-19' }, filters: [] };
    return ws.source.run(compileSeries(sq, ws.context), ws.runOptions).then((table) => {
      const series = readSeries(sq, table, ws.coverage).findings.find((f) => f.type === 'series')!;
      const fromEngine = seriesOutliers((series as { points: PeriodPoint[] }).points, 'month');
      expect(fromEngine.map((c) => c.data.period)).toEqual(['2024-01-01']);
      // The same series reduced from raw rows in JavaScript, June 2025 marked partial.
      const by = new Map<string, { n: number; refunded: number }>();
      for (const r of raw) {
        const m = by.get(monthOf(r.sail_date)) ?? { n: 0, refunded: 0 };
        m.n++;
        if (r.refunded === true) m.refunded++;
        by.set(monthOf(r.sail_date), m);
      }
      const points = [...by.entries()].sort(([a], [b]) => a.localeCompare(b)).map(([period, m]) => ({ period, value: m.refunded / m.n, partial: period === '2025-06-01' }));
      const fromRaw = seriesOutliers(points, 'month');
      expect(fromRaw.map((c) => c.data.period)).toEqual(['2024-01-01']);
      expect(fromRaw[0]!.data.score as number).toBeCloseTo(fromEngine[0]!.data.score as number, 9);
    });
  });
});
