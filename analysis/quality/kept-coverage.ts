// The dataset's coverage (first and last day, rows), kept per version of the data like the
// quality report (quality-cache.ts), so opening a dataset whose data has not changed reads no rows.
import type { CompileContext } from '../compile-context.js';
import { compileCoverage, compileSigns, type Coverage, coverageAsOf, readDataCoverage } from '../coverage.js';
import type { Workspace } from '../workspace.js';
import { dataVersion } from './data-version.js';
import { coverageCacheFile, entryKey, readCoverageEntry, writeEntry } from './quality-cache.js';

export type CoverageSource = Pick<Workspace, 'config' | 'dataset' | 'source' | 'runOptions'> & { context: CompileContext };

/**
 * The coverage as of the run's day (`now` in the dataset's time zone): rows dated after it are
 * left out and counted (coverage.ts coverageAsOf). The whole data's coverage is what is kept.
 */
export async function keptCoverage(ws: CoverageSource, now: Date = new Date()): Promise<Coverage> {
  const whole = await wholeCoverage(ws);
  return coverageAsOf(whole, dayIn(now, ws.dataset.timezone), ws.source, ws.context, ws.runOptions);
}

/** The calendar day `now` falls on in a time zone, as an ISO date. */
function dayIn(now: Date, timeZone: string): string {
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(now);
}

async function wholeCoverage(ws: CoverageSource): Promise<Coverage> {
  const read = () => readDataCoverage(ws.source, ws.context, ws.runOptions);
  const version = await dataVersion(ws).catch(() => null);
  if (version === null) return read();
  const query = compileCoverage(ws.context);
  // The signs of the metrics' days are kept with the coverage: their query is part of the key.
  const signs = compileSigns(ws.context);
  const key = entryKey(version, JSON.stringify([ws.context.timeColumnType, query.sql, query.params, signs?.sql ?? null, signs?.params ?? null]));
  const file = coverageCacheFile(ws.config, ws.dataset);
  const kept = await readCoverageEntry(file, key);
  if (kept && kept.reachZero) return { firstDate: kept.firstDate, lastDate: kept.lastDate, rows: kept.rows, ...(kept.stamps ? { stamps: kept.stamps } : {}), ...(kept.strayTail ? { strayTail: kept.strayTail } : {}), reachZero: kept.reachZero };
  const coverage = await read();
  // Kept only if the data kept its version while the queries ran (see check-run.ts).
  if ((await dataVersion(ws).catch(() => null)) === version) {
    await writeEntry(file, { key, firstDate: coverage.firstDate, lastDate: coverage.lastDate, rows: coverage.rows, ...(coverage.stamps ? { stamps: coverage.stamps } : {}), ...(coverage.strayTail ? { strayTail: coverage.strayTail } : {}), ...(coverage.reachZero ? { reachZero: coverage.reachZero } : {}) });
  }
  return coverage;
}
