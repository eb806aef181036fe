// Data quality for one run: one query over the columns the plan uses, then each answer gets
// the caveats for the columns it used.
import { dimensionByName, metricByName, metricColumns } from '../catalog.js';
import type { Caveat, SubQuestion } from '../types.js';
import type { Workspace } from '../workspace.js';
import { compileQualityChecks, readQuality, type QualityReport } from './quality-checks.js';
import { qualityCaveats } from './quality-caveats.js';

// Data older than this is flagged as stale (common practice for monthly reporting).
const STALE_AFTER_DAYS = 35;

export function columnsUsed(sq: SubQuestion, ws: Workspace): string[] {
  const ds = ws.dataset;
  const cols = new Set<string>([ds.time_column]);
  for (const m of sq.metrics) for (const c of metricColumns(ds, metricByName(ds, m))) cols.add(c);
  if (sq.dimension) cols.add(dimensionByName(ds, sq.dimension).column);
  for (const f of sq.filters) cols.add(dimensionByName(ds, f.dimension).column);
  const group = ds.comparison_groups.find((g) => g.name === sq.comparisonGroup);
  if (group) {
    cols.add(group.column);
    if (group.unit_column) cols.add(group.unit_column);
  }
  return [...cols];
}

export async function checkQuality(items: SubQuestion[], ws: Workspace): Promise<QualityReport> {
  const columns = [...new Set(items.flatMap((sq) => columnsUsed(sq, ws)))];
  const tables: Record<string, Awaited<ReturnType<Workspace['source']['run']>>> = {};
  for (const q of compileQualityChecks(ws.context, columns)) tables[q.name] = await ws.source.run(q, ws.runOptions);
  return readQuality(tables, { dataset: ws.dataset });
}

export function qualityCaveatsFor(sq: SubQuestion, report: QualityReport, ws: Workspace, now: Date): Caveat[] {
  return qualityCaveats(report, columnsUsed(sq, ws), { now, staleAfterDays: STALE_AFTER_DAYS });
}
