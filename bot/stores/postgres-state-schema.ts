// The shared store's tables, created on start. Replicas starting together would race on
// CREATE ... IF NOT EXISTS (it is not atomic against a concurrent create), so they take turns.
import pg from 'pg';

/** First keys of the two-key advisory locks threadcount takes (the second is a hash of the name). */
export const STATE_LOCKS = {
  migrate: 0x7c01,
  thread: 0x7c02,
  post: 0x7c03,
} as const;

/**
 * Runs `create` in one transaction, after the schema exists, holding the migration lock for the
 * schema: replicas starting together create their tables one at a time.
 */
export async function migrateUnderLock(pool: pg.Pool, schema: string, create: (client: pg.PoolClient, s: string) => Promise<void>): Promise<void> {
  const s = pg.escapeIdentifier(schema);
  const client = await pool.connect();
  try {
    await client.query('BEGIN');
    await client.query('SELECT pg_advisory_xact_lock($1, hashtext($2))', [STATE_LOCKS.migrate, schema]);
    await client.query(`CREATE SCHEMA IF NOT EXISTS ${s}`);
    await create(client, s);
    await client.query('COMMIT');
  } catch (err) {
    await client.query('ROLLBACK').catch(() => undefined);
    throw err;
  } finally {
    client.release();
  }
}

export async function migrateStateSchema(pool: pg.Pool, schema: string): Promise<void> {
  await migrateUnderLock(pool, schema, async (client, s) => {
    // The state as JSON text (json, not jsonb, keeps it as written); stage and requester for filtering.
    await client.query(`CREATE TABLE IF NOT EXISTS ${s}.threads (
      thread_id text PRIMARY KEY, requester text NOT NULL, stage text NOT NULL, state json NOT NULL, updated_at text NOT NULL)`);
    await client.query(`CREATE INDEX IF NOT EXISTS threads_stage ON ${s}.threads (stage)`);
    // One row per post key: the primary key is what makes a post once-only.
    await client.query(`CREATE TABLE IF NOT EXISTS ${s}.posts (post_key text PRIMARY KEY, thread_id text NOT NULL, ref text NOT NULL)`);
    // Appended to, never updated; seq keeps the order entries were written in.
    await client.query(`CREATE TABLE IF NOT EXISTS ${s}.audit (
      seq bigserial PRIMARY KEY, logged_at text NOT NULL, thread_id text NOT NULL, requester text NOT NULL,
      channel text NOT NULL, kind text NOT NULL, detail json NOT NULL)`);
    await client.query(`CREATE INDEX IF NOT EXISTS audit_thread ON ${s}.audit (thread_id, seq)`);
  });
}
