// The one place a thread's work is serialised, so a message, a reminder check and a run step
// never interleave on its state: in this process by a promise chain per thread (in call order),
// across processes by the store's thread lock.
import type { StateStore } from './thread-state.js';

export class ThreadSerial {
  private readonly tails = new Map<string, Promise<unknown>>();

  constructor(private readonly store: Pick<StateStore, 'withThreadLock'>) {}

  /** Runs `work` after everything queued for the thread before it; the queue is taken at call time. */
  run<T>(threadId: string, work: () => Promise<T>): Promise<T> {
    const prior = this.tails.get(threadId) ?? Promise.resolve();
    const locked = () => this.store.withThreadLock(threadId, work);
    const next = prior.then(locked, locked);
    const settled = next.then(
      () => undefined,
      () => undefined,
    );
    this.tails.set(threadId, settled);
    void settled.then(() => {
      if (this.tails.get(threadId) === settled) this.tails.delete(threadId);
    });
    return next;
  }

  /** Resolves when all work queued so far (on every thread) has settled. */
  async idle(): Promise<void> {
    while (this.tails.size > 0) await Promise.all([...this.tails.values()]);
  }
}
