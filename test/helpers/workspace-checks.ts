// A workspace opened for the tests of one describe block, the test's own SQL run on it, and the
// points of a series answer: the set-up the template tests over open datasets share.
import { afterAll, beforeAll } from 'vitest';
import type { Answer, PeriodPoint, ResultTable } from '../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../analysis/workspace.js';
import type { LoadedConfig } from '../../config/load.js';

/**
 * The workspace `open` gives, opened before the block's tests and closed after them. Read it
 * through the returned function inside a test.
 */
export function useWorkspace(open: () => Promise<Workspace>, timeoutMs?: number): () => Workspace {
  let ws: Workspace | undefined;
  beforeAll(async () => {
    ws = await open();
  }, timeoutMs);
  afterAll(async () => ws?.source.close());
  return () => {
    if (!ws) throw new Error('the workspace is opened in beforeAll: read it inside a test');
    return ws;
  };
}

/**
 * One dataset of a config over an open data file (clock fixed at 2026-12-05), with the test's own
 * SQL run on its source: `own(sql)` gives the rows (up to 1,000).
 */
export function useFileWorkspace(config: LoadedConfig, dataset: string): { ws: () => Workspace; own: (sql: string) => Promise<ResultTable['rows']> } {
  const ws = useWorkspace(() => openWorkspace(config, dataset, {}, new Date('2026-12-05T12:00:00Z')), 120_000);
  const own = async (sql: string) => (await ws().source.run({ sql, params: [] }, { maxRows: 1000, timeoutMs: 120_000 })).rows;
  return { ws, own };
}

/** The points of the answer's series of `metric`. */
export function seriesPoints(a: Answer, metric: string): PeriodPoint[] {
  const f = a.findings.find((x) => x.type === 'series' && x.metric === metric);
  if (!f || f.type !== 'series') throw new Error(`no series of ${metric}`);
  return f.points;
}
