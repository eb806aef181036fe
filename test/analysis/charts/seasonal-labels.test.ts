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
      flow: true,
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

  it('word the legend by the metric kind: a flow is busier or quieter, a basket or a rate higher or lower', () => {
    const months = [{ month: 1, index: 1.002, min: null, max: null }];
    const flow = buildSeasonalProfile({ ...header, months, locale: 'en', rangeLabel: 'Range', flow: true });
    const basket = buildSeasonalProfile({ ...header, months, locale: 'en', rangeLabel: 'Range', flow: false });
    expect(flow.legend).toMatchObject({ above: 'Busier than an average month', below: 'Quieter' });
    expect(basket.legend).toMatchObject({ above: 'Higher than an average month', below: 'Lower' });
    expect(`${basket.legend.above} ${basket.legend.below}`).not.toMatch(/busier|quieter/i);
  });

  it('print a deviation in thousands without the unit on every bar: the axis title says it once', () => {
    // BLS payroll deviations are kept in thousands (vega-datasets us-employment.csv).
    const spec = buildSeasonalProfile({
      ...header,
      months: [{ month: 2, index: -30.4, min: -420, max: 260 }, { month: 5, index: 1234.5, min: 0, max: 2000 }],
      locale: 'en',
      rangeLabel: 'Range',
      flow: false,
      deviationFormat: { unit: 'number', label: 'thousand', locale: 'en' },
    });
    expect(spec.months[1]!.text).toBe('\u221230.4');
    // Whole figures, never a compact suffix stacked on the magnitude ("+1.23K" thousand).
    expect(spec.months[4]!.text).toBe('+1,235');
    expect(spec.units?.axisTitle).toBe('Difference from the yearly mean (thousand)');
    expect(spec.legend.reference).toBe('Yearly mean');
  });
});
