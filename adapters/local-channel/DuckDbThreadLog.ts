// The local channel's threads in the embedded state file, beside the bot's own state: threads,
// messages, attachments (as BLOBs, so none is held in process memory) and the numbered events a
// page's stream replays. A restart keeps them all, so a thread waiting on a prompt still answers
// and a reconnecting page gets what it missed. Writes take their turn on the state store's one
// connection; one process owns the file, so new events go to this process's streams directly, and
// each thread's last event number is kept in memory (read once at start) instead of a counter
// row updated on every message.
import { blobValue, DuckDBBlobValue, type DuckDBListValue, type DuckDBValue } from '@duckdb/node-api';
import type { OutgoingPost } from '../../bot/port.js';
import { isDuckDbSession, type DuckDbSession, type DuckDbStateStore } from '../../bot/stores/DuckDbStateStore.js';
import type { SqlSession } from '../../bot/thread-state.js';
import type { PostContent } from '../post-view.js';
import {
  applyEdit,
  botMessage,
  startsTail,
  newId,
  personMessage,
  summaryOf,
  titleOf,
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

interface Subscriber {
  lastSeq: number;
  listener: LocalEventListener;
  /** Events that arrived while the replay was being read, delivered after it. */
  early: LocalEvent[] | null;
}

export class DuckDbThreadLog implements LocalThreadLog {
  readonly inStateStore = true;
  private readonly subscribers = new Map<string, Set<Subscriber>>();

  private constructor(
    private readonly store: DuckDbStateStore,
    /** Each thread's last event number; a thread is known here when it is in the file. */
    private readonly lastSeq: Map<string, number>,
    private readonly botName: string,
    private readonly now: () => Date,
  ) {}

  static async open(store: DuckDbStateStore, opts: { botName?: string; now?: () => Date } = {}): Promise<DuckDbThreadLog> {
    await store.exclusive(async (db) => {
      // Messages and events are JSON as the API shows them; an event's seq numbers it in its thread.
      await db.execute(`CREATE TABLE IF NOT EXISTS local_threads (
        id VARCHAR NOT NULL, title VARCHAR NOT NULL, author VARCHAR NOT NULL, created_at VARCHAR NOT NULL)`);
      await db.execute(`CREATE TABLE IF NOT EXISTS local_messages (
        id VARCHAR NOT NULL, thread_id VARCHAR NOT NULL, position INTEGER NOT NULL, from_bot BOOLEAN NOT NULL,
        created_at VARCHAR NOT NULL, post_key VARCHAR, message VARCHAR NOT NULL, starts_tail BOOLEAN NOT NULL)`);
      await db.execute(`CREATE TABLE IF NOT EXISTS local_events (
        thread_id VARCHAR NOT NULL, seq INTEGER NOT NULL, type VARCHAR NOT NULL, message VARCHAR NOT NULL)`);
      await db.execute(`CREATE TABLE IF NOT EXISTS local_files (
        id VARCHAR NOT NULL, thread_id VARCHAR NOT NULL, file VARCHAR NOT NULL, content BLOB NOT NULL)`);
    });
    const last = await store.exclusive((db) =>
      db.rows('SELECT t.id, COALESCE(max(e.seq), 0) FROM local_threads t LEFT JOIN local_events e ON e.thread_id = t.id GROUP BY t.id'),
    );
    const lastSeq = new Map(last.map((r) => [String(r[0]), Number(r[1])]));
    return new DuckDbThreadLog(store, lastSeq, opts.botName ?? 'threadcount', opts.now ?? (() => new Date()));
  }

  async createThread(author: string, text: string): Promise<{ thread: { id: string }; message: LocalMessage }> {
    const id = newId();
    const message = personMessage(author, text, this.stamp());
    const event = await this.store.exclusive(async (db) => {
      await db.execute('INSERT INTO local_threads VALUES ($1, $2, $3, $4)', [id, titleOf(text), author, this.stamp()]);
      this.lastSeq.set(id, 0);
      return this.appendAt(db, id, this.nextSeq(id), message, null);
    }, 'channel');
    this.emit(id, event);
    return { thread: { id }, message };
  }

  async addPersonMessage(threadId: string, author: string, text: string, label?: string): Promise<LocalMessage | undefined> {
    const message = personMessage(author, text, this.stamp(), label);
    const event = await this.store.exclusive((db) => this.append(db, threadId, message, null), 'channel');
    if (!event) return undefined;
    this.emit(threadId, event);
    return message;
  }

  /** With the bot's session (its post transaction), the message is written in it and announced once that commits. */
  async addBotPost(threadId: string, post: OutgoingPost, session?: SqlSession): Promise<LocalMessage> {
    if (isDuckDbSession(session)) {
      const made = await this.writeBotPost(session, threadId, post, true);
      if (made.event) session.afterCommit(() => this.emit(threadId, made.event!));
      return made.message;
    }
    const made = await this.store.exclusive((db) => this.writeBotPost(db, threadId, post, false));
    if (made.event) this.emit(threadId, made.event);
    return made.message;
  }

  /** The post's message, or the one already made under its key (a post retried after a restart), in the caller's transaction. */
  private async writeBotPost(db: DuckDbSession, threadId: string, post: OutgoingPost, joined: boolean): Promise<{ message: LocalMessage; event: LocalEvent | null }> {
    // In the bot's post transaction the store has found no post under this key, so there is no
    // message under it either (they commit together); called on its own, the log looks itself.
    if (!joined) {
      const earlier = await db.rows('SELECT message FROM local_messages WHERE thread_id = $1 AND post_key = $2', [threadId, post.key]);
      if (earlier[0]) return { message: JSON.parse(String(earlier[0][0])) as LocalMessage, event: null };
    }
    const { message, files } = botMessage(threadId, post, this.botName, this.stamp());
    if (!this.lastSeq.has(threadId)) {
      // A thread the log does not know (made before the log was kept here) is adopted.
      await db.execute('INSERT INTO local_threads VALUES ($1, $2, $3, $4)', [threadId, 'An earlier request', '', this.stamp()]);
      this.lastSeq.set(threadId, 0);
    }
    const seq = this.nextSeq(threadId);
    for (const f of files) await db.execute('INSERT INTO local_files VALUES ($1, $2, $3, $4)', [f.file.id, threadId, JSON.stringify(f.file), blobValue(f.content)]);
    return { message, event: await this.appendAt(db, threadId, seq, message, post.key) };
  }

  /** Replaces a message's text, or with `post` all it shows (see `applyEdit`). */
  async updateText(threadId: string, messageId: string, text: string, post?: PostContent): Promise<LocalMessage> {
    const event = await this.store.exclusive(async (db) => {
      const found = await db.rows('SELECT message FROM local_messages WHERE thread_id = $1 AND id = $2', [threadId, messageId]);
      if (!found[0]) throw new Error(`no message ${messageId} in local thread ${threadId}`);
      const message = JSON.parse(String(found[0][0])) as LocalMessage;
      applyEdit(message, text, this.stamp(), post);
      const seq = this.nextSeq(threadId);
      await db.execute('UPDATE local_messages SET message = $3, starts_tail = $4 WHERE thread_id = $1 AND id = $2', [threadId, messageId, JSON.stringify(message), startsTail(message)]);
      return this.recordEvent(db, threadId, seq, 'message.updated', message);
    });
    this.emit(threadId, event);
    return event.message;
  }

  async get(threadId: string): Promise<LocalThreadView | undefined> {
    return this.store.exclusive(async (db) => {
      const t = await db.rows('SELECT id, title, author, created_at FROM local_threads WHERE id = $1', [threadId]);
      if (!t[0]) return undefined;
      const m = await db.rows('SELECT message FROM local_messages WHERE thread_id = $1 ORDER BY position', [threadId]);
      const [id, title, author, createdAt] = t[0].map(String) as [string, string, string, string];
      return { id, title, author, createdAt, messages: m.map((r) => JSON.parse(String(r[0])) as LocalMessage) };
    }, 'channel');
  }

  async list(): Promise<ThreadSummary[]> {
    // The tail: from the last bot message offering something to click or naming a stage (or the last message), for `waiting` and `stage`.
    const rows = await this.store.exclusive((db) =>
      db.rows(
        `SELECT t.id, t.title, t.author, t.created_at,
                (SELECT count(*) FROM local_messages m WHERE m.thread_id = t.id),
                (SELECT list(m.message ORDER BY m.position) FROM local_messages m WHERE m.thread_id = t.id AND m.position >= COALESCE(
                   (SELECT max(x.position) FROM local_messages x WHERE x.thread_id = t.id AND x.starts_tail),
                   (SELECT max(y.position) FROM local_messages y WHERE y.thread_id = t.id)))
         FROM local_threads t ORDER BY t.created_at DESC, t.id`,
      ),
      'channel',
    );
    return rows.map((r) => {
      const tail = r[5] === null ? [] : (r[5] as DuckDBListValue).items.map((m) => JSON.parse(String(m)) as LocalMessage);
      return summaryOf({ id: String(r[0]), title: String(r[1]), author: String(r[2]), createdAt: String(r[3]) }, Number(r[4]), tail);
    });
  }

  async personMessagesBetween(from: string, to: string): Promise<{ threadId: string; message: LocalMessage }[]> {
    // createdAt is an ISO time in UTC, so text order is time order.
    const rows = await this.store.exclusive((db) =>
      db.rows('SELECT thread_id, message FROM local_messages WHERE NOT from_bot AND created_at >= $1 AND created_at < $2 ORDER BY thread_id, position', [from, to]),
      'channel',
    );
    return rows.map((r) => ({ threadId: String(r[0]), message: JSON.parse(String(r[1])) as LocalMessage }));
  }

  async file(threadId: string, id: string): Promise<StoredFile | undefined> {
    const rows = await this.store.exclusive((db) => db.rows('SELECT file, content FROM local_files WHERE id = $1 AND thread_id = $2', [id, threadId]), 'channel');
    const row = rows[0];
    if (!row) return undefined;
    return { file: JSON.parse(String(row[0])) as LocalFile, content: Buffer.from((row[1] as DuckDBBlobValue).bytes) };
  }

  async subscribe(threadId: string, afterSeq: number, listener: LocalEventListener): Promise<(() => void) | undefined> {
    // Listening starts before the replay is read, so nothing written meanwhile is missed; each event is delivered once, in order.
    const sub: Subscriber = { lastSeq: afterSeq, listener, early: [] };
    const set = this.subscribers.get(threadId) ?? new Set<Subscriber>();
    this.subscribers.set(threadId, set);
    set.add(sub);
    const unsubscribe = () => {
      set.delete(sub);
      if (set.size === 0 && this.subscribers.get(threadId) === set) this.subscribers.delete(threadId);
    };
    const replay = await this.store.exclusive(async (db) => {
      if (!this.lastSeq.has(threadId)) return null;
      const rows = await db.rows('SELECT seq, type, message FROM local_events WHERE thread_id = $1 AND seq > $2 ORDER BY seq', [threadId, afterSeq]);
      return rows.map((r): LocalEvent => ({ seq: Number(r[0]), type: String(r[1]) as LocalEventType, message: JSON.parse(String(r[2])) as LocalMessage }));
    }, 'channel');
    if (!replay) {
      unsubscribe();
      return undefined;
    }
    const early = sub.early!;
    sub.early = null;
    for (const e of [...replay, ...early]) deliver(sub, e);
    return unsubscribe;
  }

  async close(): Promise<void> {
    // The connection is the state store's; it closes it.
    this.subscribers.clear();
  }

  /** Adds a message to the thread with its event; null when the thread does not exist. */
  private async append(db: DuckDbSession, threadId: string, message: LocalMessage, postKey: string | null): Promise<LocalEvent | null> {
    return this.lastSeq.has(threadId) ? this.appendAt(db, threadId, this.nextSeq(threadId), message, postKey) : null;
  }

  /** The message at its place in the thread (its event's number), and its event. */
  private async appendAt(db: DuckDbSession, threadId: string, seq: number, message: LocalMessage, postKey: string | null): Promise<LocalEvent> {
    const row: DuckDBValue[] = [message.id, threadId, seq, message.fromBot, message.createdAt, postKey, JSON.stringify(message), startsTail(message)];
    await db.execute('INSERT INTO local_messages VALUES ($1, $2, $3, $4, $5, $6, $7, $8)', row);
    return this.recordEvent(db, threadId, seq, 'message.created', message);
  }

  /**
   * The thread's next event number. Taken inside the store's turn, so numbers follow the order of
   * commits; one taken by a write that was rolled back is not used again (numbers only increase,
   * and a stream asks for what came after the last one it saw).
   */
  private nextSeq(threadId: string): number {
    const seq = (this.lastSeq.get(threadId) ?? 0) + 1;
    this.lastSeq.set(threadId, seq);
    return seq;
  }

  private async recordEvent(db: DuckDbSession, threadId: string, seq: number, type: LocalEventType, message: LocalMessage): Promise<LocalEvent> {
    await db.execute('INSERT INTO local_events VALUES ($1, $2, $3, $4)', [threadId, seq, type, JSON.stringify(message)]);
    return { seq, type, message };
  }

  /** After the write committed: to this process's open streams of the thread. */
  private emit(threadId: string, event: LocalEvent): void {
    for (const sub of this.subscribers.get(threadId) ?? []) {
      if (sub.early) sub.early.push(event);
      else deliver(sub, event);
    }
  }

  private stamp(): string {
    return this.now().toISOString();
  }
}

function deliver(sub: Subscriber, event: LocalEvent): void {
  if (event.seq <= sub.lastSeq) return;
  sub.lastSeq = event.seq;
  // A snapshot per stream: a later update must not change what an earlier event said.
  sub.listener(structuredClone(event));
}
