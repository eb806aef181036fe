// What the sub-questions of one run share: results of identical queries (and, later, one scan).
import type { ResultTable, SubQuestion } from './types.js';
import type { Workspace } from './workspace.js';

export interface RunScope {
  /** Results by statement and parameters: a query two answers compile identically runs once per run. */
  results: Map<string, Promise<ResultTable>>;
  /** Frees whatever the run kept in the engine; safe to call twice. */
  close(): Promise<void>;
}

export function openRunScope(_items: SubQuestion[], _ws: Workspace): RunScope {
  return { results: new Map(), close: async () => undefined };
}
