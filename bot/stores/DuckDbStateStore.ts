// The embedded persistent store: a DuckDB file through the engine the project already uses, so
// no second native module (better-sqlite3 compiles from source here on every clean install).
// Writes go through one connection in order, so a state is never half written. Statements that
// queue up while one runs are committed together in one transaction (group commit): DuckDB spends
// more on each autocommit than on a small write, and a burst of requests queues many.
// The local channel's threads live in the same file (DuckDbThreadLog), written through
// `exclusive`, so they take their turn with the bot's own writes.
import { existsSync, mkdirSync } from 'node:fs';
import { dirname } from 'node:path';
import { DuckDBConnection, DuckDBInstance, type DuckDBPreparedStatement, type DuckDBValue } from '@duckdb/node-api';
import type { AuditEntry, AuditFilter, AuditKind, KeyedPost, PostOnceOptions, SqlSession, Stage, StateStore, ThreadState, ThreadStep } from '../thread-state.js';
import { sendThenRecord } from './post-once.js';
import { checkStateFile, StateFileError } from './state-file-check.js';

export { StateFileError };

/**
 * Statements on the state file's connection, inside the caller's turn (and transaction). It is
 * also the session postOnce hands a port that keeps its posts in this file (the local channel),
 * so the post and its key commit together.
 */
export interface DuckDbSession extends SqlSession {
  readonly kind: 'duckdb';
  /** Runs a write; the number of rows it changed. */
  execute(sql: string, params?: DuckDBValue[]): Promise<number>;
  rows(sql: string, params?: DuckDBValue[]): Promise<DuckDBValue[][]>;
  /** Runs `work` once the transaction has committed (what a write announces waits for it); dropped if it rolls back. */
  afterCommit(work: () => void): void;
}

export function isDuckDbSession(session: SqlSession | undefined): session is DuckDbSession {
  return (session as Partial<DuckDbSession> | undefined)?.kind === 'duckdb';
}

// The state file holds small rows and the local channel's attachments; DuckDB's default buffer
// pool (80% of the machine's memory) would keep every page it ever read. A bounded pool keeps the
// process's memory flat as threads accumulate (pages beyond it are read from the file again).
const STATE_MEMORY_LIMIT = '64MB';

/**
 * The state file's engine settings besides its pool. Rows written since the last checkpoint stay
 * pinned in the pool until it runs (at 16MB of write-ahead log by default: the pool swung between 20
 * and 46 MB over 100 runs, and a 16 or 32 MB limit then failed commits); checkpointing at 4MB keeps
 * that share small. DuckDB's allocator hands what it freed back to the system from a background
 * thread, not only when it next allocates: without it a reading just after a checkpoint held tens of
 * MB already freed. Measured by bench:chat-memory (BENCHMARKS.md, issue 18).
 */
export const STATE_ENGINE_SETTINGS: Readonly<Record<string, string>> = {
  memory_limit: STATE_MEMORY_LIMIT,
  checkpoint_threshold: '4MB',
  allocator_background_threads: 'true',
};

interface QueuedWork {
  work: () => Promise<unknown>;
  resolve: (value: unknown) => void;
  reject: (err: unknown) => void;
}

/** The most statements committed in one transaction, so no caller waits behind a long batch. */
const GROUP_COMMIT_LIMIT = 64;

/**
 * Whose work it is. The bot's own steps go first, with a few of the channel's (a message arriving,
 * a page reading) beside them in each commit: under a burst the bot answers the first messages
 * while later ones are still arriving, instead of every reply waiting for the whole burst to be
 * written; arriving messages still get a share of every commit.
 */
export type Lane = 'bot' | 'channel';
const CHANNEL_SHARE_BESIDE_BOT = 32;

/** Threads whose last written state is kept in memory (a few KB each). */
const RECENT_THREADS = 1_000;

export class DuckDbStateStore implements StateStore {
  readonly shared = false;
  private readonly waiting: Record<Lane, QueuedWork[]> = { bot: [], channel: [] };
  private draining = false;

  private constructor(
    private readonly instance: DuckDBInstance,
    private readonly connection: DuckDBConnection,
    /** The last audit sequence number written (one process owns the file, so a counter in memory is enough). */
    private auditSeq: number,
    private readonly hasAudit: boolean,
    /** Whether queued statements are committed together (not for a read-only file). */
    private readonly groupCommit: boolean,
    /** The ids of the threads in the file (read at open), so a write knows to update or insert. */
    private readonly threadIds: Set<string>,
  ) {}

  /**
   * Opens (creating) the state file; `readOnly` reads a file another tool wrote, creating nothing.
   * An existing file is checked first, read-only: a damaged or truncated one throws StateFileError
   * and is left as it was.
   */
  static async open(path: string, opts: { readOnly?: boolean } = {}): Promise<DuckDbStateStore> {
    if (existsSync(path)) await checkStateFile(path);
    if (opts.readOnly) {
      const instance = await DuckDBInstance.create(path, { access_mode: 'READ_ONLY', memory_limit: STATE_MEMORY_LIMIT });
      const connection = await instance.connect();
      const r = await connection.runAndReadAll(`SELECT COUNT(*) FROM information_schema.tables WHERE table_name = 'audit'`);
      return new DuckDbStateStore(instance, connection, 0, Number(r.getRows()[0]?.[0] ?? 0) > 0, false, new Set());
    }
    mkdirSync(dirname(path), { recursive: true });
    const instance = await DuckDBInstance.create(path, { ...STATE_ENGINE_SETTINGS });
    const connection = await instance.connect();
    try {
      // What the last process left in the write-ahead log is folded into the file now, before any new write.
      await connection.run('CHECKPOINT');
      await connection.run(`CREATE TABLE IF NOT EXISTS threads (
        thread_id VARCHAR PRIMARY KEY, requester VARCHAR NOT NULL, stage VARCHAR NOT NULL,
        state VARCHAR NOT NULL, updated_at VARCHAR NOT NULL)`);
      await connection.run(`CREATE TABLE IF NOT EXISTS posts (
        post_key VARCHAR PRIMARY KEY, thread_id VARCHAR NOT NULL, ref VARCHAR NOT NULL)`);
      // The audit log: appended to, never updated; seq keeps the order entries were written in.
      await connection.run(`CREATE TABLE IF NOT EXISTS audit (
        seq BIGINT PRIMARY KEY, logged_at VARCHAR NOT NULL, thread_id VARCHAR NOT NULL, requester VARCHAR NOT NULL,
        channel VARCHAR NOT NULL, kind VARCHAR NOT NULL, detail VARCHAR NOT NULL)`);
      const last = await connection.runAndReadAll('SELECT COALESCE(MAX(seq), 0) FROM audit');
      const ids = await connection.runAndReadAll('SELECT thread_id FROM threads');
      return new DuckDbStateStore(instance, connection, Number(last.getRows()[0]?.[0] ?? 0), true, true, new Set(ids.getRows().map((r) => String(r[0]))));
    } catch (err) {
      connection.closeSync();
      instance.closeSync();
      throw err;
    }
  }

  /** Runs `work` on the file's connection in its turn, in one transaction with whatever commits beside it. */
  exclusive<T>(work: (db: DuckDbSession) => Promise<T>, lane: Lane = 'bot'): Promise<T> {
    return this.serial(() => work(this.session), lane);
  }

  private readonly session: DuckDbSession = {
    kind: 'duckdb',
    execute: (sql, params = []) => this.execute(sql, params),
    // Reads are not prepared once and reused: a cached statement read again while the page asked
    // for the thread list returned strings from freed memory (ids like "M", titles like U+FFFD).
    rows: async (sql, params = []) => (await this.connection.runAndReadAll(sql, params)).getRows(),
    query: async (sql, values = []) => ({ rows: (await this.connection.runAndReadAll(sql, values as DuckDBValue[])).getRowObjects() }),
    afterCommit: (work) => void this.committed.push(work),
  };

  /** What waits for the running transaction to commit. */
  private committed: (() => void)[] = [];

  /** The transaction committed: what waited for it runs now, in order. */
  private flushCommitted(): void {
    const works = this.committed;
    this.committed = [];
    for (const work of works) work();
  }

  /**
   * One statement at a time on the one connection. Those that arrive while another runs wait and
   * then run together in one transaction; each caller's promise settles only after that commit.
   */
  private serial<T>(work: () => Promise<T>, lane: Lane = 'bot'): Promise<T> {
    // Work arriving after close (a late sweep, a stray timer) is refused here: DuckDB must never see a closed connection.
    if (this.closed) return Promise.reject(new Error('the state file is closed'));
    return new Promise<T>((resolve, reject) => {
      this.waiting[lane].push({ work, resolve: resolve as (value: unknown) => void, reject });
      if (!this.draining) void this.drain();
    });
  }

  private async drain(): Promise<void> {
    this.draining = true;
    try {
      while (this.waiting.bot.length > 0 || this.waiting.channel.length > 0) {
        const bot = this.waiting.bot.splice(0, GROUP_COMMIT_LIMIT);
        const batch = [...bot, ...this.waiting.channel.splice(0, bot.length > 0 ? CHANNEL_SHARE_BESIDE_BOT : GROUP_COMMIT_LIMIT)];
        if (batch.length > 1 && this.groupCommit && (await this.runTogether(batch))) continue;
        for (const item of batch) await this.runAlone(item);
      }
    } finally {
      this.draining = false;
    }
  }

  /** One caller's work; in a transaction of its own when the file is writable, so it is all or nothing. */
  private async runAlone(item: QueuedWork): Promise<void> {
    if (!this.groupCommit) {
      try {
        item.resolve(await item.work());
      } catch (err) {
        item.reject(err);
      }
      return;
    }
    const auditSeq = this.auditSeq;
    try {
      await this.connection.run('BEGIN TRANSACTION');
      const result = await item.work();
      await this.connection.run('COMMIT');
      this.flushCommitted();
      item.resolve(result);
    } catch (err) {
      await this.connection.run('ROLLBACK').catch(() => undefined);
      this.committed = [];
      this.auditSeq = auditSeq;
      item.reject(err);
    }
  }

  /** The batch in one transaction; false (everything undone) when any of it failed, to be run one at a time. */
  private async runTogether(batch: QueuedWork[]): Promise<boolean> {
    const auditSeq = this.auditSeq;
    const results: unknown[] = [];
    try {
      await this.connection.run('BEGIN TRANSACTION');
      for (const item of batch) results.push(await item.work());
      await this.connection.run('COMMIT');
    } catch {
      await this.connection.run('ROLLBACK').catch(() => undefined);
      this.committed = [];
      this.auditSeq = auditSeq;
      return false;
    }
    this.flushCommitted();
    batch.forEach((item, i) => item.resolve(results[i]));
    return true;
  }

  // The few statements every message runs, prepared once: parsing and planning each time cost
  // about as much as the write itself (3.5 against 2.1 ms of CPU for a 3 KB state, measured here).
  private readonly prepared = new Map<string, Promise<DuckDBPreparedStatement>>();

  private statement(sql: string, params: DuckDBValue[]): Promise<DuckDBPreparedStatement> {
    let p = this.prepared.get(sql);
    if (!p) {
      p = this.connection.prepare(sql);
      this.prepared.set(sql, p);
    }
    return p.then((s) => {
      s.bind(params);
      return s;
    });
  }

  /** Runs a write; the number of rows it changed. */
  private async execute(sql: string, params: DuckDBValue[]): Promise<number> {
    return (await (await this.statement(sql, params)).run()).rowsChanged;
  }

  private async firstValue(sql: string, params: DuckDBValue[]): Promise<unknown> {
    const reader = await (await this.statement(sql, params)).runAndReadAll();
    return reader.getRows()[0]?.[0];
  }

  /**
   * The threads written or read lately, as written (one process owns the file, so what it wrote
   * last is what the file holds): most messages find their thread here instead of waiting their
   * turn to read it. Bounded, oldest dropped first.
   */
  private readonly recent = new Map<string, string>();

  private remember(threadId: string, json: string): void {
    this.recent.delete(threadId);
    this.recent.set(threadId, json);
    if (this.recent.size > RECENT_THREADS) this.recent.delete(this.recent.keys().next().value!);
  }

  async get(threadId: string): Promise<ThreadState | undefined> {
    const cached = this.recent.get(threadId);
    if (cached !== undefined) return JSON.parse(cached) as ThreadState;
    // Not among the ids in the file (read at open, added to since): a new thread, nothing to read.
    if (this.groupCommit && !this.threadIds.has(threadId)) return undefined;
    const state = await this.serial(() => this.firstValue('SELECT state FROM threads WHERE thread_id = $1', [threadId]));
    if (state === undefined) return undefined;
    // Written meanwhile: the newer one is remembered already.
    if (!this.recent.has(threadId)) this.remember(threadId, String(state));
    return JSON.parse(String(state)) as ThreadState;
  }

  async put(state: ThreadState): Promise<void> {
    // The state is written as it was when put was called.
    const row = stateRow(state);
    return this.serial(() => this.writeState(row));
  }

  /**
   * An update of a thread in the file, else an insert (DuckDB's INSERT OR REPLACE costs about three
   * times either); which one is known without asking, from the ids read at open and added since.
   */
  private async writeState(row: DuckDBValue[]): Promise<void> {
    const id = String(row[0]);
    // Remembered once it is committed; a rolled-back write leaves the last committed one.
    this.committed.push(() => this.remember(id, String(row[3])));
    // A known id whose insert was rolled back is not in the file: the update then finds nothing.
    if (this.threadIds.has(id) && (await this.execute('UPDATE threads SET requester = $2, stage = $3, state = $4, updated_at = $5 WHERE thread_id = $1', row)) > 0) return;
    await this.execute('INSERT INTO threads VALUES ($1, $2, $3, $4, $5)', row);
    this.threadIds.add(id);
  }

  commit(step: ThreadStep): Promise<void> {
    const row = step.state ? stateRow(step.state) : undefined;
    const entries = step.audit.map((e) => structuredClone(e));
    const posts = (step.posts ?? []).map((p) => ({ ...p }));
    return this.serial(async () => {
      for (const p of posts) await this.writePost(p.key, p.threadId, p.ref);
      for (const entry of entries) await this.insertAudit(entry);
      if (row) await this.writeState(row);
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
      const ref = await this.firstValue('SELECT ref FROM posts WHERE post_key = $1', [key]);
      return ref === undefined ? undefined : String(ref);
    });
  }

  recordPost(key: string, threadId: string, ref: string): Promise<void> {
    return this.serial(() => this.writePost(key, threadId, ref));
  }

  /** An update, else an insert, as for threads: an insert that hit an existing key would also abort every other write committed with it. */
  private async writePost(key: string, threadId: string, ref: string): Promise<void> {
    const updated = await this.execute('UPDATE posts SET thread_id = $2, ref = $3 WHERE post_key = $1', [key, threadId, ref]);
    if (updated === 0) await this.execute('INSERT INTO posts VALUES ($1, $2, $3)', [key, threadId, ref]);
  }

  appendAudit(entry: AuditEntry): Promise<void> {
    return this.serial(() => this.insertAudit(entry));
  }

  private async insertAudit(entry: AuditEntry): Promise<void> {
    const seq = this.auditSeq + 1;
    await this.execute('INSERT INTO audit VALUES ($1, $2, $3, $4, $5, $6, $7)', [
      seq,
      entry.at,
      entry.threadId,
      entry.requester,
      entry.channel,
      entry.kind,
      JSON.stringify(entry.detail),
    ]);
    this.auditSeq = seq;
  }

  listAudit(filter: AuditFilter = {}): Promise<AuditEntry[]> {
    return this.serial(async () => {
      if (!this.hasAudit) return [];
      const where: string[] = [];
      const params: string[] = [];
      if (filter.threadId !== undefined) {
        params.push(filter.threadId);
        where.push(`thread_id = $${params.length}`);
      }
      if (filter.since !== undefined) {
        params.push(filter.since);
        where.push(`logged_at >= $${params.length}`);
      }
      const r = await this.connection.runAndReadAll(
        `SELECT logged_at, thread_id, requester, channel, kind, detail FROM audit${where.length ? ` WHERE ${where.join(' AND ')}` : ''} ORDER BY seq`,
        params,
      );
      return r.getRows().map((row) => ({
        at: String(row[0]),
        threadId: String(row[1]),
        requester: String(row[2]),
        channel: String(row[3]),
        kind: String(row[4]) as AuditKind,
        detail: JSON.parse(String(row[5])) as Record<string, unknown>,
      }));
    });
  }

  /**
   * A port that keeps its posts in this file (`joined`) writes through the session in the same
   * transaction as the key: exactly once. Any other is called outside the store's turn (a slow
   * platform must not hold up every thread's writes), then the key is recorded: at least once.
   */
  postOnce(post: KeyedPost, send: (session?: SqlSession) => Promise<string>, opts: PostOnceOptions = {}): Promise<string> {
    if (!opts.joined) return sendThenRecord(this, post, send);
    const entries = post.audit.map((e) => structuredClone(e));
    const row = post.state ? stateRow(post.state) : undefined;
    return this.serial(async () => {
      const known = opts.fresh ? undefined : await this.firstValue('SELECT ref FROM posts WHERE post_key = $1', [post.key]);
      const ref = known === undefined ? await send(this.session) : String(known);
      if (known === undefined) {
        await this.execute('INSERT INTO posts VALUES ($1, $2, $3)', [post.key, post.threadId, ref]);
        for (const entry of entries) await this.insertAudit(entry);
      }
      if (row) await this.writeState(row);
      return ref;
    });
  }

  /** One process owns this store; the bot serialises a thread's work in memory. */
  withThreadLock<T>(_threadId: string, work: () => Promise<T>): Promise<T> {
    return work();
  }

  /** Set once close has begun: the work already queued runs, nothing new is taken. */
  private closed = false;

  async close(): Promise<void> {
    if (this.closed) return;
    const drained = this.serial(async () => undefined);
    this.closed = true;
    await drained;
    for (const p of this.prepared.values()) (await p.catch(() => undefined))?.destroySync();
    this.connection.closeSync();
    this.instance.closeSync();
  }
}

function stateRow(state: ThreadState): DuckDBValue[] {
  return [state.threadId, state.requester, state.stage, JSON.stringify(state), state.updatedAt];
}
