// The run queue shared by replicas, on pg-boss 10 (11 and later need Node 22). A run is one job
// whose id is derived from the thread and run number, so asking twice queues it once. A replica
// that dies mid-run leaves its job active; pg-boss's maintenance fails it once it is older than
// its expiry and a retry goes to whichever replica fetches next. The resumed run skips the
// answers already posted (their keys are recorded), so nothing is posted twice.
import PgBoss from 'pg-boss';
import { runJobId } from './run-job-id.js';
import type { RunHandler, RunQueue, RunRef } from './RunQueue.js';

export const RUN_QUEUE_NAME = 'threadcount-runs';

export interface PgBossRunQueueOptions {
  url: string;
  /** pg-boss keeps its tables in a schema of its own. */
  schema: string;
  /** Runs this process works on at once (one pg-boss worker each). */
  workers: number;
  /** A run still active after this long is taken to be lost with its process and is retried. */
  expireSeconds: number;
  /** Attempts after the first, for runs whose process died or whose run failed outright. */
  retries: number;
  /** How often one replica looks for expired runs (pg-boss maintenance). */
  checkSeconds: number;
  /** How often an idle worker asks for work (pg-boss allows 0.5 s and up). */
  pollSeconds: number;
  applicationName?: string;
  onError?: (err: Error) => void;
}

export class PgBossRunQueue implements RunQueue {
  private readonly workerIds: string[] = [];

  private constructor(
    private readonly boss: PgBoss,
    private readonly opts: PgBossRunQueueOptions,
  ) {}

  /** Connects, creates (or upgrades) pg-boss's schema and the run queue. */
  static async open(opts: PgBossRunQueueOptions): Promise<PgBossRunQueue> {
    const boss = new PgBoss({
      connectionString: opts.url,
      schema: opts.schema,
      application_name: opts.applicationName ?? 'threadcount-queue',
      max: Math.max(2, opts.workers + 1),
      supervise: true,
      maintenanceIntervalSeconds: opts.checkSeconds,
      // No cron schedules: the timekeeper would only poll for nothing.
      schedule: false,
    });
    boss.on('error', (err) => opts.onError?.(err));
    await boss.start();
    try {
      // Idempotent: the queue row is inserted with ON CONFLICT DO NOTHING.
      await boss.createQueue(RUN_QUEUE_NAME, { name: RUN_QUEUE_NAME, policy: 'standard' });
    } catch (err) {
      await boss.stop({ graceful: false, wait: true }).catch(() => undefined);
      throw err;
    }
    return new PgBossRunQueue(boss, opts);
  }

  async enqueue(run: RunRef): Promise<void> {
    // Expiry and retries go with each job, so a changed config applies to new runs at once.
    await this.boss.send(RUN_QUEUE_NAME, { threadId: run.threadId, number: run.number }, {
      id: runJobId(run),
      expireInSeconds: this.opts.expireSeconds,
      retryLimit: this.opts.retries,
      retryDelay: 0,
    });
    // Wake this process's idle workers rather than wait for their next poll.
    for (const id of this.workerIds) this.boss.notifyWorker(id);
  }

  async work(handler: RunHandler): Promise<void> {
    for (let i = 0; i < this.opts.workers; i++) {
      const id = await this.boss.work<RunRef>(RUN_QUEUE_NAME, { batchSize: 1, pollingIntervalSeconds: this.opts.pollSeconds }, async (jobs) => {
        for (const job of jobs) await handler({ threadId: job.data.threadId, number: job.data.number });
      });
      this.workerIds.push(id);
    }
  }

  async stop(): Promise<void> {
    // Runs under way get a few seconds; what is still active then is failed and retried elsewhere.
    await this.boss.stop({ graceful: true, wait: true, timeout: 10_000 });
  }
}
