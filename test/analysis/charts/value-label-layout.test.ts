// Value labels on real seasonality charts never overlap, never leave the plot and are never cut
// short, checked on the rendered image: the boxes come from chart.js's element positions (the
// geometry the renderer returns) and the ink inside each box is read back from the PNG. Open data:
// vega-datasets us-employment.csv (BLS payrolls 2006–2015, in thousands: additive deviations, the
// chart where "−30.4 thousand" was cut by its neighbour) and seattle-weather.csv (NOAA Seattle
// 2012–2015: a flow's and a level's seasonal index).
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { createCanvas } from '@napi-rs/canvas';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { ChartGeometry, PlacedMark } from '../../../analysis/charts/geometry.js';
import { renderChartWithGeometry } from '../../../analysis/charts/render.js';
import type { SeasonalProfileSpec } from '../../../analysis/charts/spec.js';
import { font, INK } from '../../../analysis/charts/theme.js';
import { boxesOverlap, boxInside, inflate } from '../../../analysis/charts/placement.js';
import { definitionOf } from '../../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../../analysis/types.js';
import type { Workspace } from '../../../analysis/workspace.js';
import { presentContext } from '../../../bot/present-answer.js';
import { vegaDataFile } from '../../helpers/open-data.js';
import { memoryWorkspace } from '../templates/trend-memory-db.js';
import { countDark, decodePng, type Decoded } from './pixels.js';

const literal = (path: string) => `'${path.replaceAll("'", "''")}'`;

const PAYROLLS = `
version: 1
datasets:
  - name: payrolls
    label: US employment (vega-datasets)
    source: { kind: duckdb, path: unused.duckdb }
    table: emp
    time_column: month
    timezone: UTC
    metrics:
      - { name: nonfarm, label: Nonfarm employment, definition: { type: average, column: nonfarm }, unit: number, unit_label: thousand, kind: level }
      - { name: retail_trade, label: Retail trade, definition: { type: average, column: retail_trade }, unit: number, unit_label: thousand, kind: level }
      - { name: construction, label: Construction, definition: { type: average, column: construction }, unit: number, unit_label: thousand, kind: level }
    dimensions: []
`;

const WEATHER = `
version: 1
datasets:
  - name: seattle
    label: Seattle weather (vega-datasets)
    source: { kind: duckdb, path: unused.duckdb }
    table: weather
    time_column: date
    timezone: America/Los_Angeles
    metrics:
      - { name: temp_max, label: Daily maximum temperature, definition: { type: average, column: temp_max }, unit: number, decimals: 1 }
      - { name: precipitation, label: Precipitation, definition: { type: sum, column: precipitation }, unit: number }
    dimensions: []
`;

type Ws = Workspace & { source: { close(): Promise<void> } };
let payrolls: Ws;
let weather: Ws;

beforeAll(async () => {
  payrolls = await memoryWorkspace([`CREATE TABLE emp AS SELECT * FROM read_csv(${literal(vegaDataFile('us-employment.csv'))}, header = true)`], PAYROLLS);
  weather = await memoryWorkspace([`CREATE TABLE weather AS SELECT * FROM read_csv(${literal(vegaDataFile('seattle-weather.csv'))}, header = true)`], WEATHER);
});
afterAll(async () => {
  await payrolls?.source.close();
  await weather?.source.close();
});

async function seasonalChart(ws: Workspace, metric: string, window: { start: string; end: string }): Promise<SeasonalProfileSpec> {
  const sq: SubQuestion = { id: metric, kind: 'trend', lens: 'time_pattern', template: 'trend_seasonality', metrics: [metric], grain: 'month', window, filters: [] };
  const answer = await answerSubQuestion(sq, ws);
  const presented = definitionOf(sq).present(answer, presentContext(ws, 'managers'));
  expect(presented.chart?.kind).toBe('seasonal_profile');
  return presented.chart as SeasonalProfileSpec;
}

/**
 * Dark pixels of a label drawn alone on white, at its font size and at the same sub-pixel offset
 * as on the chart (drawn as the renderer draws it: left edge and top of its box), so anti-aliasing
 * matches: what its box holds when nothing covers it.
 */
function inkAlone(label: PlacedMark): number {
  const box = label.box!;
  const w = Math.ceil(box.right - box.left) + 20;
  const h = Math.ceil(box.bottom - box.top) + 20;
  const canvas = createCanvas(w, h);
  const ctx = canvas.getContext('2d');
  ctx.fillStyle = '#ffffff';
  ctx.fillRect(0, 0, w, h);
  ctx.font = font(label.fontSize!, true);
  ctx.fillStyle = INK.title;
  const left = 10 + (box.left - Math.floor(box.left));
  const top = 10 + (box.top - Math.floor(box.top));
  ctx.fillText(label.text!, left, top + ctx.measureText(label.text!).actualBoundingBoxAscent);
  const { data } = ctx.getImageData(0, 0, w, h);
  return countDark({ width: w, height: h, data }, { left: 0, top: 0, right: w, bottom: h });
}

/** The rules every chart's value labels keep; returns the labels for further checks. */
function expectLabelsClear(img: Decoded, geometry: ChartGeometry): PlacedMark[] {
  const labels = geometry.marks.filter((m) => m.role === 'value-label');
  for (const [i, a] of labels.entries()) {
    expect(boxInside(a.box!, geometry.plot), `${a.text} inside the plot`).toBe(true);
    for (const b of labels.slice(i + 1)) expect(boxesOverlap(a.box!, b.box!), `${a.text} against ${b.text}`).toBe(false);
    // Nothing drawn later (a neighbour's backing) has wiped part of the text: its box holds about
    // the ink the text leaves alone (whisker strokes under it only add ink; anti-aliasing over a
    // tinted bar takes a little away). A cut label such as "−30.4 thou" lost a third.
    const alone = inkAlone(a);
    expect(countDark(img, inflate(a.box!, 1)), `ink of ${a.text}`).toBeGreaterThanOrEqual(Math.floor(alone * 0.9));
    expect(a.text).not.toMatch(/…/);
  }
  return labels;
}

async function rendered(spec: SeasonalProfileSpec) {
  const { png, geometry } = await renderChartWithGeometry(spec);
  if (process.env['TC_CHART_DIR']) writeFileSync(join(process.env['TC_CHART_DIR'], `${spec.chip}-${spec.width}.png`), png);
  return { img: await decodePng(png), geometry };
}

const DECADE = { start: '2006-01-01', end: '2016-01-01' };

describe('value labels on seasonal profiles of open data', () => {
  it('payroll deviations in thousands: twelve labels at full size, none overlapping, the unit once in the axis title', async () => {
    for (const metric of ['nonfarm', 'retail_trade', 'construction']) {
      const spec = await seasonalChart(payrolls, metric, DECADE);
      expect(spec.units?.axisTitle).toBe('Difference from the yearly mean (thousand)');
      const { img, geometry } = await rendered(spec);
      const labels = expectLabelsClear(img, geometry);
      // At the chart's own size every month keeps its label, at the full 13 px.
      expect(labels.map((l) => l.text)).toEqual(spec.months.map((m) => m.text));
      expect(new Set(labels.map((l) => l.fontSize))).toEqual(new Set([13]));
      for (const l of labels) expect(l.text).not.toMatch(/thousand/);
      // The reference line is named in the legend, so no label of its own sits on December's.
      expect(spec.legend.reference).toBe('Yearly mean');
    }
  });

  it('labels too long for their months (the unit written out on each) shrink, then the least telling go; the highest and lowest stay', async () => {
    const real = await seasonalChart(payrolls, 'nonfarm', DECADE);
    // The long form the chart used to print: "−30.4 thousand" beside "−17.9 thousand".
    const long = { ...real, months: real.months.map((m) => ({ ...m, text: `${m.text}\u00a0thousand` })) };
    for (const spec of [long, { ...long, width: 900, height: 600 }]) {
      const { img, geometry } = await rendered(spec);
      const labels = expectLabelsClear(img, geometry);
      const values = spec.months.map((m) => m.index!);
      const kept = new Set(labels.map((l) => l.text));
      expect(kept.has(spec.months[values.indexOf(Math.max(...values))]!.text)).toBe(true);
      expect(kept.has(spec.months[values.indexOf(Math.min(...values))]!.text)).toBe(true);
      expect(labels.length).toBeGreaterThanOrEqual(6);
    }
  });

  it('Seattle: a flow is busier or quieter than an average month, a temperature above or below its yearly mean; labels clear at two sizes', async () => {
    const window = { start: '2012-01-01', end: '2016-01-01' };
    const rain = await seasonalChart(weather, 'precipitation', window);
    const heat = await seasonalChart(weather, 'temp_max', window);
    expect(rain.legend.above).toBe('Busier than an average month');
    // Seattle's daily high goes below 0 °C on some days (the file's own minimum), so the
    // temperature swings in degrees around its yearly mean, not as a ratio to it.
    expect(heat.legend).toMatchObject({ above: 'Above the yearly mean', below: 'Below' });
    for (const spec of [rain, heat, { ...heat, width: 640, height: 420 }]) {
      const { img, geometry } = await rendered(spec);
      const labels = expectLabelsClear(img, geometry);
      expect(labels.length).toBeGreaterThanOrEqual(2);
    }
  });
});
