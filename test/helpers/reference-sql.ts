// The tests' own reference queries: an in-memory DuckDB, apart from the code under test, run over
// the open data files to work out each expected figure.
import { DuckDBInstance } from '@duckdb/node-api';

/** The rows of `query` (plain JS values), from a fresh in-memory DuckDB. */
export async function referenceRows(query: string): Promise<Record<string, unknown>[]> {
  const db = await DuckDBInstance.create(':memory:');
  const c = await db.connect();
  try {
    return (await c.runAndReadAll(query)).getRowObjectsJS() as Record<string, unknown>[];
  } finally {
    c.closeSync();
  }
}
