// What the sub-questions of one run share: results of identical queries, and one rollup of the
// table (one scan) for every sub-question whose numbers are sums and counts.
import { covers, rollupNeeds, runRollup } from './rollup/eligibility.js';
import type { RollupShape } from './rollup/rollup.js';
import type { ResultTable, SubQuestion } from './types.js';
import type { Workspace } from './workspace.js';

export interface RunScope {
  /** Results by statement and parameters: a query two answers compile identically runs once per run. */
  results: Map<string, Promise<ResultTable>>;
  /** The rollup this run's additive sub-questions share (an engine that keeps rollups makes it once), or null. */
  rollup: RollupShape | null;
  /**
   * True: every sub-question reads the table row by row, the additive ones included: the
   * reference the day-level path is checked against (tests). Otherwise each additive sub-question
   * reads a day-level rollup: the run's shared one, or its own.
   */
  readTable: boolean;
  /**
   * Plan positions in the order to start them: sub-questions that scan the table (per-customer
   * groupings, distinct counts, comparisons of rows) first, then those reading the rollup, each
   * group in plan order. With a few jobs at a time the longest work starts at once, and the
   * rollup readers fill in beside it.
   */
  startOrder(items: SubQuestion[]): number[];
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
  /** false: no rollup shared between sub-questions (each additive one reads a day-level rollup of its own). */
  sharedScan?: boolean;
  /** true: every sub-question reads the table row by row (the reference tests check the day-level path against). */
  readTable?: boolean;
}

export function openRunScope(items: SubQuestion[], ws: Workspace, opts: RunScopeOptions = {}): RunScope {
  const readTable = opts.readTable === true;
  const rollup = opts.sharedScan === false || readTable ? null : runRollup(items, ws.dataset, MIN_READERS);
  const readsRollup = (sq: SubQuestion) => {
    const need = rollup ? rollupNeeds(sq, ws.dataset) : null;
    return !!rollup && !!need && covers(rollup, need);
  };
  const startOrder = (list: SubQuestion[]) => {
    const positions = list.map((_, i) => i);
    return [...positions.filter((i) => !readsRollup(list[i]!)), ...positions.filter((i) => readsRollup(list[i]!))];
  };
  return { results: new Map(), rollup, readTable, startOrder, close: async () => undefined };
}
