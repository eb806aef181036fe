// The in-process store: for one-shot runs and tests where nothing needs to survive a restart.
import type { AuditEntry, AuditFilter, KeyedPost, Stage, StateStore, ThreadState, ThreadStep } from '../thread-state.js';
import { sendThenRecord } from './post-once.js';
import { auditMatches } from './audit-filter.js';

export class MemoryStateStore implements StateStore {
  readonly shared = false;
  private readonly states = new Map<string, ThreadState>();
  private readonly posts = new Map<string, string>();

  async get(threadId: string): Promise<ThreadState | undefined> {
    const s = this.states.get(threadId);
    return s ? structuredClone(s) : undefined;
  }
  async put(state: ThreadState): Promise<void> {
    this.states.set(state.threadId, structuredClone(state));
  }
  async list(filter: { stages?: Stage[]; requester?: string } = {}): Promise<ThreadState[]> {
    // Oldest update first, as the other stores list them.
    return [...this.states.values()]
      .filter((s) => (!filter.stages || filter.stages.includes(s.stage)) && (!filter.requester || s.requester === filter.requester))
      .sort((a, b) => a.updatedAt.localeCompare(b.updatedAt) || a.threadId.localeCompare(b.threadId))
      .map((s) => structuredClone(s));
  }
  async postRef(key: string): Promise<string | undefined> {
    return this.posts.get(key);
  }
  async recordPost(key: string, _threadId: string, ref: string): Promise<void> {
    this.posts.set(key, ref);
  }
  private readonly audit: AuditEntry[] = [];
  async appendAudit(entry: AuditEntry): Promise<void> {
    this.audit.push(structuredClone(entry));
  }
  async listAudit(filter: AuditFilter = {}): Promise<AuditEntry[]> {
    return this.audit.filter((e) => auditMatches(e, filter)).map((e) => structuredClone(e));
  }

  async commit(step: ThreadStep): Promise<void> {
    for (const p of step.posts ?? []) this.posts.set(p.key, p.ref);
    for (const entry of step.audit) this.audit.push(structuredClone(entry));
    if (step.state) this.states.set(step.state.threadId, structuredClone(step.state));
  }

  postOnce(post: KeyedPost, send: () => Promise<string>): Promise<string> {
    return sendThenRecord(this, post, send);
  }
  /** One process owns this store; the bot serialises a thread's work in memory. */
  withThreadLock<T>(_threadId: string, work: () => Promise<T>): Promise<T> {
    return work();
  }
  async close(): Promise<void> {}
}
