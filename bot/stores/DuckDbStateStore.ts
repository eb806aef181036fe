// The embedded persistent store: a DuckDB file through the engine the project already uses, so
// no second native module (better-sqlite3 compiles from source here on every clean install).
// Writes go through one connection in order, so a state is never half written.
import { mkdirSync } from 'node:fs';
import { dirname } from 'node:path';
import { DuckDBConnection, DuckDBInstance } from '@duckdb/node-api';
import type { Stage, StateStore, ThreadState } from '../thread-state.js';

export class DuckDbStateStore implements StateStore {
  private queue: Promise<unknown> = Promise.resolve();

  private constructor(
    private readonly instance: DuckDBInstance,
    private readonly connection: DuckDBConnection,
  ) {}

  static async open(path: string): Promise<DuckDbStateStore> {
    mkdirSync(dirname(path), { recursive: true });
    const instance = await DuckDBInstance.create(path);
    const connection = await instance.connect();
    await connection.run(`CREATE TABLE IF NOT EXISTS threads (
      thread_id VARCHAR PRIMARY KEY, requester VARCHAR NOT NULL, stage VARCHAR NOT NULL,
      state VARCHAR NOT NULL, updated_at VARCHAR NOT NULL)`);
    await connection.run(`CREATE TABLE IF NOT EXISTS posts (
      post_key VARCHAR PRIMARY KEY, thread_id VARCHAR NOT NULL, ref VARCHAR NOT NULL)`);
    return new DuckDbStateStore(instance, connection);
  }

  /** One statement at a time on the one connection. */
  private serial<T>(work: () => Promise<T>): Promise<T> {
    const next = this.queue.then(work, work);
    this.queue = next.catch(() => undefined);
    return next;
  }

  get(threadId: string): Promise<ThreadState | undefined> {
    return this.serial(async () => {
      const r = await this.connection.runAndReadAll('SELECT state FROM threads WHERE thread_id = $1', [threadId]);
      const row = r.getRows()[0];
      return row ? (JSON.parse(String(row[0])) as ThreadState) : undefined;
    });
  }

  put(state: ThreadState): Promise<void> {
    return this.serial(async () => {
      await this.connection.run('INSERT OR REPLACE INTO threads VALUES ($1, $2, $3, $4, $5)', [
        state.threadId,
        state.requester,
        state.stage,
        JSON.stringify(state),
        state.updatedAt,
      ]);
    });
  }

  list(filter: { stages?: Stage[]; requester?: string } = {}): Promise<ThreadState[]> {
    return this.serial(async () => {
      const r = await this.connection.runAndReadAll('SELECT state FROM threads ORDER BY updated_at');
      return r
        .getRows()
        .map((row) => JSON.parse(String(row[0])) as ThreadState)
        .filter((s) => (!filter.stages || filter.stages.includes(s.stage)) && (!filter.requester || s.requester === filter.requester));
    });
  }

  postRef(key: string): Promise<string | undefined> {
    return this.serial(async () => {
      const r = await this.connection.runAndReadAll('SELECT ref FROM posts WHERE post_key = $1', [key]);
      const row = r.getRows()[0];
      return row ? String(row[0]) : undefined;
    });
  }

  recordPost(key: string, threadId: string, ref: string): Promise<void> {
    return this.serial(async () => {
      await this.connection.run('INSERT OR REPLACE INTO posts VALUES ($1, $2, $3)', [key, threadId, ref]);
    });
  }

  async close(): Promise<void> {
    await this.serial(async () => undefined);
    this.connection.closeSync();
    this.instance.closeSync();
  }
}
