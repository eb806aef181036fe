// What the sub-questions of one run share: results of identical queries, and one rollup of the
// table (one scan) for every sub-question whose numbers are sums and counts.
import { runRollup } from './rollup/eligibility.js';
import type { RollupShape } from './rollup/rollup.js';
import type { ResultTable, SubQuestion } from './types.js';
import type { Workspace } from './workspace.js';

export interface RunScope {
  /** Results by statement and parameters: a query two answers compile identically runs once per run. */
  results: Map<string, Promise<ResultTable>>;
  /** The rollup this run's additive sub-questions read, or null when they read the table. */
  rollup: RollupShape | null;
  /** Frees whatever the run kept in the engine; safe to call twice. */
  close(): Promise<void>;
}

/**
 * A rollup pays for itself once two sub-questions read it: one is answered as fast from the
 * table directly. The engine keeps rollups between runs (see DuckDbSource), so a later request
 * with the same shape on the same data reads it without another scan.
 */
const MIN_READERS = 2;

export interface RunScopeOptions {
  /** false: every sub-question reads the table (the benchmark's one-query-per-sub-question reference). */
  sharedScan?: boolean;
}

export function openRunScope(items: SubQuestion[], ws: Workspace, opts: RunScopeOptions = {}): RunScope {
  const rollup = opts.sharedScan === false ? null : runRollup(items, ws.dataset, MIN_READERS);
  return { results: new Map(), rollup, close: async () => undefined };
}
