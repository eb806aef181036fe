// Everything the bot remembers about one thread, as plain data so a store can persist it.
import type { Brief } from './brief.js';
import type { Plan } from './plan.js';
import type { Prompt } from './prompts.js';
import type { Takeaway } from '../analysis/present/presenter.js';

export type Stage = 'clarifying' | 'planning' | 'running' | 'done' | 'cancelled';

export interface RunProgress {
  /** 1 for the first run; "rerun" starts the next, whose posts get fresh keys. */
  number: number;
  /** Sub-question ids whose answer (or failure) has been posted. */
  posted: string[];
  takeaways: (Takeaway & { position: number })[];
  failures: number;
}

export interface ThreadState {
  threadId: string;
  requester: string;
  /** The dataset the thread uses, chosen when it started (absent in states from before there were several: the first). */
  dataset?: string;
  /** The channel key the request came from ("local", "slack:C0123", ...). */
  channel?: string;
  stage: Stage;
  brief: Brief;
  /** The prompt waiting for an answer while clarifying. */
  prompt?: Prompt;
  plan?: Plan;
  run?: RunProgress;
  /** Counts posts so every post gets a fresh, stable key. */
  turn: number;
  /** When the bot last asked the requester something (ISO), for reminders. */
  waitingSince?: string;
  /** The turn at which a reminder was last sent, so each wait is reminded once. */
  remindedAtTurn?: number;
  deadlineWarned?: boolean;
  updatedAt: string;
}

export const AUDIT_KINDS = ['request', 'message', 'sql', 'post', 'denied', 'run'] as const;
export type AuditKind = (typeof AUDIT_KINDS)[number];

/**
 * One line of the audit log: who asked what, which SQL ran, what was posted, what was refused.
 * `detail` by kind: request/message `{ text }` (a request also `{ dataset }`); sql `{ subQuestion,
 * template, query, sql, params, dataset }`; post `{ key, text, files }`; denied `{ reason, text, ... }`;
 * run `{ event: 'started' | 'finished', number, replica }` (replica: the process that ran it).
 */
export interface AuditEntry {
  /** ISO timestamp. */
  at: string;
  threadId: string;
  /** Who asked: the message's author, or the thread's requester for what the bot did. */
  requester: string;
  channel: string;
  kind: AuditKind;
  detail: Record<string, unknown>;
}

export interface AuditFilter {
  threadId?: string;
  /** Entries at or after this ISO date or timestamp. */
  since?: string;
}

/** A database session a platform write can join, so that a post and its key commit together. */
export interface SqlSession {
  query(text: string, values?: unknown[]): Promise<{ rows: Record<string, unknown>[] }>;
}

/** A post to make once: its stable key, its thread, and the audit entries recorded with it. */
export interface KeyedPost {
  key: string;
  threadId: string;
  audit: AuditEntry[];
}

/** Where threads and post keys are kept; the embedded store is a DuckDB file, the shared one PostgreSQL. */
export interface StateStore {
  get(threadId: string): Promise<ThreadState | undefined>;
  put(state: ThreadState): Promise<void>;
  list(filter?: { stages?: Stage[]; requester?: string }): Promise<ThreadState[]>;
  /** The platform reference of a post already made under this key, if any. */
  postRef(key: string): Promise<string | undefined>;
  recordPost(key: string, threadId: string, ref: string): Promise<void>;
  /**
   * Sends a post unless one is already recorded under its key, then records the key and the audit
   * entries; returns the platform reference either way. The PostgreSQL store does it in one
   * transaction and hands `send` that transaction's session: a platform that writes through it
   * (the local channel on PostgreSQL) posts exactly once; one that cannot posts at least once.
   */
  postOnce(post: KeyedPost, send: (session?: SqlSession) => Promise<string>): Promise<string>;
  /** Runs `work` while no other process works on the thread (one-process stores need no lock). */
  withThreadLock<T>(threadId: string, work: () => Promise<T>): Promise<T>;
  /** Appends to the audit log (never rewritten). */
  appendAudit(entry: AuditEntry): Promise<void>;
  /** The audit log in the order it was written. */
  listAudit(filter?: AuditFilter): Promise<AuditEntry[]>;
  close(): Promise<void>;
}
