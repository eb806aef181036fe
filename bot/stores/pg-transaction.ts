// One transaction on a pooled connection: COMMIT when the work resolves, ROLLBACK when it throws.
// A connection that breaks meanwhile (the server restarted, a backend was terminated) reports
// through the query that fails; the listener only keeps its 'error' event from crashing the
// process, and a connection that could not roll back is closed rather than reused.
import type pg from 'pg';
import type { SqlSession } from '../thread-state.js';

export async function inTransaction<T>(pool: pg.Pool, work: (session: SqlSession, client: pg.PoolClient) => Promise<T>): Promise<T> {
  const client = await pool.connect();
  const ignore = () => undefined;
  client.on('error', ignore);
  let broken: Error | undefined;
  try {
    await client.query('BEGIN');
    try {
      const result = await work({ query: (text, values) => client.query(text, values) }, client);
      await client.query('COMMIT');
      return result;
    } catch (err) {
      await client.query('ROLLBACK').catch((e: unknown) => (broken = e instanceof Error ? e : new Error(String(e))));
      throw err;
    }
  } finally {
    client.off('error', ignore);
    client.release(broken);
  }
}
