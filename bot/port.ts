// The one narrow interface between the conversation and any chat platform. bot/ never imports
// a platform library; adapters implement this.
import type { Prompt } from './prompts.js';

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
  files?: OutgoingFile[];
}

export interface ThreadPort {
  /** Posts in the thread and returns the platform's reference to the message. */
  post(threadId: string, post: OutgoingPost): Promise<string>;
  /** Replaces the text of a message posted earlier (progress updated in place). */
  update(threadId: string, ref: string, text: string): Promise<void>;
}

/** A message arriving in a thread: the request that opens it, or a reply. */
export interface IncomingMessage {
  threadId: string;
  author: string;
  text: string;
}
