// Value and period formatting. The exact examples are the project's own format rules (the
// charts brief); they rely on Node's bundled ICU/CLDR data for month names and separators.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { Metric } from '../../config/schema.js';
import { formatChange, formatPeriod, formatValue, significant, valueFormatOf, type ValueFormat } from '../../analysis/format.js';
import { GRAINS } from '../../analysis/types.js';

const eur: ValueFormat = { unit: 'currency', currency: 'EUR', locale: 'en-IE' };
const MINUS = '\u2212';

describe('formatValue', () => {
  it('formats currency compactly to about three significant figures', () => {
    expect(formatValue(1_934_567.12, eur, { compact: true })).toBe('€1.93M');
    expect(formatValue(612_400, eur, { compact: true })).toBe('€612K');
    expect(formatValue(23.456, eur, { compact: true })).toBe('€23.5');
  });

  it('formats currency in full: cents on small amounts, none on large ones', () => {
    expect(formatValue(23.456, eur)).toBe('€23.46');
    expect(formatValue(1_934_567.12, eur)).toBe('€1,934,567');
    expect(formatValue(1_934_567.12, { ...eur, decimals: 2 })).toBe('€1,934,567.12');
  });

  it('treats percent values as fractions', () => {
    expect(formatValue(0.0412, { unit: 'percent', locale: 'en-IE' })).toBe('4.1%');
    expect(formatValue(0.0412, { unit: 'percent', decimals: 2, locale: 'en-IE' })).toBe('4.12%');
  });

  it('formats counts and plain numbers', () => {
    expect(formatValue(193_456, { unit: 'count', locale: 'en-IE' })).toBe('193,456');
    expect(formatValue(193_456, { unit: 'count', locale: 'en-IE' }, { compact: true })).toBe('193K');
    expect(formatValue(2.456, { unit: 'number', locale: 'en-IE' })).toBe('2.46');
  });

  it('signs with a typographic minus and never shows "-0"', () => {
    expect(formatValue(-612.4, eur, { signed: true })).toBe(`${MINUS}€612.40`);
    expect(formatValue(12_345, eur, { compact: true, signed: true })).toBe('+€12.3K');
    expect(formatValue(-0.001, { unit: 'count', locale: 'en-IE' })).toBe('0');
    expect(formatValue(-0, eur, { signed: true })).toBe('€0.00');
  });

  it('writes n/a for null and non-finite values', () => {
    for (const v of [null, Number.NaN, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY]) {
      expect(formatValue(v, eur)).toBe('n/a');
    }
  });

  it('falls back gracefully on a bad locale or currency code', () => {
    expect(formatValue(5, { unit: 'currency', currency: '1$x', locale: 'en-IE' })).toBe('5.00');
    expect(formatValue(1500, { ...eur, locale: 'not a locale!' }, { compact: true })).toBe('€1.5K');
  });
});

describe('decimals and the unit label', () => {
  const ppm: ValueFormat = { unit: 'number', decimals: 1, label: 'ppm', locale: 'en-IE' };
  it('keeps a metric’s decimals in the compact form below a thousand, and the magnitude suffix above', () => {
    expect(formatValue(355.234, ppm, { compact: true })).toBe('355.2\u00a0ppm');
    expect(formatValue(38.3, { ...eur, decimals: 2 }, { compact: true })).toBe('€38.30');
    expect(formatValue(1_934_567, { ...eur, decimals: 2 }, { compact: true })).toBe('€1.93M');
    // A value the decimals would round to nothing keeps its significant figures.
    expect(formatValue(0.13, { ...ppm, decimals: 0 }, { compact: true })).toBe('0.13\u00a0ppm');
  });
  it('writes the label after counts and numbers, signed or not, and never after currency or percent', () => {
    expect(formatValue(-2.46, ppm, { compact: true, signed: true })).toBe(`${MINUS}2.5\u00a0ppm`);
    expect(formatValue(2.46, ppm, { signed: true })).toBe('+2.5\u00a0ppm');
    expect(formatValue(3, { unit: 'percent', label: 'ppm', locale: 'en-IE' })).toBe('300.0%');
  });
});

describe('valueFormatOf', () => {
  it('takes unit, currency and decimals from the metric', () => {
    const metric: Metric = {
      name: 'revenue',
      label: 'Revenue',
      synonyms: [],
      definition: { type: 'sum', column: 'fare_total' },
      unit: 'currency',
      currency: 'EUR',
      decimals: 0,
      higher_is_better: true,
    };
    expect(valueFormatOf(metric, 'en-IE')).toEqual({ unit: 'currency', currency: 'EUR', decimals: 0, locale: 'en-IE' });
    const { currency: _c, decimals: _d, ...bare } = metric;
    expect(valueFormatOf({ ...bare, unit: 'count' }, 'en-IE')).toEqual({ unit: 'count', locale: 'en-IE' });
  });
});

describe('formatChange', () => {
  it('writes signed percentages with one decimal', () => {
    expect(formatChange(0.081, 'en-IE')).toBe('+8.1%');
    expect(formatChange(-0.05, 'en-IE')).toBe(`${MINUS}5.0%`);
    expect(formatChange(0, 'en-IE')).toBe('0.0%');
    expect(formatChange(-0.00001, 'en-IE')).toBe('0.0%');
    expect(formatChange(12.5, 'en-IE')).toBe('+1,250%');
    expect(formatChange(null, 'en-IE')).toBe('n/a');
    expect(formatChange(Number.NaN, 'en-IE')).toBe('n/a');
  });
});

describe('formatPeriod', () => {
  it('writes each grain as a manager would', () => {
    expect(formatPeriod('2024-08-01', 'month', 'en-IE')).toBe('Aug 2024');
    expect(formatPeriod('2024-08-01', 'month', 'en-IE', 'long')).toBe('August 2024');
    expect(formatPeriod('2024-07-01', 'quarter', 'en-IE')).toBe('Q3 2024');
    expect(formatPeriod('2024-08-05', 'week', 'en-IE')).toBe('w/c 5 Aug 2024');
    expect(formatPeriod('2024-01-01', 'year', 'en-IE')).toBe('2024');
    expect(formatPeriod('2024-08-05', 'day', 'en-IE')).toBe('5 Aug 2024');
    expect(formatPeriod('2024-08-05', 'day', 'en-US')).toBe('Aug 5, 2024');
  });

  it('reads the date as a calendar date whatever the process time zone', () => {
    const saved = process.env['TZ'];
    try {
      for (const tz of ['America/Los_Angeles', 'Pacific/Kiritimati', 'Europe/Dublin']) {
        process.env['TZ'] = tz;
        expect(formatPeriod('2024-08-01', 'month', 'en-IE')).toBe('Aug 2024');
        expect(formatPeriod('2024-01-01', 'year', 'en-IE')).toBe('2024');
        expect(formatPeriod('2024-08-05', 'day', 'en-IE')).toBe('5 Aug 2024');
      }
    } finally {
      if (saved === undefined) delete process.env['TZ'];
      else process.env['TZ'] = saved;
    }
  });

  it('tolerates a timestamp suffix but never echoes it, and rejects non-dates', () => {
    expect(formatPeriod('2024-08-01T00:00:00.000Z', 'month', 'en-IE')).toBe('Aug 2024');
    expect(formatPeriod('2024-02-30', 'day', 'en-IE')).toBe('n/a');
    expect(formatPeriod('yesterday', 'day', 'en-IE')).toBe('n/a');
  });
});

describe('significant', () => {
  it('rounds to significant figures', () => {
    expect(significant(1_234_567)).toBe(1_230_000);
    expect(significant(0.000123456)).toBe(0.000123);
    expect(significant(-98.765, 2)).toBe(-99);
    expect(significant(0)).toBe(0);
    expect(Object.is(significant(-0), 0)).toBe(true);
    expect(significant(Number.POSITIVE_INFINITY)).toBe(Number.POSITIVE_INFINITY);
  });
});

// Output a reader must never see: broken numbers, leaked JS values, raw ISO dates or timestamps.
const FORBIDDEN = /NaN|Infinity|undefined|null|\d{4}-\d{2}-\d{2}|T\d{2}:\d{2}/;
const locales = fc.constantFrom('en-IE', 'en-US', 'en-GB', 'de-DE', 'fr-FR', 'sv-SE', 'ja-JP', 'ar-EG', 'xx-bogus', '');
const numbers = fc.oneof(
  fc.double(),
  fc.double({ min: -1e7, max: 1e7 }),
  fc.integer().map(Number),
  fc.constantFrom(0, -0, Number.NaN, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY, Number.MAX_VALUE, Number.MIN_VALUE),
);
const formats = fc.record(
  {
    unit: fc.constantFrom('currency', 'count', 'percent', 'number' as const),
    currency: fc.constantFrom('EUR', 'USD', 'GBP', 'JPY', 'XYZ', '12$'),
    decimals: fc.integer({ min: -2, max: 9 }),
    locale: locales,
  },
  { requiredKeys: ['unit', 'locale'] },
) as fc.Arbitrary<ValueFormat>;

describe('fuzz: formatters never leak broken values', () => {
  it('formatValue', () => {
    fc.assert(
      fc.property(fc.option(numbers), formats, fc.boolean(), fc.boolean(), (v, fmt, compact, signed) => {
        const out = formatValue(v, fmt, { compact, signed });
        expect(out).not.toMatch(FORBIDDEN);
        expect(out.length).toBeGreaterThan(0);
      }),
      { numRuns: 2000 },
    );
  });

  it('formatChange', () => {
    fc.assert(
      fc.property(fc.option(numbers), locales, (v, locale) => {
        const out = formatChange(v, locale);
        expect(out).not.toMatch(FORBIDDEN);
        if (v !== null && Number.isFinite(v) && v > 0.0005) expect(out).toMatch(/^\+|^\u061c?\+/);
      }),
      { numRuns: 2000 },
    );
  });

  it('formatPeriod', () => {
    const iso = fc
      .tuple(fc.integer({ min: 0, max: 9999 }), fc.integer({ min: 0, max: 13 }), fc.integer({ min: 0, max: 32 }), fc.constantFrom('', 'T00:00:00Z', 'T23:59:59.999+02:00', ' 12:00'))
      .map(([y, m, d, suffix]) => `${String(y).padStart(4, '0')}-${String(m).padStart(2, '0')}-${String(d).padStart(2, '0')}${suffix}`);
    fc.assert(
      fc.property(fc.oneof(iso, fc.string()), fc.constantFrom(...GRAINS), locales, fc.constantFrom('short', 'long' as const), (p, grain, locale, style) => {
        const out = formatPeriod(p, grain, locale, style);
        expect(out).not.toMatch(FORBIDDEN);
        expect(out.length).toBeGreaterThan(0);
      }),
      { numRuns: 3000 },
    );
  });
});

// One significant-figures rule for readings and rates, checked against ECMA-262's
// Number.prototype.toPrecision(3) (trailing zeros kept) below 100 and Math.round from 100.
describe('three significant figures for plain numbers and rates', () => {
  const ppm: ValueFormat = { unit: 'number', label: 'ppm', locale: 'en' };
  // Two figures below 0.1: a third is past any metric's precision there ("−0.0228 min" was seen in a caption).
  const reference = (x: number) => (Math.abs(x) >= 100 ? Math.round(x).toLocaleString('en') : x.toPrecision(Math.abs(x) < 0.1 ? 2 : 3)).replace('-', MINUS);
  it('prints a reading the same in full and compact below 1,000, trailing zeros kept: "+2.00 ppm" beside "+2.91 ppm"', () => {
    // Mauna Loa annual means (vega-datasets co2-concentration.csv): 2018 − 2017 = 408.5875 − 406.5842.
    const change2018 = 408.5875 - 406.58417;
    expect(formatValue(change2018, ppm, { compact: true, signed: true })).toBe('+2.00\u00a0ppm');
    expect(formatValue(change2018, ppm, { signed: true })).toBe('+2.00\u00a0ppm');
    expect(formatValue(2.91, ppm, { compact: true, signed: true })).toBe('+2.91\u00a0ppm');
    expect(formatValue(1.6, ppm, { compact: true })).toBe('1.60\u00a0ppm');
  });
  it('agrees with toPrecision(3) for any number below 100 (toPrecision(2) below 0.1) and whole units from 100', () => {
    fc.assert(
      fc.property(fc.double({ min: -99_999, max: 99_999, noNaN: true }).filter((x) => Math.abs(x) >= 1e-6 && Math.abs(Number(x.toPrecision(3))) < 100 === Math.abs(x) < 100), (x) => {
        expect(formatValue(x, { unit: 'number', locale: 'en' })).toBe(reference(x));
        expect(formatValue(x, { unit: 'count', locale: 'en' }, { rate: true })).toBe(reference(x));
      }),
    );
  });
  it('a format marked as a rate uses the rule wherever it is printed, and a count stays whole', () => {
    expect(formatValue(0.0417, { unit: 'number', rate: true, locale: 'en' })).toBe('0.042');
    expect(formatValue(0.417, { unit: 'number', rate: true, locale: 'en' })).toBe('0.417');
    expect(formatValue(-0.0228, { unit: 'number', label: 'min', locale: 'en' }, { compact: true })).toBe(`${MINUS}0.023\u00a0min`);
    expect(formatValue(1.4, { unit: 'count', locale: 'en' })).toBe('1');
    // A metric's own decimals still win.
    expect(formatValue(0.0417, { unit: 'number', rate: true, decimals: 2, locale: 'en' })).toBe('0.04');
  });
});
