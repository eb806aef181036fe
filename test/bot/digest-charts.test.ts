// Which charts go on the digest (issue 17 item 7): charts that differ, not three near-identical
// lines. The rule is ours: a chart of the same kind and metric as one chosen is left out while two
// that differ are there. Specs are minimal stand-ins carrying only the fields the rule reads.
import { describe, expect, it } from 'vitest';
import type { ChartSpec } from '../../analysis/charts/spec.js';
import { distinctCharts } from '../../bot/present-answer.js';
import type { DigestChart } from '../../bot/presenters.js';

const chart = (kind: string, chip: string, title: string): DigestChart => ({ png: Buffer.from(title), spec: { kind, chip, title } as unknown as ChartSpec });
const pick = (list: DigestChart[]) => distinctCharts(list.map((_, i) => ({ position: i + 1 })), new Map(list.map((c, i) => [i + 1, c]))).map((c) => c.png.toString());

describe('the digest\'s charts', () => {
  it('leaves out lines of the same metric once two different charts are there', () => {
    // The demo's monthly revenue plan: the series, the seasonal bars, the trend line, the summary line.
    expect(pick([chart('line', 'Revenue', 'series'), chart('bars', 'Revenue', 'seasonality'), chart('line', 'Revenue', 'trend'), chart('line', 'Revenue', 'summary')])).toEqual(['series', 'seasonality']);
  });
  it('keeps the repeats when they are all there is, rather than one chart alone', () => {
    expect(pick([chart('line', 'Revenue', 'series'), chart('line', 'Revenue', 'trend')])).toEqual(['series', 'trend']);
  });
  it('keeps bars of one metric over different things: the two periods, then each route\'s change', () => {
    const bars = (title: string, labels: string[]): DigestChart => ({ png: Buffer.from(title), spec: { kind: 'bars', chip: 'Revenue', title, bars: labels.map((label) => ({ label })) } as unknown as ChartSpec });
    const list = [bars('periods', ['Jun 2024', 'Jun 2025']), chart('line', 'Revenue', 'series'), bars('drivers', ['Route A', 'Route B']), bars('periods again', ['Jun 2025', 'Jun 2024'])];
    expect(pick(list)).toEqual(['periods', 'series', 'drivers']);
    expect(pick(list.slice(0, 3).concat(chart('line', 'Revenue', 'trend'), chart('pareto', 'Revenue', 'shares')))).toEqual(['periods', 'series', 'drivers', 'shares']);
  });
  it('takes at most four, in the takeaways\' order', () => {
    const five = ['Revenue', 'Bookings', 'Passengers', 'Refund rate', 'Customers'].map((m) => chart('line', m, m));
    expect(pick(five)).toEqual(['Revenue', 'Bookings', 'Passengers', 'Refund rate']);
  });
});
