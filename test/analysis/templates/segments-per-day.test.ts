// "Which origin has the most flights per day": a breakdown asked per day ranks each segment by its
// total over its days, not by its total. On vega-datasets' flights-3m.parquet (US domestic flights,
// January to June 2001, public FAA on-time data as packaged by vega-datasets). Expected values come
// from the test's own SQL over the file: each origin's flights over the calendar days from 1 January
// (or its first flight, for an airport first seen more than a month in) to 30 June (or its last
// flight, for one last seen more than a month before the end), the data's last full day. An airport
// seen in one calendar month only (GST, from 10 June) shows no rhythm to judge an opening by (the
// rule in analysis/presence.ts), so it is counted over the whole half-year; the test says so too.
import { describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import { metricByName } from '../../../analysis/catalog.js';
import { segmentSharesWords } from '../../../analysis/captions/trend-segments-caption.js';
import type { SegmentSharesFinding } from '../../../analysis/findings/segments.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { parseConfigText } from '../../../config/load.js';
import { flightsParquetConfigText, vegaDataFile } from '../../helpers/open-data.js';
import { useFileWorkspace } from '../../helpers/workspace-checks.js';

const FLIGHTS = vegaDataFile('flights-3m.parquet');
const config = parseConfigText(`${flightsParquetConfigText()}    dimensions:\n      - { name: origin, label: Origin airport, column: origin }\n`, '/virtual/flights.yaml');
// Airports seen throughout (ORD, BOS), first seen part-way (GST, LWB, DLG, MQT), last seen part-way (DRO, SUX).
const ORIGINS = ['ORD', 'BOS', 'GST', 'LWB', 'DLG', 'MQT', 'DRO', 'SUX'];
const SQ: SubQuestion = {
  id: 'per-day',
  kind: 'trend',
  lens: 'distribution',
  template: 'segment_shares',
  metrics: ['flights'],
  dimension: 'origin',
  grain: 'month',
  window: { start: '2001-01-01', end: '2001-07-01' },
  filters: [{ dimension: 'origin', values: ORIGINS }],
  perDay: true,
  rankOrder: 'highest',
  rankLimit: 20,
};

describe('a breakdown asked per day (flights-3m.parquet, January to June 2001)', () => {
  const { ws, own } = useFileWorkspace(config, 'flights');

  it('ranks each origin by its flights per day over its own days, and flags those that opened or closed', async () => {
    const list = ORIGINS.map((o) => `'${o}'`).join(', ');
    // The test's own reading of "opened" and "closed": first or last flight more than a month inside the half-year.
    const truth = await own(`WITH life AS (
        SELECT origin, MIN(CAST(date AS DATE)) AS first, MAX(CAST(date AS DATE)) AS last, CAST(COUNT(*) AS DOUBLE) AS n
        FROM read_parquet('${FLIGHTS}') WHERE date >= DATE '2001-01-01' AND date < DATE '2001-07-01' AND origin IN (${list}) GROUP BY 1)
      SELECT origin, n, first > DATE '2001-02-01' AND date_trunc('month', first) < date_trunc('month', last) AS opened, last < DATE '2001-06-01' AS closed,
        CAST((CASE WHEN last < DATE '2001-06-01' THEN last + 1 ELSE DATE '2001-07-01' END) - (CASE WHEN first > DATE '2001-02-01' AND date_trunc('month', first) < date_trunc('month', last) THEN first ELSE DATE '2001-01-01' END) AS DOUBLE) AS days
      FROM life ORDER BY n / days DESC`);
    expect(truth.length).toBe(ORIGINS.length);
    const a = await answerSubQuestion(SQ, ws());
    const f = a.findings.find((x): x is SegmentSharesFinding => x.type === 'segment_shares')!;
    expect(f.perDay).toBeDefined();
    const named = f.rows.filter((r) => !r.other);
    expect(named.map((r) => r.segment)).toEqual(truth.map((t) => t.origin));
    for (const t of truth) {
      const row = named.find((r) => r.segment === t.origin)!;
      expect(row.days?.days).toBe(Number(t.days));
      expect(row.days?.opened).toBe(t.opened === true);
      expect(row.days?.closed).toBe(t.closed === true);
      expect(Math.abs(row.value! - Number(t.n) / Number(t.days))).toBeLessThan(1e-9);
      expect(row.days?.total).toBe(Number(t.n));
    }
    // The same totals ranked by size would read otherwise.
    const byTotal = [...truth].sort((x, y) => Number(y.n) - Number(x.n)).map((t) => t.origin);
    expect(byTotal).not.toEqual(truth.map((t) => t.origin));
    const words = segmentSharesWords(metricByName(ws().dataset, 'flights'), { label: 'Origin airport' }, a.findings, 'managers', 'en-GB');
    expect(words.title).toMatch(/^ORD has the highest flights per day: [\d,.]+ a day$/);
    expect(words.caption).toContain('divided by the 181 days of the period the data covers (1 January 2001 to 30 June 2001)');
    expect(words.caption).toMatch(/LWB opened on 4 May 2001 \(its first record\), so its figure is per day since it opened \(58 days\)/);
    expect(words.caption).toMatch(/DRO closed after 1 April 2001 \(its last record\), so its figure is per day while it was open \(91 days\)/);
    // Segments with different days: their per-day figures are not shares of one total.
    expect(f.rows.every((r) => r.share === null)).toBe(true);
  }, 120_000);
});
