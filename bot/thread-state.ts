// Everything the bot remembers about one thread, as plain data so a store can persist it, and
// the store's interface.
import type { Brief } from './brief.js';
import type { Plan } from './plan.js';
import type { Prompt } from './prompts.js';
import type { Takeaway } from '../analysis/present/presenter.js';
import type { OutgoingPost } from './port.js';
import type { RerunSchedule } from './rerun-schedule.js';

export interface RunProgress {
  /** 1 for the first run; "rerun" starts the next, whose posts get fresh keys. */
  number: number;
  /** Sub-question ids whose answer (or failure) has been posted. */
  posted: string[];
  takeaways: (Takeaway & { position: number })[];
  failures: number;
  /**
   * How many times a process has taken the run up (absent: not yet). Each take-up posts a progress
   * message of its own: a process never edits one a stopped process left.
   */
  attempt?: number;
}

/** A post the conversation decided to make, kept with the state until it is known to be posted. */
export interface OutboxPost {
  key: string;
  /** Conversation posts carry no files. */
  post: Omit<OutgoingPost, 'key' | 'files'>;
  /** The key of an earlier post this one replaces in place (the brief card), not a new message. */
  edits?: string;
}

/** What every thread has, whatever its stage. */
export interface ThreadCommon {
  threadId: string;
  requester: string;
  /** The dataset the thread uses, chosen when it started (absent in states from before there were several: the first). */
  dataset?: string;
  /** The channel key the request came from ("local", "slack:C0123", ...). */
  channel?: string;
  brief: Brief;
  /** Counts posts so every post gets a fresh, stable key. */
  turn: number;
  /**
   * The posts of the last step, committed with the state: a process that stops after the commit
   * and before posting them posts them after its restart (each key once).
   */
  outbox?: OutboxPost[];
  /** When the bot last asked the requester something (ISO), for reminders. */
  waitingSince?: string;
  /** The turn at which a reminder was last sent, so each wait is reminded once. */
  remindedAtTurn?: number;
  deadlineWarned?: boolean;
  /** Plan items the requester dropped, by what they are (bot/card-edits.ts): kept out of rebuilt plans and reruns. */
  dropped?: string[];
  /** Reruns on a schedule the requester set on the finished thread (bot/rerun-schedule.ts). */
  schedule?: RerunSchedule;
  /** Follow-ups sent while a run was under way ("rerun it quarterly"): taken up in order once it finishes. */
  held?: string[];
  updatedAt: string;
}

/** Asking a clarifying question: `prompt` waits for its answer. */
export interface ClarifyingState extends ThreadCommon {
  stage: 'clarifying';
  prompt: Prompt;
}

/**
 * The brief card (what was read and assumed, with the plan) is posted and waits for "go", a
 * correction or "cancel"; corrections edit the card in place.
 */
export interface PlanningState extends ThreadCommon {
  stage: 'planning';
  plan: Plan;
  /** The card's post key, for edits in place (absent in states from before the card). */
  cardKey?: string;
}

/** The agreed plan runs; `run` says how far it got. */
export interface RunningState extends ThreadCommon {
  stage: 'running';
  plan: Plan;
  run: RunProgress;
}

export interface DoneState extends ThreadCommon {
  stage: 'done';
  plan: Plan;
  run: RunProgress;
}

/** Cancelled at any point: the plan and the run are there when it got that far. */
export interface CancelledState extends ThreadCommon {
  stage: 'cancelled';
  plan?: Plan;
  run?: RunProgress;
}

/**
 * Everything the bot remembers about one thread, keyed by stage. A new stage is one more member
 * here (and its label in replies.statusText); `enterStage` builds it from any other.
 */
export type ThreadState = ClarifyingState | PlanningState | RunningState | DoneState | CancelledState;
export type Stage = ThreadState['stage'];
export type StateAt<S extends Stage> = Extract<ThreadState, { stage: S }>;

// Every field of ThreadCommon, so a stage change keeps them all and drops the old stage's own
// (adding a common field without listing it here is a type error).
const COMMON_FIELDS = {
  threadId: true,
  requester: true,
  dataset: true,
  channel: true,
  brief: true,
  turn: true,
  outbox: true,
  waitingSince: true,
  remindedAtTurn: true,
  deadlineWarned: true,
  dropped: true,
  schedule: true,
  held: true,
  updatedAt: true,
} satisfies Record<keyof ThreadCommon, true>;

/** The fields every stage shares, without the stage's own. */
export function commonOf(state: ThreadCommon): ThreadCommon {
  const out: Record<string, unknown> = {};
  for (const key of Object.keys(COMMON_FIELDS)) {
    const value = (state as unknown as Record<string, unknown>)[key];
    if (value !== undefined) out[key] = value;
  }
  return out as unknown as ThreadCommon;
}

/** The thread moved to another stage: its common fields kept, the old stage's own fields dropped. */
export function enterStage<S extends ThreadState>(from: ThreadCommon, stage: Omit<S, keyof ThreadCommon>): S {
  return { ...commonOf(from), ...stage } as S;
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

export interface PostOnceOptions {
  /** The port writes the post in this store through the session it is given (the local channel kept with the state). */
  joined?: boolean;
  /**
   * The key was made by the step that posts it, after the state it follows from was written, so
   * nothing can be posted under it yet: a store that writes a joined post and its key together
   * may skip looking for it (the key's uniqueness still guards it).
   */
  fresh?: boolean;
}

/** A post to make once: its stable key, its thread, and what is recorded with it. */
export interface KeyedPost {
  key: string;
  threadId: string;
  audit: AuditEntry[];
  /** The thread's state after the post, written with its key (and written all the same when the key was posted before). */
  state?: ThreadState;
}

/** What one step of a thread changed, written together. */
export interface ThreadStep {
  audit: AuditEntry[];
  state?: ThreadState;
  /** Post keys to record with their platform references. */
  posts?: { key: string; threadId: string; ref: string }[];
}

/** Where threads and post keys are kept; the embedded store is a DuckDB file, the shared one PostgreSQL. */
export interface StateStore {
  /** Other processes share this store (replicas): the same message may reach two of them. */
  readonly shared: boolean;
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
  postOnce(post: KeyedPost, send: (session?: SqlSession) => Promise<string>, opts?: PostOnceOptions): Promise<string>;
  /** Runs `work` while no other process works on the thread (one-process stores need no lock). */
  withThreadLock<T>(threadId: string, work: () => Promise<T>): Promise<T>;
  /** A step of a thread, written together: post keys, audit entries (in order), then the state if given. */
  commit(step: ThreadStep): Promise<void>;
  /** Appends to the audit log (never rewritten). */
  appendAudit(entry: AuditEntry): Promise<void>;
  /** The audit log in the order it was written. */
  listAudit(filter?: AuditFilter): Promise<AuditEntry[]>;
  close(): Promise<void>;
}
