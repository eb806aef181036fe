// Everything the bot remembers about one thread, as plain data so a store can persist it.
import type { Brief } from './brief.js';
import type { Plan } from './plan.js';
import type { Prompt } from './prompts.js';

export type Stage = 'clarifying' | 'planning' | 'running' | 'done' | 'cancelled';

export interface ThreadState {
  threadId: string;
  requester: string;
  stage: Stage;
  brief: Brief;
  /** The prompt waiting for an answer while clarifying. */
  prompt?: Prompt;
  plan?: Plan;
  /** Counts prompts and plan versions so every post gets a fresh, stable key. */
  turn: number;
}

export interface StateStore {
  get(threadId: string): Promise<ThreadState | undefined>;
  put(state: ThreadState): Promise<void>;
}

/** The in-process store; the persistent stores come with the conversation issue. */
export class MemoryStateStore implements StateStore {
  private readonly states = new Map<string, ThreadState>();
  async get(threadId: string): Promise<ThreadState | undefined> {
    const s = this.states.get(threadId);
    return s ? structuredClone(s) : undefined;
  }
  async put(state: ThreadState): Promise<void> {
    this.states.set(state.threadId, structuredClone(state));
  }
}
