// Chart subtitles and footers date the data as often as it is stamped, by the stamp rule the
// thread's text uses (analysis/stamps.ts read, analysis/window-words.ts said). Checked on two open
// series from vega-datasets, read through the real CSV path and the bot's own present context:
// co2-concentration.csv is NOAA's Mauna Loa monthly mean, one row per month stamped on the 1st
// (March 1958 to April 2020, per the file itself, read below); seattle-weather.csv is one row per
// day (1 January 2012 to 31 December 2015, per the file itself).
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseConfigText } from '../../../config/load.js';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { ChartSpec } from '../../../analysis/charts/spec.js';
import { SUB_QUESTIONS, type TemplateName } from '../../../analysis/sub-questions/registry.js';
import type { Grain, SubQuestion } from '../../../analysis/types.js';
import { describeWindow } from '../../../analysis/window-words.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { presentContext } from '../../../bot/present-answer.js';
import { vegaDataFile } from '../../helpers/open-data.js';

/** The first and last date column of a CSV, read as text (the publisher's own stamps). */
function csvSpan(file: string): { first: string; last: string } {
  const lines = readFileSync(vegaDataFile(file), 'utf8').trim().split('\n').slice(1);
  return { first: lines[0]!.slice(0, 10), last: lines[lines.length - 1]!.slice(0, 10) };
}

async function workspaceOf(file: string, timeColumn: string, metric: string): Promise<Workspace> {
  const config = parseConfigText(
    `version: 1
datasets:
  - name: series
    label: Open series
    source: { kind: csv, paths: ["${vegaDataFile(file)}"] }
    time_column: ${timeColumn}
    timezone: UTC
    metrics:
      - ${metric}
`,
    '/virtual/chart-header-stamps.yaml',
  );
  return openWorkspace(config);
}

async function chartOf(ws: Workspace, template: TemplateName, metric: string, grain: Grain, window: SubQuestion['window']): Promise<ChartSpec> {
  const def = SUB_QUESTIONS[template];
  const sq: SubQuestion = { id: 'q', kind: def.kind, lens: def.lens, template, metrics: [metric], grain, window, filters: [] };
  const answer = await answerSubQuestion(sq, ws);
  const spec = def.present(answer, presentContext(ws, 'managers')).chart;
  expect(spec, `${template} draws a chart`).not.toBeNull();
  return spec!;
}

// A date with its day number ("1 Apr 2020"): what monthly data must not claim.
const DAY_DATE = /\b\d{1,2} (?:Jan|Feb|Mar|Apr|May|Jun|Jul|Aug|Sep|Sept|Oct|Nov|Dec)\w* \d{4}\b/;

describe('chart dates follow the data stamps (NOAA Mauna Loa monthly means, vega-datasets)', () => {
  let ws: Workspace;
  const span = csvSpan('co2-concentration.csv');
  beforeAll(async () => {
    ws = await workspaceOf('co2-concentration.csv', 'Date', '{ name: co2, label: CO2, definition: { type: average, column: CO2 }, unit: number, unit_label: ppm, kind: level }');
  });
  afterAll(async () => {
    await ws?.source.close();
  });

  it('the file is what the test assumes: stamped on the 1st, March 1958 to April 2020, read as monthly', () => {
    expect(span).toEqual({ first: '1958-03-01', last: '2020-04-01' });
    expect(ws.coverage.stamps).toBe('monthly');
  });

  for (const template of ['series', 'trend_seasonality', 'trend_test', 'trend_summary', 'growth_series'] as const) {
    it(`${template}: the subtitle says "Mar 1958 to Apr 2020" and the footer "Data as of Apr 2020", never a day`, async () => {
      // The whole history as the card chooses it: to the end of the last stamped month.
      const spec = await chartOf(ws, template, 'co2', 'month', { start: span.first, end: '2020-05-01' });
      expect(spec.subtitle).toContain('Mar 1958 to Apr 2020');
      expect(spec.subtitle).not.toMatch(DAY_DATE);
      expect(spec.footer).toContain('Data as of Apr 2020');
      expect(spec.footer.join(' ')).not.toMatch(DAY_DATE);
    });
  }

  it('says the same months as the brief card (describeWindow), in short form', async () => {
    const window = { start: span.first, end: '2020-05-01' };
    const spec = await chartOf(ws, 'series', 'co2', 'month', window);
    expect(describeWindow(window, ws.coverage, 'en-GB')).toBe('March 1958 to April 2020');
    expect(spec.subtitle).toContain('Mar 1958 to Apr 2020');
  });

  it('a window asked past the data ends with the data\'s last month, not the window\'s', async () => {
    const spec = await chartOf(ws, 'series', 'co2', 'month', { start: '2019-01-01', end: '2021-01-01' });
    expect(spec.subtitle).toContain('Jan 2019 to Apr 2020');
  });
});

describe('chart dates of daily data keep their days (Seattle weather, vega-datasets)', () => {
  let ws: Workspace;
  const span = csvSpan('seattle-weather.csv');
  beforeAll(async () => {
    ws = await workspaceOf('seattle-weather.csv', 'date', '{ name: temp_max, label: Temp max, definition: { type: average, column: temp_max }, unit: number, kind: level }');
  });
  afterAll(async () => {
    await ws?.source.close();
  });

  it('a monthly series of daily data names the days it starts and ends on', async () => {
    expect(span).toEqual({ first: '2012-01-01', last: '2015-12-31' });
    expect(ws.coverage.stamps).toBe('daily');
    const spec = await chartOf(ws, 'series', 'temp_max', 'month', { start: '2012-01-01', end: '2016-01-01' });
    expect(spec.subtitle).toContain('1 Jan 2012 to 31 Dec 2015');
    expect(spec.footer).toContain('Data as of 31 Dec 2015');
  });

  it('a window asked past the data ends on its last day', async () => {
    const spec = await chartOf(ws, 'series', 'temp_max', 'month', { start: '2015-01-01', end: '2016-07-01' });
    expect(spec.subtitle).toContain('1 Jan 2015 to 31 Dec 2015');
  });
});
