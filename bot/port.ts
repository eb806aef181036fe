// The one narrow interface between the conversation and any chat platform. bot/ never imports
// a platform library; adapters implement this.
import type { Prompt } from './prompts.js';
import type { SqlSession } from './thread-state.js';

/** What a posted file holds; 'bundle' is the zip of a whole thread's files (bot/thread-bundle.ts). */
export type FileKind = 'chart' | 'table' | 'sql' | 'digest' | 'bundle';

/** The folder a file of each kind goes in, wherever a thread's files are laid out together (a folder, the zip). */
export const FOLDER_OF_KIND: Record<FileKind, string> = { chart: 'charts', table: 'tables', sql: 'sql', digest: '.', bundle: '.' };

export interface OutgoingFile {
  name: string;
  kind: FileKind;
  content: Buffer | string;
}

export interface OutgoingPost {
  /** Stable per thread: a retried step reuses its key, and the bot skips a key already posted. */
  key: string;
  text: string;
  prompt?: Prompt;
  /** With a prompt: what the bot says before asking (e.g. why the last answer was not read). */
  promptLead?: string;
  /** One-click replies a platform may show as buttons (e.g. "go" and "cancel" under the plan). */
  quickReplies?: QuickReply[];
  /**
   * Controls a platform may show with the post (the brief card's: a select per topic, a date for
   * the deadline). Choosing sends the choice's value as if typed; the post stays, and the bot
   * edits it in place with what changed.
   */
  controls?: PostControl[];
  files?: OutgoingFile[];
  /**
   * The answer as monospace text, most detailed first (a table's rows). A platform shows the first
   * that fits its message limits under the text, or none; the files carry the same in full.
   */
  monospace?: string[];
}

export interface QuickReply {
  /** What the click sends, as if typed. */
  value: string;
  label: string;
  primary: boolean;
}

/** One control of a post: a list to pick one from, or a date. */
export interface PostControl {
  /** What the control sets ("audience", "grain", "period", "breakdowns", "deadline"): unique in its post. */
  topic: string;
  /** Its name as shown ("Audience"). */
  label: string;
  kind: 'select' | 'date';
  /** A select's choices; each sends its value, as if typed. Empty for a date. */
  choices: { value: string; label: string }[];
  /** The choice in force: a select's value, or a date's ISO day. */
  current?: string;
  /** For a date: the words sent, with the chosen ISO day in place of "{date}" ("deadline {date}"). */
  sends?: string;
}

export interface ThreadPort {
  /**
   * Posts in the thread and returns the platform's reference to the message. A platform kept in
   * the same database as the bot's state (the local channel on PostgreSQL) writes through
   * `session`, so the post commits with its key; the others ignore it.
   */
  post(threadId: string, post: OutgoingPost, session?: SqlSession): Promise<string>;
  /**
   * Replaces a message posted earlier: only its text (progress updated in place), or, with `post`,
   * the whole of it, controls and quick replies included (the brief card after a correction; a
   * post without controls leaves none).
   */
  update(threadId: string, ref: string, text: string, post?: Omit<OutgoingPost, 'key' | 'files'>): Promise<void>;
  /**
   * True when the port keeps this thread's posts in the bot's state store and writes them through
   * the session `post` is given (the local channel): the store then writes the post and its key in
   * one transaction. Absent or false for a port that calls out to a platform.
   */
  joinsState?(threadId: string): boolean;
}

/** A message arriving in a thread: the request that opens it, or a reply. */
export interface IncomingMessage {
  threadId: string;
  author: string;
  text: string;
  /**
   * The channel the thread lives in, which decides the datasets it may use (the config's
   * `access` rules): "local", "slack:<channel id>", "discord:<guild id>:<channel id>".
   * Absent, it is read from the thread id (see bot/access.ts).
   */
  channel?: string;
  /** The platform's id of the message, when it has one (the audit log records it). */
  messageId?: string;
  /**
   * For a click: the label the requester chose, which the thread shows as their reply; `text`
   * holds the value the bot reads.
   */
  label?: string;
  /**
   * Delivered again by a sweep for messages accepted and never handled (see the local channel's
   * sweep): handled only if the audit log does not show its id as received in the thread.
   */
  redelivered?: boolean;
}
