// A seasonal profile's bar labels agree with their colours: a bar coloured busier or quieter never
// reads "1.00". Indices near 1 like those of US births by month (SSA 2000–2014: May and June sit
// within half a percent of an average month) keep a third decimal.
import { describe, expect, it } from 'vitest';
import { buildSeasonalProfile } from '../../../analysis/charts/build-seasonal-profile.js';

const header = { title: 't', subtitle: 's', footer: [], width: 1200, height: 675, scale: 1 as const };

describe('seasonal profile labels', () => {
  it('print each index on its own side of the average, and carry the axis title given', () => {
    const indices = [0.98, 0.91, 0.997, 0.96, 1.002, 0.996, 1.05, 1.07, 1.04, 1.02, 0.97, 1];
    const spec = buildSeasonalProfile({
      ...header,
      months: indices.map((index, k) => ({ month: k + 1, index, min: null, max: null })),
      locale: 'en',
      rangeLabel: 'Range',
      indexTitle: 'Index of monthly totals (average month = 1.0)',
    });
    spec.months.forEach((m, k) => {
      const printed = Number(m.text);
      expect(Math.sign(printed - 1), `${m.label} ${m.text}`).toBe(Math.sign(indices[k]! - 1));
    });
    expect(spec.months.map((m) => m.text).slice(4, 6)).toEqual(['1.002', '0.996']);
    expect(spec.months[7]!.text).toBe('1.07');
    expect(spec.indexTitle).toBe('Index of monthly totals (average month = 1.0)');
  });
});
