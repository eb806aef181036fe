// One step of a thread (a message handled, a reminder, a run cancelled): what it decides is
// collected here and written at the end in one store commit: the audit entries, then the new
// state holding the step's posts (its outbox). The posts go out after the commit, each under
// its own key, so a process stopped in between posts them once after its restart.
import type { AuditLog, Who } from './AuditLog.js';
import type { OutgoingPost } from './port.js';
import type { Posting } from './Posting.js';
import type { AuditEntry, AuditKind, OutboxPost, StateStore, ThreadState } from './thread-state.js';

export interface StepContext {
  store: Pick<StateStore, 'commit'>;
  posting: Posting;
  audit: AuditLog;
  now: () => Date;
}

export type PostExtras = Pick<OutgoingPost, 'prompt' | 'promptLead' | 'quickReplies' | 'controls'>;

export class Step {
  private readonly entries: AuditEntry[] = [];
  private readonly posts: OutboxPost[] = [];
  private readonly after: (() => Promise<void>)[] = [];
  /** The number in the next post's key (the state's `turn`). */
  private counter: number;

  constructor(
    private readonly ctx: StepContext,
    /** The thread's requester and channel: posts are audited under them. */
    readonly thread: Who,
    /** The state as the step found it (absent for a thread the bot has not seen). */
    private readonly before: ThreadState | undefined,
  ) {
    this.counter = before?.turn ?? 0;
  }

  get threadId(): string {
    return this.thread.threadId;
  }

  /** A post in the thread under the next key, "<thread>:<prefix>:<n>"; returns the key. */
  say(prefix: string, text: string, extra: PostExtras = {}): string {
    const key = `${this.threadId}:${prefix}:${this.counter++}`;
    this.posts.push({ key, post: { text, ...extra } });
    return key;
  }

  /**
   * Replaces the post made under `target` (the brief card after a correction), whole: text and
   * controls. The edit has a key of its own, so a restart makes it once more at most (harmless).
   */
  edit(target: string, text: string, extra: PostExtras = {}): void {
    this.posts.push({ key: `${this.threadId}:edit:${this.counter++}`, post: { text, ...extra }, edits: target });
  }

  /** A reply outside a request's state (a command in a new thread, a refusal): its key is its own. */
  reply(name: string, text: string): void {
    this.posts.push({ key: this.ctx.posting.oneOffKey(this.threadId, name, this.counter), post: { text } });
  }

  /** An audit entry, written with the step (under the thread's who unless another is given). */
  log(kind: AuditKind, detail: Record<string, unknown>, who: Who = this.thread): void {
    this.entries.push(this.ctx.audit.entry(who, kind, detail));
  }

  /** Work to do once the step is written and its posts made (e.g. start the run it agreed). */
  then(work: () => Promise<void>): void {
    this.after.push(work);
  }

  /**
   * Writes the step with the thread's state after it (absent: there is no thread to keep), then
   * makes its posts in order and runs what was left for after.
   */
  async commit(state: ThreadState | undefined): Promise<void> {
    // Posts of an earlier step not yet known to be posted stay first in line.
    const waiting = await this.unposted(this.before?.outbox ?? []);
    const outbox = [...waiting, ...this.posts];
    if (state) {
      state.turn = this.counter;
      state.updatedAt = this.ctx.now().toISOString();
      if (outbox.length > 0) state.outbox = outbox;
      else delete state.outbox;
    }
    if (state || this.entries.length > 0) await this.ctx.store.commit({ audit: this.entries, ...(state ? { state } : {}) });
    // This step's own posts have keys no earlier step used; those waiting from before may have been posted.
    const own = new Set(this.posts);
    for (const p of outbox) {
      if (p.edits) await this.ctx.posting.editOnce(this.threadId, p.key, p.edits, p.post, this.thread);
      else await this.ctx.posting.postOnce(this.threadId, p.key, p.post, this.thread, { fresh: own.has(p) });
    }
    for (const work of this.after) await work();
  }

  private async unposted(outbox: OutboxPost[]): Promise<OutboxPost[]> {
    const out: OutboxPost[] = [];
    for (const p of outbox) if (!(await this.ctx.posting.isPosted(p.key))) out.push(p);
    return out;
  }
}
