// The local page's starter questions are drawn from the served dataset's catalog: the verb agrees
// with the measure's label ("How have bookings", "How has revenue") and a label written with
// capitals (an acronym such as "CO2") keeps them.
import { describe, expect, it } from 'vitest';
import { startersFor } from '../../adapters/local-channel/starters.js';
import { parseConfigText } from '../../config/load.js';

function datasetWith(metrics: string, dimensions = ''): Parameters<typeof startersFor>[0][number]['dataset'] {
  const config = parseConfigText(`version: 1
datasets:
  - name: d
    label: D
    source: { kind: csv, path: d.csv }
    time_column: day
    timezone: UTC
    metrics:
${metrics}
    dimensions:
${dimensions || '      []'}
`, 'starters.yaml');
  return config.datasets[0]!;
}

describe('starter questions', () => {
  it('agree with a plural measure and a singular one', () => {
    const ds = datasetWith(`      - { name: bookings, label: Bookings, count: rows, unit: count }
      - { name: revenue, label: Revenue, sum: amount, unit: currency, currency: EUR }`, `      - { name: channel, label: Booking channel, column: channel }`);
    const starters = startersFor([{ dataset: ds, firstDate: '2022-01-01', lastDate: '2025-06-18' }]);
    expect(starters[0]).toBe('How have bookings moved over time, month by month?');
    expect(starters).toContain('How has revenue moved year by year?');
    expect(starters).toContain('Which booking channel drove the change in bookings in 2024 against 2023?');
  });

  it('keep an acronym in capitals and agree without a year to compare', () => {
    const ds = datasetWith(`      - { name: co2, label: CO2, average: co2, unit: number, kind: level }`, `      - { name: site, label: Site, column: site }`);
    const starters = startersFor([{ dataset: ds, firstDate: '2020-01-01', lastDate: '2020-06-01' }]);
    expect(starters[0]).toBe('How has CO2 moved over time, month by month?');
    expect(starters).toContain('How does CO2 compare by site?');
  });
});
