// The local channel's tables in PostgreSQL, created on start (replicas take turns, as for the
// state tables). Messages are JSON as the API shows them; files are kept as bytes.
import pg from 'pg';
import { migrateUnderLock } from '../../bot/stores/postgres-state-schema.js';

export async function migrateThreadLogSchema(pool: pg.Pool, schema: string): Promise<void> {
  await migrateUnderLock(pool, schema, async (client, s) => {
    // last_seq numbers the thread's events; bumping it takes the row lock that orders them.
    await client.query(`CREATE TABLE IF NOT EXISTS ${s}.local_threads (
      id text PRIMARY KEY, title text NOT NULL, author text NOT NULL, created_at text NOT NULL, last_seq integer NOT NULL DEFAULT 0)`);
    await client.query(`CREATE TABLE IF NOT EXISTS ${s}.local_messages (
      id text PRIMARY KEY, thread_id text NOT NULL REFERENCES ${s}.local_threads (id), position integer NOT NULL, message json NOT NULL)`);
    await client.query(`CREATE INDEX IF NOT EXISTS local_messages_thread ON ${s}.local_messages (thread_id, position)`);
    // The bot's post key, so a post made again (a retry after a restart) finds its message.
    await client.query(`ALTER TABLE ${s}.local_messages ADD COLUMN IF NOT EXISTS post_key text`);
    await client.query(`CREATE UNIQUE INDEX IF NOT EXISTS local_messages_post_key ON ${s}.local_messages (thread_id, post_key) WHERE post_key IS NOT NULL`);
    await client.query(`CREATE TABLE IF NOT EXISTS ${s}.local_events (
      thread_id text NOT NULL REFERENCES ${s}.local_threads (id), seq integer NOT NULL, type text NOT NULL, message json NOT NULL,
      PRIMARY KEY (thread_id, seq))`);
    await client.query(`CREATE TABLE IF NOT EXISTS ${s}.local_files (
      id text PRIMARY KEY, thread_id text NOT NULL, file json NOT NULL, content bytea NOT NULL)`);
  });
}
