// The local channel's threads in PostgreSQL, so every replica's API and event streams show the
// same threads. Each change bumps the thread's event counter under its row lock (so events are
// numbered without gaps or ties) and sends a NOTIFY, which PostgreSQL delivers at commit; each
// replica LISTENs and pushes the new events to its open streams.
import pg from 'pg';
import type { OutgoingPost } from '../../bot/port.js';
import type { SqlSession } from '../../bot/thread-state.js';
import type { PostContent } from '../post-view.js';
import {
  applyEdit,
  botMessage,
  newId,
  personMessage,
  summaryOf,
  titleOf,
  withFileUrls,
  type LocalEvent,
  type LocalEventListener,
  type LocalEventType,
  type LocalFile,
  type LocalMessage,
  type LocalThreadLog,
  type LocalThreadView,
  type StoredFile,
  type ThreadSummary,
} from './local-thread-log.js';
import { inTransaction } from '../../bot/stores/pg-transaction.js';
import { migrateThreadLogSchema } from './postgres-thread-log-schema.js';
import { ThreadEventFeed } from './ThreadEventFeed.js';

export interface PostgresThreadLogOptions {
  /** For the LISTEN connection (one per process). */
  url: string;
  /** The pool the bot's state store uses: writes share its connections. */
  pool: pg.Pool;
  schema: string;
  botName?: string;
  now?: () => Date;
}

interface ThreadRow {
  id: string;
  title: string;
  author: string;
  created_at: string;
}

export class PostgresThreadLog implements LocalThreadLog {
  readonly inStateStore = true;
  private constructor(
    private readonly pool: pg.Pool,
    private readonly schema: string,
    private readonly feed: ThreadEventFeed,
    private readonly botName: string,
    private readonly now: () => Date,
  ) {}

  static async open(opts: PostgresThreadLogOptions): Promise<PostgresThreadLog> {
    await migrateThreadLogSchema(opts.pool, opts.schema);
    let log: PostgresThreadLog | undefined;
    const feed = await ThreadEventFeed.open({
      url: opts.url,
      channel: notifyChannel(opts.schema),
      eventsAfter: (threadId, afterSeq) => log!.eventsAfter(threadId, afterSeq),
    });
    log = new PostgresThreadLog(opts.pool, opts.schema, feed, opts.botName ?? 'threadcount', opts.now ?? (() => new Date()));
    return log;
  }

  private table(name: string): string {
    return `${pg.escapeIdentifier(this.schema)}.${pg.escapeIdentifier(name)}`;
  }

  async createThread(author: string, text: string): Promise<{ thread: { id: string }; message: LocalMessage }> {
    const id = newId();
    const message = await this.transaction(undefined, async (db) => {
      await db.query(`INSERT INTO ${this.table('local_threads')} (id, title, author, created_at) VALUES ($1, $2, $3, $4)`, [id, titleOf(text), author, this.stamp()]);
      return this.append(db, id, personMessage(author, text, this.stamp()));
    });
    return { thread: { id }, message };
  }

  async addPersonMessage(threadId: string, author: string, text: string, label?: string): Promise<LocalMessage | undefined> {
    return this.transaction(undefined, async (db) => {
      const exists = await db.query(`SELECT 1 FROM ${this.table('local_threads')} WHERE id = $1`, [threadId]);
      return exists.rows.length ? this.append(db, threadId, personMessage(author, text, this.stamp(), label)) : undefined;
    });
  }

  async addBotPost(threadId: string, post: OutgoingPost, session?: SqlSession): Promise<LocalMessage> {
    return this.transaction(session, async (db) => {
      // A thread the log does not know (made before the log moved here) is adopted.
      await db.query(`INSERT INTO ${this.table('local_threads')} (id, title, author, created_at) VALUES ($1, $2, '', $3) ON CONFLICT (id) DO NOTHING`, [
        threadId,
        'An earlier request',
        this.stamp(),
      ]);
      const made = await db.query(`SELECT message FROM ${this.table('local_messages')} WHERE thread_id = $1 AND post_key = $2`, [threadId, post.key]);
      if (made.rows[0]) return withFileUrls(threadId, made.rows[0].message as LocalMessage);
      const { message, files } = botMessage(threadId, post, this.botName, this.stamp());
      for (const f of files) {
        await db.query(`INSERT INTO ${this.table('local_files')} (id, thread_id, file, content) VALUES ($1, $2, $3, $4)`, [f.file.id, threadId, JSON.stringify(f.file), f.content]);
      }
      return this.append(db, threadId, message, post.key);
    });
  }

  async updateText(threadId: string, messageId: string, text: string, post?: PostContent): Promise<LocalMessage> {
    return this.transaction(undefined, async (db) => {
      const seq = await this.nextSeq(db, threadId);
      const r = await db.query(`SELECT message FROM ${this.table('local_messages')} WHERE thread_id = $1 AND id = $2`, [threadId, messageId]);
      const message = r.rows[0]?.message as LocalMessage | undefined;
      if (seq === undefined || !message) throw new Error(`no message ${messageId} in local thread ${threadId}`);
      applyEdit(message, text, this.stamp(), post);
      await db.query(`UPDATE ${this.table('local_messages')} SET message = $3 WHERE thread_id = $1 AND id = $2`, [threadId, messageId, JSON.stringify(message)]);
      await this.recordEvent(db, threadId, seq, 'message.updated', message);
      return message;
    });
  }

  async get(threadId: string): Promise<LocalThreadView | undefined> {
    const t = await this.pool.query<ThreadRow>(`SELECT id, title, author, created_at FROM ${this.table('local_threads')} WHERE id = $1`, [threadId]);
    const row = t.rows[0];
    if (!row) return undefined;
    const m = await this.pool.query<{ message: LocalMessage }>(`SELECT message FROM ${this.table('local_messages')} WHERE thread_id = $1 ORDER BY position`, [threadId]);
    return { id: row.id, title: row.title, author: row.author, createdAt: row.created_at, messages: m.rows.map((r) => withFileUrls(row.id, r.message)) };
  }

  async list(): Promise<ThreadSummary[]> {
    // The tail: from the last bot message offering something to click or naming a stage (or the last message), for `waiting` and `stage`.
    const messages = this.table('local_messages');
    const r = await this.pool.query<ThreadRow & { message_count: number; tail: LocalMessage[] | null }>(
      `SELECT t.id, t.title, t.author, t.created_at,
              (SELECT count(*)::int FROM ${messages} m WHERE m.thread_id = t.id) AS message_count,
              (SELECT json_agg(m.message ORDER BY m.position) FROM ${messages} m WHERE m.thread_id = t.id AND m.position >= COALESCE(
                 (SELECT max(x.position) FROM ${messages} x WHERE x.thread_id = t.id AND (x.message->>'fromBot')::boolean
                    AND (x.message->'prompt' IS NOT NULL OR x.message->'quickReplies' IS NOT NULL OR x.message->'controls' IS NOT NULL OR x.message->'kind' IS NOT NULL)),
                 (SELECT max(y.position) FROM ${messages} y WHERE y.thread_id = t.id))) AS tail
       FROM ${this.table('local_threads')} t ORDER BY t.created_at DESC, t.id`,
    );
    return r.rows.map((row) => summaryOf({ id: row.id, title: row.title, author: row.author, createdAt: row.created_at }, row.message_count, row.tail ?? []));
  }

  async personMessagesBetween(from: string, to: string): Promise<{ threadId: string; message: LocalMessage }[]> {
    // createdAt is an ISO time in UTC, so text order is time order.
    const r = await this.pool.query<{ thread_id: string; message: LocalMessage }>(
      `SELECT thread_id, message FROM ${this.table('local_messages')}
       WHERE NOT (message->>'fromBot')::boolean AND message->>'createdAt' >= $1 AND message->>'createdAt' < $2
       ORDER BY thread_id, position`,
      [from, to],
    );
    return r.rows.map((row) => ({ threadId: row.thread_id, message: row.message }));
  }

  async file(threadId: string, id: string): Promise<StoredFile | undefined> {
    const r = await this.pool.query<{ file: LocalFile; content: Buffer }>(`SELECT file, content FROM ${this.table('local_files')} WHERE id = $1 AND thread_id = $2`, [id, threadId]);
    return r.rows[0] ? { file: r.rows[0].file, content: r.rows[0].content } : undefined;
  }

  async subscribe(threadId: string, afterSeq: number, listener: LocalEventListener): Promise<(() => void) | undefined> {
    const exists = await this.pool.query(`SELECT 1 FROM ${this.table('local_threads')} WHERE id = $1`, [threadId]);
    if (exists.rows.length === 0) return undefined;
    return this.feed.subscribe(threadId, afterSeq, listener);
  }

  async close(): Promise<void> {
    // The pool is the state store's; it closes it.
    await this.feed.close();
  }

  /** The thread's events after a sequence number, oldest first. */
  async eventsAfter(threadId: string, afterSeq: number): Promise<LocalEvent[]> {
    const r = await this.pool.query<{ seq: number; type: LocalEventType; message: LocalMessage }>(
      `SELECT seq, type, message FROM ${this.table('local_events')} WHERE thread_id = $1 AND seq > $2 ORDER BY seq`,
      [threadId, afterSeq],
    );
    return r.rows.map((e) => ({ ...e, message: withFileUrls(threadId, e.message) }));
  }

  private async append(db: SqlSession, threadId: string, message: LocalMessage, postKey: string | null = null): Promise<LocalMessage> {
    const seq = await this.nextSeq(db, threadId);
    if (seq === undefined) throw new Error(`no local thread ${threadId}`);
    await db.query(`INSERT INTO ${this.table('local_messages')} (id, thread_id, position, message, post_key) VALUES ($1, $2, $3, $4, $5)`, [
      message.id,
      threadId,
      seq,
      JSON.stringify(message),
      postKey,
    ]);
    await this.recordEvent(db, threadId, seq, 'message.created', message);
    return message;
  }

  /** Takes the thread's row lock until commit, so its events are numbered one after another. */
  private async nextSeq(db: SqlSession, threadId: string): Promise<number | undefined> {
    const r = await db.query(`UPDATE ${this.table('local_threads')} SET last_seq = last_seq + 1 WHERE id = $1 RETURNING last_seq`, [threadId]);
    return r.rows[0] ? Number(r.rows[0].last_seq) : undefined;
  }

  private async recordEvent(db: SqlSession, threadId: string, seq: number, type: LocalEventType, message: LocalMessage): Promise<void> {
    await db.query(`INSERT INTO ${this.table('local_events')} (thread_id, seq, type, message) VALUES ($1, $2, $3, $4)`, [threadId, seq, type, JSON.stringify(message)]);
    await db.query('SELECT pg_notify($1, $2)', [notifyChannel(this.schema), threadId]);
  }

  /** Work in the caller's transaction when given one, else in a transaction of its own. */
  private transaction<T>(session: SqlSession | undefined, work: (db: SqlSession) => Promise<T>): Promise<T> {
    return session ? work(session) : inTransaction(this.pool, work);
  }

  private stamp(): string {
    return this.now().toISOString();
  }
}

/** The NOTIFY channel of one schema's local threads. */
function notifyChannel(schema: string): string {
  return `${schema}_local_events`;
}
