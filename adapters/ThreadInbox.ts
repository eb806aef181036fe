// Hands incoming messages to the bot one at a time per thread, in arrival order, without making
// the platform wait: deliver() returns at once. Threads run side by side; a failure is logged
// and does not block the thread's next message.
import type { IncomingMessage } from '../bot/port.js';

export type MessageHandler = (msg: IncomingMessage) => Promise<void>;

export class ThreadInbox {
  private readonly tails = new Map<string, Promise<void>>();

  constructor(
    private readonly handler: MessageHandler,
    private readonly onError: (err: unknown, msg: IncomingMessage) => void,
  ) {}

  readonly deliver = (msg: IncomingMessage): void => {
    const before = this.tails.get(msg.threadId) ?? Promise.resolve();
    const tail = before
      .then(() => this.handler(msg))
      .catch((err: unknown) => this.onError(err, msg))
      .finally(() => {
        if (this.tails.get(msg.threadId) === tail) this.tails.delete(msg.threadId);
      });
    this.tails.set(msg.threadId, tail);
  };

  /** Resolves when every message delivered so far has been handled. */
  async idle(): Promise<void> {
    while (this.tails.size > 0) await Promise.all([...this.tails.values()]);
  }
}
