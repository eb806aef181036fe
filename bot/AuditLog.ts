// The audit log's entries as the bot writes them: who (the thread, the person, the channel),
// what kind, and the detail. Entries are built here and written by the store, alone or with the
// step or post they belong to.
import { channelKey } from './access.js';
import type { AuditEntry, AuditKind, StateStore, ThreadCommon } from './thread-state.js';

/** Who an audit entry or a post is for: the thread, the person asking and their channel. */
export interface Who {
  threadId: string;
  requester: string;
  channel: string;
}

/** The thread's own "who": its requester and channel. */
export function whoOf(state: Pick<ThreadCommon, 'threadId' | 'requester' | 'channel'>): Who {
  return { threadId: state.threadId, requester: state.requester, channel: state.channel ?? channelKey({ threadId: state.threadId }) };
}

export class AuditLog {
  constructor(
    private readonly store: Pick<StateStore, 'appendAudit'>,
    private readonly now: () => Date,
    /** Names this process in run entries (e.g. "host:pid"). */
    private readonly replica?: string,
  ) {}

  entry(who: Who, kind: AuditKind, detail: Record<string, unknown>): AuditEntry {
    return { at: this.now().toISOString(), ...who, kind, detail };
  }

  /** A run entry: started (each time a process takes the run up) or finished (once). */
  runEntry(who: Who, event: 'started' | 'finished', number: number): AuditEntry {
    return this.entry(who, 'run', { event, number, ...(this.replica ? { replica: this.replica } : {}) });
  }

  /** Writes one entry on its own (most entries go with the step or post they belong to). */
  async append(who: Who, kind: AuditKind, detail: Record<string, unknown>): Promise<void> {
    await this.store.appendAudit(this.entry(who, kind, detail));
  }
}
