// The period table posted as an image reads at a glance: it spans the width it is given and its
// figures are drawn as large as the rows allow, with the unit's name said once in the column
// header, not after every figure. Open data: vega-datasets us-employment.csv (BLS payrolls
// 2006–2015, kept in thousands), two metrics by month.
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import { renderChartWithGeometry } from '../../../analysis/charts/render.js';
import type { PeriodTableSpec } from '../../../analysis/charts/spec.js';
import { definitionOf } from '../../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../../analysis/types.js';
import type { Workspace } from '../../../analysis/workspace.js';
import { presentContext } from '../../../bot/present-answer.js';
import { vegaDataFile } from '../../helpers/open-data.js';
import { memoryWorkspace } from '../templates/trend-memory-db.js';
import { decodePng, type Decoded } from './pixels.js';

const CONFIG = `
version: 1
datasets:
  - name: payrolls
    label: US employment (vega-datasets)
    source: { kind: duckdb, path: unused.duckdb }
    table: emp
    time_column: month
    timezone: UTC
    metrics:
      - { name: retail_trade, label: Retail trade, definition: { type: average, column: retail_trade }, unit: number, unit_label: thousand, kind: level }
      - { name: nonfarm, label: Nonfarm employment, definition: { type: average, column: nonfarm }, unit: number, unit_label: thousand, kind: level }
    dimensions: []
`;

let ws: Workspace & { source: { close(): Promise<void> } };
beforeAll(async () => {
  ws = await memoryWorkspace([`CREATE TABLE emp AS SELECT * FROM read_csv('${vegaDataFile('us-employment.csv').replaceAll("'", "''")}', header = true)`], CONFIG);
});
afterAll(async () => {
  await ws?.source.close();
});

/** Height in pixels of the ink (pixels darker than mid grey) inside a cell: the figures' drawn size. */
function inkHeight(img: Decoded, box: { left: number; top: number; right: number; bottom: number }): number {
  let first = -1;
  let last = -1;
  for (let y = Math.ceil(box.top); y < Math.floor(box.bottom); y++) {
    for (let x = Math.ceil(box.left); x < Math.floor(box.right); x++) {
      const o = (y * img.width + x) * 4;
      if (img.data[o]! + img.data[o + 1]! + img.data[o + 2]! < 3 * 110) {
        if (first < 0) first = y;
        last = y;
        break;
      }
    }
  }
  return first < 0 ? 0 : last - first + 1;
}

describe('the period table image', () => {
  it('fills the width with two metrics and draws its figures large, the unit once per column', async () => {
    const sq: SubQuestion = { id: 't', kind: 'trend', lens: 'time_pattern', template: 'period_table', metrics: ['retail_trade', 'nonfarm'], grain: 'month', window: { start: '2006-01-01', end: '2016-01-01' }, filters: [] };
    const presented = definitionOf(sq).present(await answerSubQuestion(sq, ws), presentContext(ws, 'managers'));
    const spec = presented.chart as PeriodTableSpec;
    expect(spec.kind).toBe('period_table');
    expect(spec.columns.filter((c) => c.role === 'value').map((c) => c.label)).toEqual(['thousand', 'thousand']);
    for (const row of spec.rows) for (const cell of row.cells) expect(cell.text).not.toMatch(/thousand/);
    const { png, geometry } = await renderChartWithGeometry(spec);
    if (process.env['TC_CHART_DIR']) writeFileSync(join(process.env['TC_CHART_DIR'], 'usemp-period-table.png'), png);
    const img = await decodePng(png);
    const tableRight = Math.max(...geometry.cells.map((c) => c.right));
    // The table ends at the right margin (at 97% of the image); with a group capped at 400 px it
    // ended at 79% (both measured on this chart).
    expect(tableRight / geometry.width).toBeGreaterThan(0.95);
    // The figures' ink is at least 11 px tall at 1200×675; it was 8 px (measured) with the font
    // fitted to "14,813 thousand".
    const firstValue = geometry.cells[0]!;
    expect(inkHeight(img, firstValue)).toBeGreaterThanOrEqual(11);
  });
});
