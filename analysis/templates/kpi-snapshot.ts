// Template "kpi_snapshot" (kpi × time_pattern): each metric in the latest complete period of the
// window, against the period before and the same period a year earlier. One query that reads
// only those periods.
import type { Coverage } from '../coverage.js';
import { metricByName } from '../catalog.js';
import { tableRef } from '../compile-context.js';
import type { KpiSnapshotFinding } from '../findings/kpi.js';
import { nextPeriod } from '../periods.js';
import { QueryBuilder } from '../sql/query-builder.js';
import type { Caveat, CompiledQuery, Finding, ResultTable, SubQuestion } from '../types.js';
import type { DatasetConfig } from '../../config/schema.js';
import { baseIsZero, kpiDelta } from './kpi-delta.js';
import { comparisonPeriods, coveredInFull, type KpiCompileContext, latestCandidates, periodsToRead, resolvedLatest } from './kpi-periods.js';
import { EMPTY_TABLE, numberOrNull, periodExpr, periodsScope } from './kpi-sql.js';
import type { Reading, Template } from './template.js';

export function compileKpiSnapshot(sq: SubQuestion, ctx: KpiCompileContext): CompiledQuery {
  const q = new QueryBuilder(ctx.dialect);
  const periods = periodsToRead(latestCandidates(sq.window, sq.grain, ctx.coverage), sq.grain);
  const scope = periodsScope(q, ctx, periods, sq.grain, sq.filters);
  const measures = sq.metrics.map((name) => `  ${scope.measure(metricByName(ctx.dataset, name))} AS ${q.ident(name)}`);
  const period = periodExpr(q, ctx, sq.grain);
  return q.finish(`SELECT ${period} AS period,
${measures.join(',\n')},
  ${ctx.dialect.toDouble(scope.rowCount())} AS row_count
FROM ${tableRef(q, ctx)}
WHERE ${scope.where}
GROUP BY 1
ORDER BY 1`);
}

export const kpiSnapshotTemplate: Template = {
  compile: (sq, ctx) => [{ name: 'snapshot', ...compileKpiSnapshot(sq, ctx) }],
  read: (sq, tables, ctx) => readKpiSnapshot(sq, tables.snapshot ?? EMPTY_TABLE, ctx.dataset, ctx.coverage),
};

export function readKpiSnapshot(sq: SubQuestion, table: ResultTable, dataset: DatasetConfig, coverage: Coverage): Reading {
  const caveats: Caveat[] = [];
  if (table.truncated) caveats.push({ code: 'truncated', data: { rows: table.rows.length } });
  const { latest, partial } = resolvedLatest(sq.window, sq.grain, coverage);
  if (partial) caveats.push({ code: 'partial_period_excluded', data: { ...partial, grain: sq.grain } });
  const byPeriod = new Map(table.rows.map((r) => [String(r.period), r]));
  const latestRow = latest === null ? undefined : byPeriod.get(latest);
  if (latest === null || latestRow === undefined || !(Number(latestRow.row_count) > 0)) {
    const start = latest ?? sq.window.start;
    caveats.push({ code: 'no_data', data: { start, end: latest ? nextPeriod(latest, sq.grain) : sq.window.end } });
    return { findings: [], caveats };
  }
  const { previous, lastYear } = comparisonPeriods(latest, sq.grain);
  // A comparison period the data covers only in part is no fair base: treat it as missing.
  const baseRow = (p: string | null) => (p !== null && coveredInFull(p, sq.grain, coverage) ? byPeriod.get(p) : undefined);
  const findings: Finding[] = [];
  let zeroBase = false;
  for (const name of sq.metrics) {
    const metric = metricByName(dataset, name);
    const value = numberOrNull(latestRow[name]);
    const prev = kpiDelta(value, previous, numberOrNull(baseRow(previous)?.[name]), metric);
    const ly = lastYear === null ? null : kpiDelta(value, lastYear, numberOrNull(baseRow(lastYear)?.[name]), metric);
    zeroBase ||= baseIsZero(prev, value, metric) || baseIsZero(ly, value, metric);
    const finding: KpiSnapshotFinding = {
      type: 'kpi_snapshot',
      metric: name,
      grain: sq.grain,
      period: latest,
      value,
      rows: Number(latestRow.row_count),
      previous: prev,
      lastYear: ly,
    };
    findings.push(finding);
    if (value === null) caveats.push({ code: 'all_null', data: { metric: name } });
  }
  if (zeroBase) caveats.push({ code: 'base_zero', data: {} });
  return { findings, caveats };
}
