// The local channel's thread log: every thread's messages with their files, and a numbered log of
// events per thread so a page that reconnects gets exactly what it missed. Three implementations:
// in the embedded state file beside the bot's state (DuckDbThreadLog), in PostgreSQL so every
// replica's API and event streams show the same threads (PostgresThreadLog), and in memory for
// tests (LocalThreads). A bot post carries its key: posting a key again returns the message
// already made, so a post retried after a restart appears once.
import { randomBytes } from 'node:crypto';
import type { FileKind, OutgoingFile, OutgoingPost, PostControl } from '../../bot/port.js';
import type { SqlSession } from '../../bot/thread-state.js';
import { postControls, promptView, quickReplies, type PostContent, type PromptView, type QuickReply } from '../post-view.js';
import { postKind, stageOf, type PostKind, type ThreadStage } from './thread-stage.js';

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
  /** What the bot reads: typed words, or the value a click sent. */
  text: string;
  /** A click's choice as the requester saw it; the page shows it in place of `text`. */
  label?: string;
  prompt?: PromptView;
  quickReplies?: QuickReply[];
  /** The brief card's controls (a select per topic, a date). */
  controls?: PostControl[];
  /** What a bot post is (the brief card, a run's summary...), for the thread's stage; see thread-stage.ts. */
  kind?: PostKind;
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

/** A thread as the API shows it. */
export interface LocalThreadView {
  id: string;
  title: string;
  author: string;
  createdAt: string;
  messages: LocalMessage[];
}

export interface ThreadSummary {
  id: string;
  title: string;
  author: string;
  createdAt: string;
  updatedAt: string;
  messageCount: number;
  /** A bot message still waits for the requester's answer (see `openMessage`). */
  waiting: boolean;
  /** Where the request stands (see thread-stage.ts). */
  stage: ThreadStage;
}

export type LocalEventListener = (event: LocalEvent) => void;

export interface StoredFile {
  file: LocalFile;
  content: Buffer;
}

export interface LocalThreadLog {
  /** Kept in the bot's state store: bot posts can be written in the store's transaction. */
  readonly inStateStore: boolean;
  createThread(author: string, text: string): Promise<{ thread: { id: string }; message: LocalMessage }>;
  /** A message from a person; undefined when the thread does not exist. */
  addPersonMessage(threadId: string, author: string, text: string, label?: string): Promise<LocalMessage | undefined>;
  /**
   * The bot's post, or the message already made under its key; a thread unknown here (from before
   * the log kept it) is adopted. `session` joins the caller's transaction.
   */
  addBotPost(threadId: string, post: OutgoingPost, session?: SqlSession): Promise<LocalMessage>;
  /** Replaces a message's text, or with `post` all it shows (see `applyEdit`). */
  updateText(threadId: string, messageId: string, text: string, post?: PostContent): Promise<LocalMessage>;
  get(threadId: string): Promise<LocalThreadView | undefined>;
  /** Newest first. */
  list(): Promise<ThreadSummary[]>;
  /** People's messages created in [from, to) (ISO times), by thread and in thread order: for the sweep of unhandled ones. */
  personMessagesBetween(from: string, to: string): Promise<{ threadId: string; message: LocalMessage }[]>;
  /** An attachment of this thread's (none of another thread's, whatever its id). */
  file(threadId: string, id: string): Promise<StoredFile | undefined>;
  /** Events after `afterSeq`, then each new one, until the returned function is called; undefined for an unknown thread. */
  subscribe(threadId: string, afterSeq: number, listener: LocalEventListener): Promise<(() => void) | undefined>;
  close(): Promise<void>;
}

export function newId(): string {
  return randomBytes(9).toString('base64url');
}

export function titleOf(text: string): string {
  const line = text.trim().split('\n')[0] ?? '';
  return line.length > 80 ? `${line.slice(0, 77)}...` : line;
}

export function personMessage(author: string, text: string, at: string, label?: string): LocalMessage {
  return { id: newId(), author, fromBot: false, text, ...(label ? { label } : {}), files: [], createdAt: at };
}

/** The bot's post as a message, and its attachments to store beside it. */
export function botMessage(threadId: string, post: OutgoingPost, botName: string, at: string): { message: LocalMessage; files: StoredFile[] } {
  const files = (post.files ?? []).map((f) => storedFile(threadId, f));
  const kind = postKind(post.key);
  const message: LocalMessage = { id: newId(), author: botName, fromBot: true, text: post.text, ...interactive(post), ...(kind ? { kind } : {}), files: files.map((f) => f.file), createdAt: at };
  return { message, files };
}

/** What a post offers to click: a prompt, quick replies, controls (only those it has). */
function interactive(post: PostContent): Pick<LocalMessage, 'prompt' | 'quickReplies' | 'controls'> {
  const prompt = promptView(post);
  const replies = quickReplies(post);
  const controls = postControls(post);
  return { ...(prompt ? { prompt } : {}), ...(replies.length ? { quickReplies: replies } : {}), ...(controls.length ? { controls } : {}) };
}

/**
 * An edit in place: the text only (progress), or with `post` everything the message offers is
 * replaced too (the brief card after a correction; a post without controls leaves none). Files stay.
 */
export function applyEdit(message: LocalMessage, text: string, at: string, post?: PostContent): void {
  message.text = text;
  message.updatedAt = at;
  if (!post) return;
  delete message.prompt;
  delete message.quickReplies;
  delete message.controls;
  Object.assign(message, interactive({ ...post, text }));
}

/**
 * The bot message still waiting for an answer, if any: the newest one offering something to
 * click, unless a later reply from a person answered it (one of its options or quick replies,
 * typed or clicked). Informational messages after it (a reminder, help, status) do not close it,
 * and a card stays open while it has controls: the bot edits them away once it is agreed.
 * The page (app.js) applies the same rule.
 */
export function openMessage(messages: readonly LocalMessage[]): LocalMessage | undefined {
  let at = -1;
  for (let i = messages.length - 1; i >= 0 && at < 0; i--) if (messages[i]!.fromBot && offers(messages[i]!)) at = i;
  if (at < 0) return undefined;
  const m = messages[at]!;
  const answers = new Set([...(m.prompt?.options ?? []), ...(m.prompt ? [m.prompt.recommended] : []), ...(m.quickReplies ?? [])].map((o) => o.value.toLowerCase()));
  const said = (x: LocalMessage) => x.text.trim().toLowerCase();
  // A prompt of several takes "a, b"; a card is answered only by its Go or Cancel, not by a correction.
  const answered = messages.slice(at + 1).some((x) => !x.fromBot && (answers.has(said(x)) || (!!m.prompt && said(x).split(/\s*,\s*/).every((v) => answers.has(v)))));
  // A request cancelled after it waits for nothing.
  const cancelled = messages.slice(at + 1).some((x) => x.fromBot && x.kind === 'cancelled');
  return answered || cancelled ? undefined : m;
}

/** Whether a message offers something to click (a prompt, quick replies or controls). */
export function offers(m: LocalMessage): boolean {
  return Boolean(m.prompt || m.quickReplies?.length || m.controls?.length);
}

/** Where a thread list's tail may start: a bot message offering something to click or naming a stage (see summaryOf). */
export function startsTail(m: LocalMessage): boolean {
  return m.fromBot && (offers(m) || m.kind !== undefined);
}

/** A summary of a thread from its last messages: at least the last, and from the last one offering something to click or naming a stage. */
export function summaryOf(t: Omit<LocalThreadView, 'messages'>, messageCount: number, tail: readonly LocalMessage[]): ThreadSummary {
  const last = tail.at(-1);
  return {
    id: t.id,
    title: t.title,
    author: t.author,
    createdAt: t.createdAt,
    updatedAt: last?.updatedAt ?? last?.createdAt ?? t.createdAt,
    messageCount,
    waiting: openMessage(tail) !== undefined,
    stage: stageOf(tail),
  };
}

/** An attachment's address: under its thread, so only those who have the thread's link can fetch it. */
export function fileUrl(threadId: string, fileId: string): string {
  return `/api/threads/${encodeURIComponent(threadId)}/files/${encodeURIComponent(fileId)}`;
}

/** A message as the API shows it: attachment addresses in the current form (older rows kept another). */
export function withFileUrls(threadId: string, message: LocalMessage): LocalMessage {
  return message.files.length === 0 ? message : { ...message, files: message.files.map((f) => ({ ...f, url: fileUrl(threadId, f.id) })) };
}

function storedFile(threadId: string, f: OutgoingFile): StoredFile {
  const content = typeof f.content === 'string' ? Buffer.from(f.content, 'utf8') : f.content;
  const id = newId();
  const size = pngSize(content);
  const file: LocalFile = {
    id,
    name: f.name,
    kind: f.kind,
    contentType: contentTypeOf(f.name, f.kind),
    bytes: content.length,
    url: fileUrl(threadId, id),
    ...(size ?? {}),
  };
  return { file, content };
}

function contentTypeOf(name: string, kind: FileKind): string {
  if (kind === 'chart' || name.endsWith('.png')) return 'image/png';
  if (kind === 'table' || name.endsWith('.csv')) return 'text/csv; charset=utf-8';
  if (kind === 'sql' || name.endsWith('.sql')) return 'application/sql; charset=utf-8';
  if (kind === 'bundle' || name.endsWith('.zip')) return 'application/zip';
  return 'text/plain; charset=utf-8';
}

/** A PNG's width and height sit at fixed offsets in its first (IHDR) chunk. */
function pngSize(b: Buffer): { width: number; height: number } | null {
  const signature = '89504e470d0a1a0a';
  if (b.length < 24 || b.subarray(0, 8).toString('hex') !== signature) return null;
  return { width: b.readUInt32BE(16), height: b.readUInt32BE(20) };
}
