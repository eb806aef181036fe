// The one narrow interface between the conversation and any chat platform. bot/ never imports
// a platform library; adapters implement this.
import type { Prompt } from './prompts.js';
import type { SqlSession } from './thread-state.js';

export type FileKind = 'chart' | 'table' | 'sql' | 'digest';

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

export interface ThreadPort {
  /**
   * Posts in the thread and returns the platform's reference to the message. A platform kept in
   * the same database as the bot's state (the local channel on PostgreSQL) writes through
   * `session`, so the post commits with its key; the others ignore it.
   */
  post(threadId: string, post: OutgoingPost, session?: SqlSession): Promise<string>;
  /** Replaces the text of a message posted earlier (progress updated in place). */
  update(threadId: string, ref: string, text: string): Promise<void>;
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
  /**
   * The platform's id of the message, when it has one. A message whose id the audit log already
   * shows as received in this thread is not handled again (see the local channel's sweep).
   */
  messageId?: string;
}
