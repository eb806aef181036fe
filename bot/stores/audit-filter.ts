// The audit filter both stores apply: one thread, and entries at or after a moment.
import type { AuditEntry, AuditFilter } from '../thread-state.js';

export function auditMatches(e: AuditEntry, f: AuditFilter): boolean {
  // ISO timestamps compare as text; a bare date ("2026-12-01") sorts before that day's times.
  return (f.threadId === undefined || e.threadId === f.threadId) && (f.since === undefined || e.at >= f.since);
}
