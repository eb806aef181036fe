// The period table's words, from hand-built findings on the example catalog (invented Skerrywake
// metrics): each clause appears only when its finding does, and periods read right at every grain.
import { describe, expect, it } from 'vitest';
import { changeText, periodTableWords } from '../../../analysis/captions/period-table-caption.js';
import type { PeriodTableFinding, TableLatestFinding, TableQuotientFinding } from '../../../analysis/findings/table.js';
import type { Grain } from '../../../analysis/types.js';
import { metricByName } from '../../../analysis/catalog.js';
import { exampleDataset } from '../../helpers/example-config.js';

function table(grain: Grain, periods: string[], values: number[][]): PeriodTableFinding {
  const names = ['revenue', 'bookings', 'average_fare'];
  const column = (k: number) => {
    const vs = values.map((v) => v[k]!);
    const hi = vs.indexOf(Math.max(...vs));
    const lo = vs.indexOf(Math.min(...vs));
    return {
      metric: names[k]!,
      kind: k === 2 ? ('ratio' as const) : ('flow' as const),
      basis: 'percent' as const,
      higherIsBetter: true,
      total: { rule: k === 2 ? ('overall' as const) : ('sum' as const), value: null },
      high: { period: periods[hi]!, value: vs[hi]! },
      low: { period: periods[lo]!, value: vs[lo]! },
    };
  };
  return {
    type: 'period_table',
    grain,
    span: { start: periods[0]!, end: '2099-01-01' },
    yearEarlier: grain === 'week' ? 'iso_week' : grain === 'day' ? 'weeks_52' : 'calendar',
    columns: [0, 1, 2].map(column),
    rows: periods.map((period, i) => ({ period, partial: false, cells: values[i]!.map((value) => ({ value, vsPrevious: null, vsYearEarlier: null, mark: null })) })),
  };
}

const latest = (period: string, base: string, changes: [string, number][]): TableLatestFinding => ({
  type: 'table_latest',
  period,
  against: 'year_earlier',
  base,
  changes: changes.map(([metric, change]) => ({ metric, basis: 'percent', change })),
});
const quotient: TableQuotientFinding = { type: 'table_quotient', ratio: 'average_fare', numerator: 'revenue', denominator: 'bookings', periods: 2 };

describe('period table words', () => {
  it('tells the ratio’s move through its parts when one metric is another over a third', () => {
    const t = table('month', ['2024-07-01', '2024-08-01'], [[318_000, 8_300, 38.3], [300_000, 8_000, 37.5]]);
    const words = periodTableWords([t, latest('2024-08-01', '2023-08-01', [['revenue', 0.05], ['bookings', 0.02], ['average_fare', 0.0294]]), quotient], exampleDataset, 'en-IE');
    expect(words.takeaway).toBe(
      'Revenue peaked in July 2024 at €318K on 8.3K bookings; in August 2024, against a year earlier, revenue grew faster than bookings (+5.0% against +2.0%), so the average fare per booking rose 2.9%.',
    );
    expect(words.title).toBe('Revenue peaked in July 2024 at €318K on 8.3K bookings');
    expect(words.caption).toMatch(/Best months: revenue July 2024 \(€318K\); bookings July 2024 \(8\.3K\); average fare per booking July 2024 \(€38\.30\)\. Worst: revenue August 2024/);
  });

  it('reads weeks as "the week commencing" and days with "on", and lists the changes without a quotient', () => {
    const w = table('week', ['2024-07-08', '2024-07-15'], [[70_000, 1_900, 36.8], [69_000, 1_950, 35.4]]);
    const ww = periodTableWords([w, latest('2024-07-15', '2023-07-17', [['revenue', -0.01], ['bookings', 0.03]])], exampleDataset, 'en-IE');
    expect(ww.takeaway).toBe('Revenue peaked in the week commencing 8 July 2024 at €70K on 1.9K bookings; in the week commencing 15 July 2024, against a year earlier, revenue fell 1.0% and bookings rose 3.0%.');
    const d = table('day', ['2024-07-08', '2024-07-09'], [[9_000, 240, 37.5], [8_000, 230, 34.8]]);
    expect(periodTableWords([d], exampleDataset, 'en-IE').takeaway).toBe('Revenue peaked on 8 July 2024 at €9K on 240 bookings.');
  });

  it('says nothing it has no finding for', () => {
    expect(periodTableWords([], exampleDataset, 'en-IE')).toMatchObject({ takeaway: '' });
    const flat = table('month', ['2024-07-01'], [[1, 1, 1]]);
    flat.columns.forEach((c) => {
      c.high = null;
      c.low = null;
    });
    expect(periodTableWords([flat], exampleDataset, 'en-IE').takeaway).toBe('');
    expect(periodTableWords([flat, latest('2024-07-01', '2023-07-01', [['bookings', 0]])], exampleDataset, 'en-IE').takeaway).toBe('In July 2024, against a year earlier, bookings held level.');
  });

  it('states changes in their basis, and a change that rounds to nothing as flat', () => {
    const fare = metricByName(exampleDataset, 'average_fare');
    expect(changeText(0.081, 'percent', fare, 'en-IE')).toEqual({ text: '+8.1%', direction: 'up' });
    expect(changeText(-0.0123, 'points', fare, 'en-IE')).toEqual({ text: '−1.2 pts', direction: 'down' });
    expect(changeText(-0.42, 'units', fare, 'en-IE', false)).toEqual({ text: '€0.42', direction: 'down' });
    expect(changeText(0.0004, 'percent', fare, 'en-IE')).toEqual({ text: '0.0%', direction: 'flat' });
    expect(changeText(null, 'percent', fare, 'en-IE')).toEqual({ text: 'n/a', direction: 'none' });
  });
});
