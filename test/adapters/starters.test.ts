// The local page's starter questions are drawn from the served dataset's catalog: the verb agrees
// with the measure's label ("How have bookings", "How has revenue") and a label written with
// capitals (an acronym such as "CO2") keeps them. On open data (vega-datasets) read through a real
// DuckDB workspace, the starters use the data's own grain and its last whole year: yearly data is
// never asked about month by month.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import type { Coverage } from '../../analysis/coverage.js';
import { startersFor } from '../../adapters/local-channel/starters.js';
import { parseConfigText } from '../../config/load.js';
import { vegaDataFile, writeIowaConfig } from '../helpers/open-data.js';
import { publicFacts } from '../reading/public-data.js';

const daily = (firstDate: string, lastDate: string): Coverage => ({ firstDate, lastDate, rows: 1000, stamps: 'daily' });

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
    const starters = startersFor([{ dataset: ds, coverage: daily('2022-01-01', '2025-06-18') }]);
    expect(starters[0]).toBe('How have bookings moved over time, month by month?');
    expect(starters).toContain('How has revenue moved year by year?');
    expect(starters).toContain('Which booking channel drove the change in bookings in 2024 against 2023?');
  });

  it('keep an acronym in capitals and agree without a year to compare', () => {
    const ds = datasetWith(`      - { name: co2, label: CO2, average: co2, unit: number, kind: level }`, `      - { name: site, label: Site, column: site }`);
    const starters = startersFor([{ dataset: ds, coverage: daily('2020-01-01', '2020-06-01') }]);
    // Five months of daily data: the bot's own default grain for it is weekly.
    expect(starters[0]).toBe('How has CO2 moved over time, week by week?');
    expect(starters).toContain('How does CO2 compare by site?');
  });
});

describe('starter questions on open data', () => {
  const dir = mkdtempSync(join(tmpdir(), 'tc-starters-'));

  it('use years for data stamped once a year, and its last year, which is whole (vega-datasets iowa-electricity.csv)', async () => {
    // US EIA net generation in Iowa by source, one row per source per year, 2001 to 2017 (51 rows),
    // with the catalog `threadcount init` drafts for it (a row count first, then the measure).
    const config = writeIowaConfig(dir);
    const facts = await publicFacts(config);
    expect(facts.coverage).toMatchObject({ firstDate: '2001-01-01', lastDate: '2017-01-01', stamps: 'yearly' });
    const starters = startersFor([{ dataset: facts.dataset, coverage: facts.coverage }]);
    expect(starters[0]).toBe('How has net generation moved over time, year by year?');
    expect(starters).toContain('Which source drove the change in net generation in 2017 against 2016?');
    expect(starters.join(' ')).not.toMatch(/month|revenue|route|SkerryPass/i);
  });

  it('use months for monthly data and the last year it covers whole (vega-datasets stocks.csv)', async () => {
    // Monthly closing prices of five tickers, January 2000 to March 2010: 2010 is partial.
    const config = join(dir, 'stocks.yaml');
    const months = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];
    writeFileSync(config, `version: 1
datasets:
  - name: stocks
    label: Stocks
    source: { kind: csv, paths: [${vegaDataFile('stocks.csv')}] }
    time_column:
      expr: "make_date(cast(substr(date, length(date) - 3, 4) as integer), case substr(date, 1, 3) ${months.map((m, i) => `when '${m}' then ${i + 1}`).join(' ')} end, 1)"
    timezone: UTC
    metrics:
      - { name: price, label: Closing price, average: price, unit: currency, currency: USD, kind: level }
      - { name: quotes, label: Quotes, count: rows, unit: count, kind: flow }
    dimensions:
      - { name: symbol, label: Ticker, column: symbol }
`);
    const facts = await publicFacts(config);
    expect(facts.coverage).toMatchObject({ firstDate: '2000-01-01', lastDate: '2010-03-01', stamps: 'monthly' });
    const starters = startersFor([{ dataset: facts.dataset, coverage: facts.coverage }]);
    expect(starters).toEqual([
      'How has closing price moved over time, month by month?',
      'Which ticker drove the change in closing price in 2009 against 2008?',
      'How have quotes moved year by year?',
      'What can you measure?',
    ]);
  });
});
