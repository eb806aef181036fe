// `threadcount audit`: the audit log of a served bot (who asked what, which SQL ran, what was
// posted, what was refused) as JSON lines, oldest first, read from the state file.
import { DuckDbStateStore } from '../bot/stores/DuckDbStateStore.js';
import type { AuditEntry, AuditFilter } from '../bot/thread-state.js';

export interface AuditOptions {
  statePath: string;
  threadId?: string;
  /** An ISO date (YYYY-MM-DD) or timestamp; entries at or after it. */
  since?: string;
}

export class AuditUsageError extends Error {}

/** "2026-12-01" stays a date (it sorts before that day's entries); a timestamp is normalised to UTC ISO. */
export function normaliseSince(text: string): string {
  const t = text.trim();
  const date = /^(\d{4})-(\d{2})-(\d{2})$/.exec(t);
  if (date) {
    const d = new Date(Date.UTC(Number(date[1]), Number(date[2]) - 1, Number(date[3])));
    if (d.toISOString().slice(0, 10) !== t) throw new AuditUsageError(`--since ${t} is not a real date`);
    return t;
  }
  const ms = /^\d{4}-\d{2}-\d{2}T/.test(t) ? Date.parse(t) : Number.NaN;
  if (!Number.isFinite(ms)) throw new AuditUsageError(`--since must be a date like 2026-12-01 or a timestamp like 2026-12-01T09:00:00Z (got "${text}")`);
  return new Date(ms).toISOString();
}

export async function readAudit(opts: AuditOptions): Promise<AuditEntry[]> {
  const filter: AuditFilter = {};
  if (opts.threadId !== undefined) filter.threadId = opts.threadId;
  if (opts.since !== undefined) filter.since = normaliseSince(opts.since);
  const store = await DuckDbStateStore.open(opts.statePath, { readOnly: true });
  try {
    return await store.listAudit(filter);
  } finally {
    await store.close();
  }
}

/** One JSON object per line, keys in a fixed order. */
export function auditLines(entries: readonly AuditEntry[]): string {
  return entries.map((e) => `${JSON.stringify({ at: e.at, threadId: e.threadId, requester: e.requester, channel: e.channel, kind: e.kind, detail: e.detail })}\n`).join('');
}
