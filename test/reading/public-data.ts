// Two public datasets the reader was never tuned to, from the vega-datasets package: stocks.csv
// (monthly prices of five tickers, January 2000 to March 2010) and
// unemployment-across-industries.json (US BLS monthly unemployed counts and rates for 14
// industries, January 2000 to February 2010). The configs are the ones `threadcount init` drafts
// for them, lightly edited as a newcomer would (labels, a few other names, an expression that reads
// the stocks' "Jan 1 2000" dates). Briefs are read through `threadcount read`'s own path (real DuckDB).
import { mkdtempSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { readBrief } from '../../cli/read.js';
import { closeWorkspaces, openWorkspaces } from '../../cli/workspaces.js';
import { datasetFacts } from '../../analysis/workspace.js';
import { loadConfig } from '../../config/load.js';
import { readSecrets } from '../../config/environment.js';
import type { BriefJson } from '../../bot/reading/brief-json.js';
import type { DatasetFacts } from '../../bot/reading/read-request.js';

const data = join(dirname(dirname(createRequire(import.meta.url).resolve('vega-datasets'))), 'data');

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

const stocks = `version: 1
datasets:
  - name: stocks
    label: Stocks
    source:
      kind: csv
      paths:
        - ${join(data, 'stocks.csv')}
    time_column:
      expr: "make_date(cast(substr(date, length(date) - 3, 4) as integer), case substr(date, 1, 3) ${MONTHS.map((m, i) => `when '${m}' then ${i + 1}`).join(' ')} end, 1)"
    timezone: UTC
    metrics:
      - name: rows
        label: Rows
        count: rows
        unit: count
        higher_is_better: true
        kind: flow
      - name: price
        label: Share price
        also_called: [stock price, share price, closing price, prices]
        average: price
        unit: currency
        currency: USD
        decimals: 2
        higher_is_better: true
        kind: level
    dimensions:
      - name: symbol
        label: Company
        also_called: [ticker, stock, company, companies]
        column: symbol
`;

const unemployment = `version: 1
datasets:
  - name: unemployment_across_industries
    label: Unemployment across industries
    source:
      kind: json
      paths:
        - ${join(data, 'unemployment-across-industries.json')}
    time_column: date
    timezone: UTC
    metrics:
      - name: rows
        label: Rows
        count: rows
        unit: count
        higher_is_better: true
        kind: flow
      - name: count
        label: Unemployed (thousands)
        also_called: [unemployed, jobless, unemployment]
        sum: count
        unit: number
        higher_is_better: true
        kind: flow
      - name: rate
        label: Unemployment rate
        also_called: [unemployment rate, jobless rate]
        average: rate
        unit: percent
        higher_is_better: true
        kind: level
    dimensions:
      - name: series
        label: Industry
        also_called: [industry, industries, sector, sectors]
        column: series
`;

const dir = mkdtempSync(join(tmpdir(), 'tc-public-'));
export const STOCKS_CONFIG = join(dir, 'stocks.yaml');
export const UNEMPLOYMENT_CONFIG = join(dir, 'unemployment.yaml');
writeFileSync(STOCKS_CONFIG, stocks);
writeFileSync(UNEMPLOYMENT_CONFIG, unemployment);

// Read long after both datasets end, as a newcomer would today.
export const NOW = new Date('2026-12-05T01:00:00Z');

export const readStocks = (text: string): Promise<BriefJson> => readBrief({ configFile: STOCKS_CONFIG, text, now: NOW });
export const readUnemployment = (text: string): Promise<BriefJson> => readBrief({ configFile: UNEMPLOYMENT_CONFIG, text, now: NOW });

/** What the reader knows of one of the two datasets (its coverage and values, from the data), for the bot's own steps. */
export async function publicFacts(configFile: string): Promise<DatasetFacts> {
  const config = loadConfig(configFile);
  const workspaces = await openWorkspaces(config, readSecrets(config));
  try {
    return datasetFacts([...workspaces.values()][0]!);
  } finally {
    await closeWorkspaces(workspaces);
  }
}
