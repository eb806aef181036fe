// The local channel's threads, kept in memory for the page: every message with its files, and a
// numbered log of events per thread so a page that reconnects gets exactly what it missed.
// The bot's own state lives in its store; after a restart this starts empty.
import { randomBytes } from 'node:crypto';
import type { FileKind, OutgoingFile, OutgoingPost } from '../../bot/port.js';
import { promptView, quickReplies, type PromptView, type QuickReply } from '../post-view.js';

export interface LocalFile {
  id: string;
  name: string;
  kind: FileKind;
  contentType: string;
  bytes: number;
  url: string;
  /** Pixel size of a PNG, so the page can reserve its space before it loads. */
  width?: number;
  height?: number;
}

export interface LocalMessage {
  id: string;
  author: string;
  fromBot: boolean;
  text: string;
  prompt?: PromptView;
  quickReplies?: QuickReply[];
  files: LocalFile[];
  createdAt: string;
  updatedAt?: string;
}

export type LocalEventType = 'message.created' | 'message.updated';

export interface LocalEvent {
  seq: number;
  type: LocalEventType;
  message: LocalMessage;
}

export interface LocalThread {
  id: string;
  title: string;
  author: string;
  createdAt: string;
  messages: LocalMessage[];
  events: LocalEvent[];
}

export interface ThreadSummary {
  id: string;
  title: string;
  author: string;
  createdAt: string;
  updatedAt: string;
  messageCount: number;
  /** The last message asks the requester something. */
  waiting: boolean;
}

type Listener = (event: LocalEvent) => void;

export class LocalThreads {
  private readonly threads = new Map<string, LocalThread>();
  private readonly files = new Map<string, { file: LocalFile; content: Buffer }>();
  private readonly listeners = new Map<string, Set<Listener>>();

  constructor(
    private readonly botName: string,
    private readonly now: () => Date = () => new Date(),
  ) {}

  createThread(author: string, text: string): { thread: LocalThread; message: LocalMessage } {
    const thread: LocalThread = { id: newId(), title: titleOf(text), author, createdAt: this.stamp(), messages: [], events: [] };
    this.threads.set(thread.id, thread);
    return { thread, message: this.addPersonMessage(thread.id, author, text)! };
  }

  /** A message from a person; undefined when the thread does not exist. */
  addPersonMessage(threadId: string, author: string, text: string): LocalMessage | undefined {
    const thread = this.threads.get(threadId);
    if (!thread) return undefined;
    return this.append(thread, { id: newId(), author, fromBot: false, text, files: [], createdAt: this.stamp() });
  }

  addBotPost(threadId: string, post: OutgoingPost): LocalMessage {
    // A thread from before a restart is unknown here; the bot may still post in it (resume).
    const thread = this.threads.get(threadId) ?? this.adoptThread(threadId);
    const prompt = promptView(post);
    const replies = quickReplies(post);
    return this.append(thread, {
      id: newId(),
      author: this.botName,
      fromBot: true,
      text: post.text,
      ...(prompt ? { prompt } : {}),
      ...(replies.length ? { quickReplies: replies } : {}),
      files: (post.files ?? []).map((f) => this.addFile(f)),
      createdAt: this.stamp(),
    });
  }

  updateText(threadId: string, messageId: string, text: string): LocalMessage {
    const thread = this.threads.get(threadId);
    const message = thread?.messages.find((m) => m.id === messageId);
    if (!thread || !message) throw new Error(`no message ${messageId} in local thread ${threadId}`);
    message.text = text;
    message.updatedAt = this.stamp();
    this.emit(thread, 'message.updated', message);
    return message;
  }

  get(threadId: string): LocalThread | undefined {
    return this.threads.get(threadId);
  }

  list(): ThreadSummary[] {
    return [...this.threads.values()]
      .map((t) => {
        const last = t.messages.at(-1);
        return {
          id: t.id,
          title: t.title,
          author: t.author,
          createdAt: t.createdAt,
          updatedAt: last?.updatedAt ?? last?.createdAt ?? t.createdAt,
          messageCount: t.messages.length,
          waiting: Boolean(last?.fromBot && (last.prompt || last.quickReplies)),
        };
      })
      .sort((a, b) => b.createdAt.localeCompare(a.createdAt));
  }

  file(id: string): { file: LocalFile; content: Buffer } | undefined {
    return this.files.get(id);
  }

  /** Events after `afterSeq`, then each new one, until the returned function is called. */
  subscribe(threadId: string, afterSeq: number, listener: Listener): () => void {
    const thread = this.threads.get(threadId);
    if (!thread) throw new Error(`no local thread ${threadId}`);
    for (const e of thread.events) if (e.seq > afterSeq) listener(e);
    const set = this.listeners.get(threadId) ?? new Set<Listener>();
    set.add(listener);
    this.listeners.set(threadId, set);
    return () => set.delete(listener);
  }

  private adoptThread(threadId: string): LocalThread {
    const thread: LocalThread = { id: threadId, title: 'An earlier request', author: '', createdAt: this.stamp(), messages: [], events: [] };
    this.threads.set(threadId, thread);
    return thread;
  }

  private append(thread: LocalThread, message: LocalMessage): LocalMessage {
    thread.messages.push(message);
    this.emit(thread, 'message.created', message);
    return message;
  }

  private emit(thread: LocalThread, type: LocalEventType, message: LocalMessage): void {
    // A snapshot: a later update must not change what an earlier event said.
    const event: LocalEvent = { seq: thread.events.length + 1, type, message: structuredClone(message) };
    thread.events.push(event);
    for (const l of this.listeners.get(thread.id) ?? []) l(event);
  }

  private addFile(f: OutgoingFile): LocalFile {
    const content = typeof f.content === 'string' ? Buffer.from(f.content, 'utf8') : f.content;
    const id = newId();
    const size = pngSize(content);
    const file: LocalFile = {
      id,
      name: f.name,
      kind: f.kind,
      contentType: contentTypeOf(f.name, f.kind),
      bytes: content.length,
      url: `/api/files/${id}`,
      ...(size ?? {}),
    };
    this.files.set(id, { file, content });
    return file;
  }

  private stamp(): string {
    return this.now().toISOString();
  }
}

function newId(): string {
  return randomBytes(9).toString('base64url');
}

function titleOf(text: string): string {
  const line = text.trim().split('\n')[0] ?? '';
  return line.length > 80 ? `${line.slice(0, 77)}...` : line;
}

function contentTypeOf(name: string, kind: FileKind): string {
  if (kind === 'chart' || name.endsWith('.png')) return 'image/png';
  if (kind === 'table' || name.endsWith('.csv')) return 'text/csv; charset=utf-8';
  if (kind === 'sql' || name.endsWith('.sql')) return 'application/sql; charset=utf-8';
  return 'text/plain; charset=utf-8';
}

/** A PNG's width and height sit at fixed offsets in its first (IHDR) chunk. */
function pngSize(b: Buffer): { width: number; height: number } | null {
  const signature = '89504e470d0a1a0a';
  if (b.length < 24 || b.subarray(0, 8).toString('hex') !== signature) return null;
  return { width: b.readUInt32BE(16), height: b.readUInt32BE(20) };
}
