// What every chat platform adapter offers: the ThreadPort the bot posts through, plus start and
// stop. Incoming messages go the other way, through a Deliver function that returns at once, so
// an adapter can acknowledge its platform before the bot does any work.
import type { IncomingMessage, ThreadPort } from '../bot/port.js';

export type Deliver = (msg: IncomingMessage) => void;

export interface ChatAdapter extends ThreadPort {
  /** Short name for logs ("slack", "discord", "local"). */
  readonly name: string;
  /** True for the thread ids this adapter made (each adapter prefixes its own). */
  owns(threadId: string): boolean;
  start(): Promise<void>;
  stop(): Promise<void>;
}

/** Whether the bot already has a conversation in this thread (a reply elsewhere is ignored). */
export type KnownThread = (threadId: string) => Promise<boolean>;
