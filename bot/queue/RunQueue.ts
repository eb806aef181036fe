// Where an agreed plan waits to be run. In one process the bot runs it at once; with replicas a
// queue in PostgreSQL hands each run to one of them, and to another if that one dies.

/** One run of a thread's plan: the thread and the run's number (1, then one more per rerun). */
export interface RunRef {
  threadId: string;
  number: number;
}

export type RunHandler = (run: RunRef) => Promise<void>;

export interface RunQueue {
  /** Asks for the run to be carried out; asking again for the same run adds nothing. */
  enqueue(run: RunRef): Promise<void>;
  /** Starts taking runs: `handler` resolves when the run is over, and a rejection is retried. */
  work(handler: RunHandler): Promise<void>;
  /** Stops taking runs; a run under way gets a grace period, then is left for another process. */
  stop(): Promise<void>;
}
