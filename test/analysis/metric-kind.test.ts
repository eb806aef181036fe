// Kinds of quantity: a declared kind wins; otherwise sums and counts are flows, ratios, rates and
// averages are ratios. The rule for a level (a reading averaged over time, never summed over it)
// follows the usual stock-versus-flow distinction of national accounts (System of National
// Accounts 2008, ch. 3, recalled from memory: stocks are positions at a point in time, flows are
// amounts over a period).
import { describe, expect, it } from 'vitest';
import { parseConfigText } from '../../config/load.js';
import { metricByName, metricKind } from '../../analysis/catalog.js';

const config = parseConfigText(
  `version: 1
datasets:
  - name: readings
    label: Readings
    source: { kind: csv, paths: [readings.csv] }
    table: readings
    time_column: day
    timezone: UTC
    metrics:
      - { name: total, label: Total, definition: { type: sum, column: v }, unit: number, higher_is_better: true }
      - { name: rows, label: Rows, definition: { type: count }, unit: count, higher_is_better: true }
      - { name: sites, label: Sites, definition: { type: distinct_count, column: site }, unit: count, higher_is_better: true }
      - { name: mean_v, label: Mean, definition: { type: average, column: v }, unit: number, higher_is_better: true }
      - { name: co2, label: CO2, definition: { type: average, column: v }, unit: number, higher_is_better: false, kind: level }
      - { name: per_row, label: Per row, definition: { type: ratio, numerator: total, denominator: rows }, unit: number, higher_is_better: true }
      - { name: hit_rate, label: Hit rate, definition: { type: rate, where: { column: hit, op: is_true } }, unit: percent, higher_is_better: true }
      - { name: balance, label: Balance, definition: { type: sum, column: b }, unit: currency, currency: EUR, higher_is_better: true, kind: level }
`,
  'kinds.yaml',
);
const ds = config.datasets[0]!;
const kind = (name: string) => metricKind(ds, metricByName(ds, name));

describe('metricKind', () => {
  it('infers flows from sums and counts', () => {
    expect([kind('total'), kind('rows'), kind('sites')]).toEqual(['flow', 'flow', 'flow']);
  });
  it('infers ratios from ratios, rates and undeclared averages', () => {
    expect([kind('per_row'), kind('hit_rate'), kind('mean_v')]).toEqual(['ratio', 'ratio', 'ratio']);
  });
  it('keeps a declared level, on an average or a sum', () => {
    expect([kind('co2'), kind('balance')]).toEqual(['level', 'level']);
  });
});
