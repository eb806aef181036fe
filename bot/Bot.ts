// The bot: request -> brief -> prompts -> plan -> run -> posts. Talks to chat only through
// ThreadPort, to data only through the Workspace, and keeps every step in the store so a
// restart resumes where it was. This file wires the parts; each has its own module:
// the conversation (Conversation), the runs (RunOrchestrator), the audit log (AuditLog),
// posting (Posting, Step) and the one serialisation of a thread's work (ThreadSerial).
import pLimit, { type LimitFunction } from 'p-limit';
import type { PhaseTimings } from '../analysis/phase-timings.js';
import type { SubQuestion } from '../analysis/types.js';
import type { Workspace } from '../analysis/workspace.js';
import type { AccessConfig } from '../config/schema.js';
import { AuditLog } from './AuditLog.js';
import { Conversation, type WaitTimings } from './Conversation.js';
import type { IncomingMessage, ThreadPort } from './port.js';
import { Posting } from './Posting.js';
import type { AnswerPresenter, SummaryPresenter } from './presenters.js';
import type { RunQueue, RunRef } from './queue/RunQueue.js';
import { isDue } from './rerun-schedule.js';
import { RunOrchestrator } from './RunOrchestrator.js';
import type { StepContext } from './Step.js';
import { ThreadDatasets } from './ThreadDatasets.js';
import { ThreadSerial } from './ThreadSerial.js';
import type { StateStore } from './thread-state.js';

export type { AnswerPresenter, DigestChart, PresentedPost, SummaryPresenter } from './presenters.js';
export type BotTimings = WaitTimings;

export interface BotDeps {
  /** The datasets the bot answers on, by dataset name (a config's datasets, opened). */
  workspaces?: ReadonlyMap<string, Workspace>;
  /** One dataset every channel may use: shorthand for `workspaces` with one entry and no `access`. */
  workspace?: Workspace;
  /** Which channels may use which datasets (the config's `access` section); absent, every channel may use all. */
  access?: AccessConfig;
  port: ThreadPort;
  store: StateStore;
  now: () => Date;
  presentAnswer: AnswerPresenter;
  presentSummary: SummaryPresenter;
  /** Shared across threads: bounds how many sub-questions compute at once. */
  jobs: LimitFunction;
  timings?: BotTimings;
  /** Collects the time each phase of a run takes (the benchmark passes one; absent, nothing is timed). */
  phases?: PhaseTimings;
  /** Called when a sub-question job starts, for tests that stop the process part-way. */
  onJobStart?: (threadId: string, sq: SubQuestion) => void;
  /**
   * Where agreed runs wait when several processes share the work (the caller starts its workers
   * with `runQueued`); absent, this process runs each at once.
   */
  queue?: RunQueue;
  /** Names this process in the audit log's run entries (e.g. "host:pid"). */
  replica?: string;
  /** Where errors that stop nothing but must not go unseen are written (default: stderr). */
  log?: (line: string) => void;
}

const DEFAULT_TIMINGS: BotTimings = { remindAfterMs: 4 * 3_600_000, deadlineWarningMs: 24 * 3_600_000 };

/**
 * Messages handled at once, across threads, in arrival order. A burst then gets its replies one
 * after another from the start, instead of every message advancing step by step through the one
 * state store and all of them replying at the end.
 */
const MESSAGES_AT_ONCE = 4;

export class Bot {
  private readonly serial: ThreadSerial;
  private readonly conversation: Conversation;
  private readonly runs: RunOrchestrator;
  private readonly handling = pLimit(MESSAGES_AT_ONCE);

  constructor(private readonly deps: BotDeps) {
    const given = deps.workspaces ?? (deps.workspace ? new Map([[deps.workspace.dataset.name, deps.workspace]]) : new Map<string, Workspace>());
    const datasets = new ThreadDatasets(given, deps.access);
    const audit = new AuditLog(deps.store, deps.now, deps.replica);
    const posting = new Posting(deps.port, deps.store, audit, deps.replica);
    const steps: StepContext = { store: deps.store, posting, audit, now: deps.now };
    this.serial = new ThreadSerial(deps.store);
    this.runs = new RunOrchestrator({
      store: deps.store,
      serial: this.serial,
      datasets,
      posting,
      audit,
      steps,
      now: deps.now,
      presentAnswer: deps.presentAnswer,
      presentSummary: deps.presentSummary,
      jobs: deps.jobs,
      ...(deps.phases ? { phases: deps.phases } : {}),
      ...(deps.onJobStart ? { onJobStart: deps.onJobStart } : {}),
      ...(deps.queue ? { queue: deps.queue } : {}),
      log: deps.log ?? ((line) => process.stderr.write(`${line}\n`)),
      afterRun: (threadId) => this.conversation.takeHeld(threadId),
    });
    this.conversation = new Conversation({ store: deps.store, datasets, steps, now: deps.now, launch: (state) => this.runs.launch(state) });
  }

  /** Messages in one thread are handled one at a time, in the order given; runs go on in the background. */
  handle(msg: IncomingMessage): Promise<void> {
    return this.serial.run(msg.threadId, () => this.handling(() => this.conversation.handle(msg)));
  }

  /**
   * After a restart: the posts each thread's last step decided and may not have made are made
   * (each key once), then every run that was under way carries on (with a queue: is queued).
   */
  async resume(): Promise<void> {
    for (const listed of await this.deps.store.list()) {
      if (listed.outbox?.length) await this.serial.run(listed.threadId, () => this.conversation.finishPosting(listed.threadId));
    }
    await this.runs.resume();
  }

  /** The process is stopping: runs take no new sub-question and are left to be resumed after a restart. */
  stop(): void {
    this.runs.stop();
  }

  /** A queue worker's handler: carries out the run if it is still the thread's current one. */
  runQueued(ref: RunRef): Promise<void> {
    return this.runs.runQueued(ref);
  }

  /** Resolves when every run started so far has finished; rejects if one of them failed. */
  idle(): Promise<void> {
    return this.runs.idle();
  }

  /** Periodic check: remind a requester who has not answered, warn when a deadline nears unagreed, start scheduled reruns that are due. */
  async tick(): Promise<void> {
    const now = this.deps.now().getTime();
    const t = this.deps.timings ?? DEFAULT_TIMINGS;
    for (const listed of await this.deps.store.list({ stages: ['clarifying', 'planning'] })) {
      await this.serial.run(listed.threadId, () => this.conversation.checkWaiting(listed.threadId, now, t));
    }
    // Finished threads whose scheduled rerun is due (checked again under the thread's lock).
    const at = new Date(now);
    for (const listed of await this.deps.store.list({ stages: ['done', 'cancelled'] })) {
      if (isDue(listed.schedule, at)) await this.serial.run(listed.threadId, () => this.conversation.runDue(listed.threadId, at));
      // A process stopped between a run's end and taking up what it held: taken up now.
      if (listed.held?.length) await this.serial.run(listed.threadId, () => this.conversation.takeHeld(listed.threadId));
    }
  }
}
