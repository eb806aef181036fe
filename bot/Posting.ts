// Posting in a thread: every post has a stable key, and a key posted before (by this process,
// another replica, or before a restart) is not posted again. Each post is audited with its key,
// together with any entries that belong with it.
import type { AuditLog, Who } from './AuditLog.js';
import type { OutgoingPost, ThreadPort } from './port.js';
import type { AuditEntry, SqlSession, StateStore, ThreadState } from './thread-state.js';

/** What is recorded with a post: audit entries before and after its own, and the thread's state after it. */
export interface PostRecord {
  before?: AuditEntry[];
  after?: AuditEntry[];
  state?: ThreadState;
  /** The key is new with this step (see PostOnceOptions.fresh). */
  fresh?: boolean;
}

/** How many keys this process remembers having posted, to skip asking the store about them. */
const REMEMBERED_KEYS = 10_000;

export class Posting {
  /** Tells apart the keys of one-off replies made in the same millisecond. */
  private oneOff = 0;
  private readonly posted = new Set<string>();

  constructor(
    private readonly port: ThreadPort,
    private readonly store: Pick<StateStore, 'postOnce' | 'postRef'>,
    private readonly audit: AuditLog,
    /** Names this process, so two replicas' one-off keys never meet. */
    private readonly replica?: string,
  ) {}

  /**
   * Posts under `key` unless a post is recorded under it; returns the platform's reference either
   * way. Its audit entry (with those that belong before and after it) and the thread's state after
   * it are written with the key.
   */
  async postOnce(threadId: string, key: string, post: Omit<OutgoingPost, 'key'>, who: Who, record: PostRecord = {}): Promise<string> {
    const entry = this.audit.entry(who, 'post', { key, text: post.text, files: (post.files ?? []).map((f) => f.name) });
    const audit = [...(record.before ?? []), entry, ...(record.after ?? [])];
    const ref = await this.store.postOnce(
      { key, threadId, audit, ...(record.state ? { state: record.state } : {}) },
      (session?: SqlSession) => this.port.post(threadId, { key, ...post }, session),
      { joined: this.port.joinsState?.(threadId) ?? false, fresh: record.fresh ?? false },
    );
    this.remember(key);
    return ref;
  }

  /**
   * Replaces the post recorded under `target` in place, once under `key`. A target never posted
   * (lost with a platform's history) is posted anew instead, so the thread still shows it.
   */
  async editOnce(threadId: string, key: string, target: string, post: Omit<OutgoingPost, 'key'>, who: Who): Promise<string> {
    const ref = await this.store.postRef(target);
    if (ref === undefined) return this.postOnce(threadId, key, post, who);
    const entry = this.audit.entry(who, 'post', { key, edits: target, text: post.text, files: [] });
    await this.store.postOnce({ key, threadId, audit: [entry] }, async () => {
      await this.port.update(threadId, ref, post.text, post);
      return ref;
    });
    this.remember(key);
    return ref;
  }

  /** Whether a post is recorded under `key` (this process's memory first, then the store). */
  async isPosted(key: string): Promise<boolean> {
    return this.posted.has(key) || (await this.store.postRef(key)) !== undefined;
  }

  /** Replaces the text of an earlier post (progress in place). */
  update(threadId: string, ref: string, text: string): Promise<void> {
    return this.port.update(threadId, ref, text);
  }

  /** A key of its own for a reply outside a request's state (a command in a new thread, a refusal). */
  oneOffKey(threadId: string, name: string, turn: number): string {
    // The replica's name keeps two processes answering in the same millisecond apart.
    const origin = this.replica ? `${this.replica}:` : '';
    return `${threadId}:${name}:${turn}:${origin}${Date.now()}:${this.oneOff++}`;
  }

  private remember(key: string): void {
    this.posted.add(key);
    if (this.posted.size > REMEMBERED_KEYS) this.posted.delete(this.posted.values().next().value!);
  }
}
