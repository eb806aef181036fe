// Messages a replica accepted (the API answered 201) but had not started handling when it died
// are in the shared thread log with no trace in the audit log: the bot's first write for a
// message it handles is its "request" or "message" entry, carrying the message's id. Every
// replica sweeps now and then and delivers such messages again; the bot checks the audit log
// under the thread's lock, so a message is handled once even if two replicas sweep it.
// Only a thread's trailing unhandled messages are delivered, and only once the newest of them
// is old enough that no live replica is still on its way to it: an earlier message read after a
// later one was answered would be read out of turn.
import type { IncomingMessage } from '../../bot/port.js';
import type { StateStore } from '../../bot/thread-state.js';
import { LOCAL_CHANNEL } from './local-api.js';
import { localBotThreadId } from './LocalChannel.js';
import type { LocalMessage, LocalThreadLog } from './local-thread-log.js';

export interface SweepOptions {
  threads: Pick<LocalThreadLog, 'personMessagesBetween'>;
  store: Pick<StateStore, 'listAudit'>;
  deliver: (msg: IncomingMessage) => void;
  now: Date;
  /** A message younger than this may still be on its way to the bot: its thread waits for the next sweep. */
  minAgeMs: number;
  /** Messages older than this are not looked at again. */
  maxAgeMs: number;
}

/** Delivers the unhandled messages found; returns how many. */
export async function sweepUnhandled(opts: SweepOptions): Promise<number> {
  const now = opts.now.getTime();
  const recent = await opts.threads.personMessagesBetween(new Date(now - opts.maxAgeMs).toISOString(), new Date(now + 1).toISOString());
  const byThread = new Map<string, LocalMessage[]>();
  for (const { threadId, message } of recent) byThread.set(threadId, [...(byThread.get(threadId) ?? []), message]);
  let delivered = 0;
  for (const [localId, messages] of byThread) {
    const threadId = localBotThreadId(localId);
    const received = new Set(
      (await opts.store.listAudit({ threadId })).filter((e) => e.kind === 'request' || e.kind === 'message').map((e) => e.detail.messageId),
    );
    const trailing: LocalMessage[] = [];
    for (let i = messages.length - 1; i >= 0 && !received.has(messages[i]!.id); i--) trailing.unshift(messages[i]!);
    const newest = trailing.at(-1);
    if (!newest || now - Date.parse(newest.createdAt) < opts.minAgeMs) continue;
    for (const m of trailing) {
      opts.deliver({ threadId, author: m.author, text: m.text, ...(m.label ? { label: m.label } : {}), channel: LOCAL_CHANNEL, messageId: m.id, redelivered: true });
      delivered++;
    }
  }
  return delivered;
}
