// An audit-log entry for store tests: the same requester and channel, a given thread, time, kind and detail.
import type { AuditEntry } from '../../bot/thread-state.js';

export const auditEntry = (threadId: string, at: string, kind: AuditEntry['kind'], detail: Record<string, unknown>): AuditEntry => ({
  at,
  threadId,
  requester: 'maren',
  channel: 'slack:C1',
  kind,
  detail,
});
