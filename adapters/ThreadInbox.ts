// Hands incoming messages to the bot without making the platform wait: deliver() returns at
// once. The bot serialises each thread's work itself (in the order messages are handed to it),
// so the inbox only starts the handling, logs a failure, and knows what is still in flight.
import type { IncomingMessage } from '../bot/port.js';

export type MessageHandler = (msg: IncomingMessage) => Promise<void>;

export class ThreadInbox {
  private readonly inFlight = new Set<Promise<void>>();

  constructor(
    private readonly handler: MessageHandler,
    private readonly onError: (err: unknown, msg: IncomingMessage) => void,
  ) {}

  readonly deliver = (msg: IncomingMessage): void => {
    // Called now, not after a microtask: the handler takes the message's place in its thread's queue in arrival order.
    let handling: Promise<void>;
    try {
      handling = this.handler(msg);
    } catch (err) {
      handling = Promise.reject(err);
    }
    const done = handling
      .catch((err: unknown) => this.onError(err, msg))
      .finally(() => {
        this.inFlight.delete(done);
      });
    this.inFlight.add(done);
  };

  /** Resolves when every message delivered so far has been handled. */
  async idle(): Promise<void> {
    while (this.inFlight.size > 0) await Promise.all([...this.inFlight]);
  }
}
