// A chart's subtitle says what its metric is in words: with no description, a formula that is still
// an expression ("mean of rate / 100") or names a raw column gives way to the metric's label and
// kind. Open data: vega-datasets unemployment-across-industries.json (BLS monthly unemployment by
// industry, 2000–2010; rates in percent points, so the config divides by 100) and us-employment.csv.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import { definitionOf } from '../../../analysis/sub-questions/registry.js';
import type { Audience, SubQuestion } from '../../../analysis/types.js';
import type { Workspace } from '../../../analysis/workspace.js';
import { presentContext } from '../../../bot/present-answer.js';
import { vegaDataFile } from '../../helpers/open-data.js';
import { memoryWorkspace } from '../templates/trend-memory-db.js';

const literal = (path: string) => `'${path.replaceAll("'", "''")}'`;

const CONFIG = `
version: 1
datasets:
  - name: unemployment
    label: Unemployment by industry (vega-datasets)
    source: { kind: duckdb, path: unused.duckdb }
    table: unemp
    time_column: date
    timezone: UTC
    metrics:
      - { name: rate, label: Unemployment rate, average: rate / 100, unit: percent, decimals: 1, kind: level }
      - { name: count, label: Unemployed, description: 'People unemployed whose last job was in the industry, in thousands', definition: { type: average, column: count }, unit: number, kind: level }
      - { name: rows, label: Readings, definition: { type: count }, unit: count, kind: flow }
    dimensions: []
`;

let ws: Workspace & { source: { close(): Promise<void> } };
beforeAll(async () => {
  ws = await memoryWorkspace([`CREATE TABLE unemp AS SELECT * FROM read_json(${literal(vegaDataFile('unemployment-across-industries.json'))})`], CONFIG);
});
afterAll(async () => {
  await ws?.source.close();
});

async function subtitle(metric: string, audience: Audience): Promise<string> {
  const sq: SubQuestion = { id: metric, kind: 'trend', lens: 'time_pattern', template: 'trend_seasonality', metrics: [metric], grain: 'month', window: { start: '2000-01-01', end: '2010-03-01' }, filters: [] };
  const presented = definitionOf(sq).present(await answerSubQuestion(sq, ws), presentContext(ws, audience));
  return presented.chart!.subtitle;
}

describe('chart subtitles say a metric in words', () => {
  it('a rate set up as an expression reads as its label and kind for managers and leadership; analysts keep the formula', async () => {
    for (const audience of ['managers', 'leadership'] as const) {
      const text = await subtitle('rate', audience);
      expect(text).toMatch(/^Unemployment rate, a reading averaged over each period · /);
      expect(text).not.toMatch(/\/|100|mean of/);
    }
    expect(await subtitle('rate', 'analysts')).toMatch(/rate \/ 100/);
  });

  it('a description wins, and a formula already in words stays', async () => {
    expect(await subtitle('count', 'managers')).toMatch(/^People unemployed whose last job was in the industry, in thousands · /);
    expect(await subtitle('rows', 'managers')).toMatch(/^number of rows · /);
  });
});
