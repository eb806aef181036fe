// The compared quantity of a count (per row, per day, per unit and day) is a rate and keeps its
// meaning however small: three significant figures, two below 0.1 (analysis/format.ts: "0.042 a
// day", not "0.0417"), with ECMA-262 Number.prototype.toPrecision as the reference, never a fixed
// decimal that prints "0.0 a day". Its chart labels use the same format.
import { describe, expect, it } from 'vitest';
import type { Metric } from '../../../config/schema.js';
import { quantityFormat } from '../../../analysis/captions/performance-words.js';
import { formatValue } from '../../../analysis/format.js';

const strikes = { name: 'strikes', label: 'Strikes', definition: { type: 'count' }, unit: 'count', higher_is_better: false } as unknown as Metric;

describe('quantityFormat', () => {
  it('prints a count per day, per row and per unit-day by three significant figures (two below 0.1)', () => {
    const sig = (x: number) => x.toPrecision(Math.abs(x) < 0.1 ? 2 : 3);
    for (const quantity of ['per_day', 'per_row', 'per_unit_day'] as const) {
      const fmt = quantityFormat(strikes, quantity, 'en');
      for (const x of [0.0417, 0.5, 1.4, 12.345]) expect(formatValue(x, fmt)).toBe(sig(x));
      // Chart labels are compact: the same figure below 100.
      for (const x of [0.0417, 1.4, 12.345]) expect(formatValue(x, fmt, { compact: true })).toBe(sig(x));
      expect(formatValue(11_999.4, fmt)).toBe('11,999');
    }
  });
  it('keeps a count as a whole count when it is the metric itself, and decimals the metric sets above 0', () => {
    expect(formatValue(12.4, quantityFormat(strikes, 'metric', 'en'))).toBe('12');
    expect(formatValue(0.0417, quantityFormat({ ...strikes, decimals: 0 } as Metric, 'per_day', 'en'))).toBe('0.042');
    expect(formatValue(0.0417, quantityFormat({ ...strikes, decimals: 3 } as Metric, 'per_day', 'en'))).toBe('0.042');
  });
});
