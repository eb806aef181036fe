// The local channel's threads in memory, for tests and one-shot use: after a restart this starts
// empty. `serve` keeps them in its state store (DuckDbThreadLog, PostgresThreadLog).
import type { OutgoingPost } from '../../bot/port.js';
import type { PostContent } from '../post-view.js';
import {
  applyEdit,
  botMessage,
  newId,
  personMessage,
  summaryOf,
  titleOf,
  type LocalEvent,
  type LocalEventListener,
  type LocalEventType,
  type LocalMessage,
  type LocalThreadLog,
  type LocalThreadView,
  type StoredFile,
  type ThreadSummary,
} from './local-thread-log.js';

export type { LocalEvent, LocalEventType, LocalFile, LocalMessage, ThreadSummary } from './local-thread-log.js';

interface LocalThread extends LocalThreadView {
  events: LocalEvent[];
}

export class LocalThreads implements LocalThreadLog {
  readonly inStateStore = false;
  private readonly threads = new Map<string, LocalThread>();
  private readonly files = new Map<string, StoredFile & { threadId: string }>();
  /** Post key -> message id, so a post made again returns the message already made. */
  private readonly byKey = new Map<string, string>();
  private readonly listeners = new Map<string, Set<LocalEventListener>>();

  constructor(
    private readonly botName: string,
    private readonly now: () => Date = () => new Date(),
  ) {}

  async createThread(author: string, text: string): Promise<{ thread: { id: string }; message: LocalMessage }> {
    const thread: LocalThread = { id: newId(), title: titleOf(text), author, createdAt: this.stamp(), messages: [], events: [] };
    this.threads.set(thread.id, thread);
    return { thread, message: this.append(thread, personMessage(author, text, this.stamp())) };
  }

  async addPersonMessage(threadId: string, author: string, text: string, label?: string): Promise<LocalMessage | undefined> {
    const thread = this.threads.get(threadId);
    return thread ? this.append(thread, personMessage(author, text, this.stamp(), label)) : undefined;
  }

  async addBotPost(threadId: string, post: OutgoingPost): Promise<LocalMessage> {
    // A thread from before a restart is unknown here; the bot may still post in it (resume).
    const thread = this.threads.get(threadId) ?? this.adoptThread(threadId);
    const made = thread.messages.find((m) => m.id === this.byKey.get(`${threadId}\n${post.key}`));
    if (made) return structuredClone(made);
    const { message, files } = botMessage(threadId, post, this.botName, this.stamp());
    for (const f of files) this.files.set(f.file.id, { ...f, threadId });
    this.byKey.set(`${threadId}\n${post.key}`, message.id);
    return this.append(thread, message);
  }

  async updateText(threadId: string, messageId: string, text: string, post?: PostContent): Promise<LocalMessage> {
    const thread = this.threads.get(threadId);
    const message = thread?.messages.find((m) => m.id === messageId);
    if (!thread || !message) throw new Error(`no message ${messageId} in local thread ${threadId}`);
    applyEdit(message, text, this.stamp(), post);
    this.emit(thread, 'message.updated', message);
    return structuredClone(message);
  }

  async get(threadId: string): Promise<LocalThreadView | undefined> {
    const t = this.threads.get(threadId);
    if (!t) return undefined;
    const { events: _events, ...view } = t;
    return structuredClone(view);
  }

  async list(): Promise<ThreadSummary[]> {
    return [...this.threads.values()].map((t) => summaryOf(t, t.messages.length, t.messages)).sort((a, b) => b.createdAt.localeCompare(a.createdAt));
  }

  async personMessagesBetween(from: string, to: string): Promise<{ threadId: string; message: LocalMessage }[]> {
    return [...this.threads.values()].flatMap((t) =>
      t.messages.filter((m) => !m.fromBot && m.createdAt >= from && m.createdAt < to).map((m) => ({ threadId: t.id, message: structuredClone(m) })),
    );
  }

  async file(threadId: string, id: string): Promise<StoredFile | undefined> {
    const f = this.files.get(id);
    return f && f.threadId === threadId ? { file: f.file, content: f.content } : undefined;
  }

  async subscribe(threadId: string, afterSeq: number, listener: LocalEventListener): Promise<(() => void) | undefined> {
    const thread = this.threads.get(threadId);
    if (!thread) return undefined;
    for (const e of thread.events) if (e.seq > afterSeq) listener(e);
    const set = this.listeners.get(threadId) ?? new Set<LocalEventListener>();
    set.add(listener);
    this.listeners.set(threadId, set);
    return () => set.delete(listener);
  }

  async close(): Promise<void> {}

  private adoptThread(threadId: string): LocalThread {
    const thread: LocalThread = { id: threadId, title: 'An earlier request', author: '', createdAt: this.stamp(), messages: [], events: [] };
    this.threads.set(threadId, thread);
    return thread;
  }

  private append(thread: LocalThread, message: LocalMessage): LocalMessage {
    thread.messages.push(message);
    this.emit(thread, 'message.created', message);
    return structuredClone(message);
  }

  private emit(thread: LocalThread, type: LocalEventType, message: LocalMessage): void {
    // A snapshot: a later update must not change what an earlier event said.
    const event: LocalEvent = { seq: thread.events.length + 1, type, message: structuredClone(message) };
    thread.events.push(event);
    for (const l of this.listeners.get(thread.id) ?? []) l(event);
  }

  private stamp(): string {
    return this.now().toISOString();
  }
}
