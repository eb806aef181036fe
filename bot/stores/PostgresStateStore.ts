// The shared store: threads, post keys and the audit log in PostgreSQL, so several bot processes
// (replicas) work on the same conversations. A thread is worked on by one process at a time
// (an advisory lock keyed by its id), and a post and its key commit in one transaction.
import pg from 'pg';
import type { AuditEntry, AuditFilter, AuditKind, KeyedPost, SqlSession, Stage, StateStore, ThreadState, ThreadStep } from '../thread-state.js';
import { inTransaction } from './pg-transaction.js';
import { migrateStateSchema, STATE_LOCKS } from './postgres-state-schema.js';

export interface PostgresStateOptions {
  url: string;
  /** The schema the tables live in (created if missing). */
  schema: string;
  /** Connections for reads and writes. */
  poolSize?: number;
  /** Connections that only hold thread locks while a thread's work runs. */
  lockPoolSize?: number;
  /** Shown in pg_stat_activity, to tell replicas apart. */
  applicationName?: string;
}

export class PostgresStateStore implements StateStore {
  readonly shared = true;
  private constructor(
    /** Shared with the local channel's thread log: one pool per process. */
    readonly pool: pg.Pool,
    // Separate, so a thread waiting for its lock never takes a connection the lock holder needs.
    private readonly lockPool: pg.Pool,
    readonly schema: string,
  ) {}

  static async open(opts: PostgresStateOptions): Promise<PostgresStateStore> {
    const common = { connectionString: opts.url, application_name: opts.applicationName ?? 'threadcount' };
    const pool = new pg.Pool({ ...common, max: opts.poolSize ?? 10 });
    const lockPool = new pg.Pool({ ...common, max: opts.lockPoolSize ?? 8 });
    // An idle connection the server drops must not crash the process; the next query reconnects.
    pool.on('error', () => undefined);
    lockPool.on('error', () => undefined);
    try {
      await migrateStateSchema(pool, opts.schema);
    } catch (err) {
      await Promise.all([pool.end(), lockPool.end()]);
      throw err;
    }
    return new PostgresStateStore(pool, lockPool, opts.schema);
  }

  private table(name: string): string {
    return `${pg.escapeIdentifier(this.schema)}.${pg.escapeIdentifier(name)}`;
  }

  async get(threadId: string): Promise<ThreadState | undefined> {
    const r = await this.pool.query<{ state: ThreadState }>(`SELECT state FROM ${this.table('threads')} WHERE thread_id = $1`, [threadId]);
    return r.rows[0]?.state;
  }

  async put(state: ThreadState): Promise<void> {
    await this.upsertState(this.pool, state);
  }

  private async upsertState(db: pg.Pool | pg.PoolClient, state: ThreadState): Promise<void> {
    await db.query(
      `INSERT INTO ${this.table('threads')} (thread_id, requester, stage, state, updated_at) VALUES ($1, $2, $3, $4, $5)
       ON CONFLICT (thread_id) DO UPDATE SET requester = EXCLUDED.requester, stage = EXCLUDED.stage, state = EXCLUDED.state, updated_at = EXCLUDED.updated_at`,
      [state.threadId, state.requester, state.stage, JSON.stringify(state), state.updatedAt],
    );
  }

  async list(filter: { stages?: Stage[]; requester?: string } = {}): Promise<ThreadState[]> {
    const r = await this.pool.query<{ state: ThreadState }>(
      `SELECT state FROM ${this.table('threads')}
       WHERE ($1::text[] IS NULL OR stage = ANY($1)) AND ($2::text IS NULL OR requester = $2)
       ORDER BY updated_at, thread_id`,
      [filter.stages ?? null, filter.requester ?? null],
    );
    return r.rows.map((row) => row.state);
  }

  async postRef(key: string): Promise<string | undefined> {
    const r = await this.pool.query<{ ref: string }>(`SELECT ref FROM ${this.table('posts')} WHERE post_key = $1`, [key]);
    return r.rows[0]?.ref;
  }

  async recordPost(key: string, threadId: string, ref: string): Promise<void> {
    await this.insertPost(this.pool, key, threadId, ref);
  }

  async commit(step: ThreadStep): Promise<void> {
    await inTransaction(this.pool, async (_session, client) => {
      for (const p of step.posts ?? []) await this.insertPost(client, p.key, p.threadId, p.ref);
      for (const entry of step.audit) await this.insertAudit(client, entry);
      if (step.state) await this.upsertState(client, step.state);
    });
  }

  private async insertPost(db: pg.Pool | pg.PoolClient, key: string, threadId: string, ref: string): Promise<void> {
    await db.query(`INSERT INTO ${this.table('posts')} (post_key, thread_id, ref) VALUES ($1, $2, $3) ON CONFLICT (post_key) DO UPDATE SET ref = EXCLUDED.ref`, [
      key,
      threadId,
      ref,
    ]);
  }

  async appendAudit(entry: AuditEntry): Promise<void> {
    await this.insertAudit(this.pool, entry);
  }

  private async insertAudit(db: pg.Pool | pg.PoolClient, e: AuditEntry): Promise<void> {
    await db.query(`INSERT INTO ${this.table('audit')} (logged_at, thread_id, requester, channel, kind, detail) VALUES ($1, $2, $3, $4, $5, $6)`, [
      e.at,
      e.threadId,
      e.requester,
      e.channel,
      e.kind,
      JSON.stringify(e.detail),
    ]);
  }

  async listAudit(filter: AuditFilter = {}): Promise<AuditEntry[]> {
    // logged_at is ISO text: it compares as the other stores compare it (a bare date sorts first).
    const r = await this.pool.query<{ logged_at: string; thread_id: string; requester: string; channel: string; kind: string; detail: Record<string, unknown> }>(
      `SELECT logged_at, thread_id, requester, channel, kind, detail FROM ${this.table('audit')}
       WHERE ($1::text IS NULL OR thread_id = $1) AND ($2::text IS NULL OR logged_at >= $2)
       ORDER BY seq`,
      [filter.threadId ?? null, filter.since ?? null],
    );
    return r.rows.map((row) => ({
      at: row.logged_at,
      threadId: row.thread_id,
      requester: row.requester,
      channel: row.channel,
      kind: row.kind as AuditKind,
      detail: row.detail,
    }));
  }

  async postOnce(post: KeyedPost, send: (session?: SqlSession) => Promise<string>): Promise<string> {
    return inTransaction(this.pool, async (session, client) => {
      // Two processes resuming the same run wait here for each other; the second finds the key.
      await client.query('SELECT pg_advisory_xact_lock($1, hashtext($2))', [STATE_LOCKS.post, post.key]);
      const known = await client.query<{ ref: string }>(`SELECT ref FROM ${this.table('posts')} WHERE post_key = $1`, [post.key]);
      if (known.rows[0]) {
        if (post.state) await this.upsertState(client, post.state);
        return known.rows[0].ref;
      }
      const ref = await send(session);
      await client.query(`INSERT INTO ${this.table('posts')} (post_key, thread_id, ref) VALUES ($1, $2, $3)`, [post.key, post.threadId, ref]);
      for (const entry of post.audit) await this.insertAudit(client, entry);
      if (post.state) await this.upsertState(client, post.state);
      return ref;
    });
  }

  async withThreadLock<T>(threadId: string, work: () => Promise<T>): Promise<T> {
    // A transaction-level lock: it is released at COMMIT, or by the server if this process dies.
    return inTransaction(this.lockPool, async (_session, client) => {
      await client.query('SELECT pg_advisory_xact_lock($1, hashtext($2))', [STATE_LOCKS.thread, threadId]);
      return work();
    });
  }

  async close(): Promise<void> {
    await Promise.all([this.pool.end(), this.lockPool.end()]);
  }
}
