// Config expressions on both engines: the same config over vega-datasets' seattle-weather.csv
// (public daily weather record, 2012–2015), read by DuckDB from the file and by PostgreSQL from a
// table loaded from it. Metrics, a dimension and a comparison group written as expressions are
// computed through the real compile path (computed columns in a CTE, catalog aggregates) and
// checked against the same sums computed here in plain JavaScript from the CSV.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { datasetRelation } from '../../analysis/compile-context.js';
import { metricAggregate } from '../../analysis/sql/metric-sql.js';
import { QueryBuilder } from '../../analysis/sql/query-builder.js';
import { openWorkspace, type Workspace } from '../../analysis/workspace.js';
import type { LoadedConfig } from '../../config/load.js';
import { loadSeattleWeather, loadSeattleWeatherTable, seattleWeatherConfig } from './stats/seattle-weather.js';
import { describeWithPostgres, dropSchema, onPostgres, uniqueName, withClient } from '../helpers/postgres.js';

const config: LoadedConfig = seattleWeatherConfig(`metrics:
  - { name: spread, label: Daily range, average: temp_max - temp_min, unit: number, higher_is_better: true }
  - { name: wet_days, label: Wet days, count: rows, when: "precipitation > 0", unit: count, higher_is_better: false }
  - { name: windy_share, label: Windy share, rate: { when: { column: wind, at_least: 5 } }, unit: percent, higher_is_better: false }
  - { name: rain_cm, label: Rain in cm, sum: "round(precipitation / 10, 2)", unit: number, higher_is_better: false }
dimensions:
  - { name: weekday, label: Weekday, expr: "CASE WHEN isodow(date) <= 5 THEN 'weekday' ELSE 'weekend' END" }
comparison_groups:
  - { name: wet_kind, label: Wet weather, when: { column: weather, one_of: [rain, drizzle] }, members_label: Rain or drizzle, others_label: Other }`);

/** Per weekday/weekend and wet group: each metric, through the catalog's own SQL. */
async function byGroup(ws: Workspace): Promise<Record<string, Record<string, number>>> {
  const ds = ws.dataset;
  const q = new QueryBuilder(ws.source.dialect);
  const rows = datasetRelation(q, ds);
  const m = (name: string) => `${metricAggregate(q, ds, ds.metrics.find((x) => x.name === name)!)} AS ${q.ident(name)}`;
  const dim = q.ident(ds.dimensions[0]!.column);
  const grp = q.ident(ds.comparison_groups[0]!.column);
  const t = await ws.source.run(
    q.finish(`SELECT ${dim} || '/' || CASE WHEN ${grp} THEN 'wet' ELSE 'other' END AS k, ${ds.metrics.map((x) => m(x.name)).join(', ')} FROM ${rows} GROUP BY 1 ORDER BY 1`),
    ws.runOptions,
  );
  return Object.fromEntries(t.rows.map((r) => [String(r.k), Object.fromEntries(ds.metrics.map((x) => [x.name, Number(r[x.name])]))]));
}

/** The same numbers from the CSV in plain JavaScript. */
function expected(): Record<string, Record<string, number>> {
  const out: Record<string, { n: number; spread: number; wet: number; windy: number; rain: number }> = {};
  for (const d of loadSeattleWeather()) {
    const dow = new Date(`${d.date}T00:00:00Z`).getUTCDay();
    const k = `${dow === 0 || dow === 6 ? 'weekend' : 'weekday'}/${d.weather === 'rain' || d.weather === 'drizzle' ? 'wet' : 'other'}`;
    const g = (out[k] ??= { n: 0, spread: 0, wet: 0, windy: 0, rain: 0 });
    g.n++;
    g.spread += d.tempMax - d.tempMin;
    g.wet += d.precipitation > 0 ? 1 : 0;
    g.windy += d.wind >= 5 ? 1 : 0;
    g.rain += Math.round((d.precipitation / 10) * 100) / 100;
  }
  return Object.fromEntries(
    Object.entries(out).map(([k, g]) => [k, { spread: g.spread / g.n, wet_days: g.wet, windy_share: g.windy / g.n, rain_cm: g.rain }]),
  );
}

function expectClose(actual: Record<string, Record<string, number>>, want: Record<string, Record<string, number>>): void {
  expect(Object.keys(actual).sort()).toEqual(Object.keys(want).sort());
  for (const [k, metrics] of Object.entries(want)) for (const [name, v] of Object.entries(metrics)) expect(actual[k]![name]).toBeCloseTo(v, 6);
}

describe('expressions on DuckDB (CSV file)', () => {
  let ws: Workspace;
  beforeAll(async () => {
    ws = await openWorkspace(config);
  });
  afterAll(async () => ws?.source.close());
  it('match the sums computed from the CSV', async () => {
    expectClose(await byGroup(ws), expected());
  });
});

describeWithPostgres('expressions on PostgreSQL (table loaded from the CSV)', (adminUrl) => {
  const schema = uniqueName('tc_expr');
  let ws: Workspace;
  beforeAll(async () => {
    await withClient(adminUrl, (c) => loadSeattleWeatherTable(c, schema));
    ws = await openWorkspace(onPostgres(config, 'TC_EXPR_URL', schema), undefined, { TC_EXPR_URL: adminUrl });
  });
  afterAll(async () => {
    await ws?.source.close();
    await dropSchema(adminUrl, schema);
  });
  it('match the sums computed from the CSV', async () => {
    expectClose(await byGroup(ws), expected());
  });
});
