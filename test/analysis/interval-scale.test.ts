// A temperature in °C has no true zero, so its change is a difference in degrees, never a percent.
// Checked on vega-datasets' seattle-weather.csv (public daily weather record for Seattle, 2012-2015):
// January 2015's mean daily low against December 2014's. Expected numbers come from the test's own
// SQL over the CSV (read_csv in DuckDB), not from the project's queries.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../analysis/answer-sub-question.js';
import { changesInUnits, metricByName, onIntervalScale } from '../../analysis/catalog.js';
import { kpiSnapshotWords } from '../../analysis/captions/kpi-snapshot-caption.js';
import type { KpiSnapshotFinding } from '../../analysis/findings/kpi.js';
import { formatValue, valueFormatOf } from '../../analysis/format.js';
import type { SubQuestion } from '../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../analysis/workspace.js';
import { SEATTLE_WEATHER_CSV, seattleWeatherConfig } from './stats/seattle-weather.js';

const config = seattleWeatherConfig(`metrics:
  - { name: temp_min, label: Daily low temperature, average: temp_min, unit: number, unit_label: °C, decimals: 1, kind: level }
  - { name: temp_min_ratio, label: Daily low temperature, average: temp_min, unit: number, unit_label: °C, decimals: 1, kind: ratio }
  - { name: precipitation, label: Precipitation, sum: precipitation, unit: number, unit_label: mm }`);

const snapshot = (metric: string): SubQuestion => ({ id: metric, kind: 'kpi', lens: 'time_pattern', template: 'kpi_snapshot', metrics: [metric], grain: 'month', window: { start: '2015-01-01', end: '2015-02-01' }, filters: [] });

describe('a temperature changes in degrees (seattle-weather.csv)', () => {
  let ws: Workspace;
  beforeAll(async () => {
    ws = await openWorkspace(config, 'weather', {}, new Date('2026-12-05T12:00:00Z'));
  }, 120_000);
  afterAll(async () => ws?.source.close());

  it('the catalog says which metrics are on an interval scale', () => {
    expect(onIntervalScale(metricByName(ws.dataset, 'temp_min'))).toBe(true);
    expect(onIntervalScale(metricByName(ws.dataset, 'temp_min_ratio'))).toBe(true);
    expect(changesInUnits(metricByName(ws.dataset, 'temp_min_ratio'))).toBe(true);
    expect(onIntervalScale(metricByName(ws.dataset, 'precipitation'))).toBe(false);
  });

  for (const name of ['temp_min', 'temp_min_ratio']) {
    it(`January 2015 against December 2014 is a difference in °C, not a percent (kind ${name === 'temp_min' ? 'level' : 'ratio'})`, async () => {
      const rows = (await ws.source.run({ sql: `SELECT strftime(date_trunc('month', date), '%Y-%m') AS m, AVG(temp_min) AS v FROM read_csv('${SEATTLE_WEATHER_CSV}') WHERE date >= DATE '2014-12-01' AND date < DATE '2015-02-01' GROUP BY 1 ORDER BY 1`, params: [] }, { maxRows: 10, timeoutMs: 60_000 })).rows;
      const [dec, jan] = rows.map((r) => Number(r.v));
      const metric = metricByName(ws.dataset, name);
      const a = await answerSubQuestion(snapshot(name), ws);
      const f = a.findings.find((x): x is KpiSnapshotFinding => x.type === 'kpi_snapshot');
      expect(f?.value).toBeCloseTo(jan!, 9);
      expect(f?.previous?.absolute).toBeCloseTo(jan! - dec!, 9);
      const words = kpiSnapshotWords(f!, metric, ws.dataset, 'managers', 'en-GB', a.caveats);
      const text = `${words.title} ${words.caption}`;
      expect(text).not.toMatch(/\d%/);
      expect(text).toContain(formatValue(Math.abs(jan! - dec!), valueFormatOf(metric, 'en-GB'), { compact: true }));
    }, 120_000);
  }
});
