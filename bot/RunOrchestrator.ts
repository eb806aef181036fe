// Runs agreed plans: each sub-question computes through the shared job queue and its post goes
// out in plan order as it is ready, then the summary. Runs go on in the background; with a queue
// shared by several processes they are queued and any process takes them up. A run taken up again
// (after a restart, or by another replica) skips what was posted and posts a progress message of
// its own. Every error is logged and said in the thread; an answer that fails does not stop the
// others.
import type { LimitFunction } from 'p-limit';
import { answerWithSmallerPlanOnFailure, resourceFailure } from '../analysis/smaller-plan.js';
import { timePhase, type PhaseTimings } from '../analysis/phase-timings.js';
import { checkQuality, checkQualitySmaller } from '../analysis/quality/check-run.js';
import type { QualityReport } from '../analysis/quality/quality-checks.js';
import { openRunScope, type RunScope } from '../analysis/run-scope.js';
import type { Audience, NamedQuery, SubQuestion } from '../analysis/types.js';
import type { Workspace } from '../analysis/workspace.js';
import { whoOf, type AuditLog, type Who } from './AuditLog.js';
import type { OutgoingPost } from './port.js';
import type { Posting } from './Posting.js';
import type { AnswerPresenter, DigestChart, PresentedPost, SummaryPresenter } from './presenters.js';
import type { RunQueue, RunRef } from './queue/RunQueue.js';
import * as replies from './replies.js';
import { Step, type StepContext } from './Step.js';
import { bundlePost, type BundleSource } from './thread-bundle.js';
import type { ThreadDatasets } from './ThreadDatasets.js';
import type { ThreadSerial } from './ThreadSerial.js';
import { enterStage, type AuditEntry, type CancelledState, type DoneState, type RunningState, type StateStore, type ThreadState } from './thread-state.js';

export interface RunDeps {
  store: StateStore;
  serial: ThreadSerial;
  datasets: ThreadDatasets;
  posting: Posting;
  audit: AuditLog;
  steps: StepContext;
  now: () => Date;
  presentAnswer: AnswerPresenter;
  presentSummary: SummaryPresenter;
  /** Shared across threads: bounds how many sub-questions compute at once. */
  jobs: LimitFunction;
  phases?: PhaseTimings;
  onJobStart?: (threadId: string, sq: SubQuestion) => void;
  queue?: RunQueue;
  log: (line: string) => void;
  /** Called with the thread's work serialised once a run has finished: follow-ups held during it are taken up. */
  afterRun?: (threadId: string) => Promise<void>;
}

/** A sub-question's outcome: its post, or why it failed. */
type JobResult = { presented: PresentedPost } | { failure: string };

/** A run taken up by this process: where its progress is shown. */
interface TakenUp {
  state: RunningState;
  progressRef: string;
}

export class RunOrchestrator {
  private readonly runs = new Map<string, Promise<void>>();
  /** Set when the process is stopping: jobs not yet started are skipped, and a run stopped by it is not reported. */
  private stopping = false;

  constructor(private readonly deps: RunDeps) {}

  /** An agreed run (saved as running): queued for any process, or started here. */
  async launch(state: RunningState): Promise<void> {
    if (this.deps.queue) await this.deps.queue.enqueue({ threadId: state.threadId, number: state.run.number });
    else this.start(state);
  }

  /** After a restart: carry on every run that was under way (with a queue: make sure it is queued). */
  async resume(): Promise<void> {
    for (const state of await this.deps.store.list({ stages: ['running'] })) if (state.stage === 'running') await this.launch(state);
  }

  /**
   * A queue worker's handler: carries out the run if it is still the thread's current one, and
   * resolves when it is over. A run already going on in this process is joined, not restarted.
   */
  async runQueued(ref: RunRef): Promise<void> {
    const state = await this.deps.store.get(ref.threadId);
    if (!isCurrent(state, ref.number)) return;
    this.start(state);
    await this.runs.get(ref.threadId);
  }

  /** Resolves when every run started so far has finished; rejects if one of them failed. */
  async idle(): Promise<void> {
    while (this.runs.size > 0) await Promise.all([...this.runs.values()]);
  }

  /** No new sub-question starts; runs under way stop at their next step and are resumed after a restart. */
  stop(): void {
    this.stopping = true;
  }

  private start(state: RunningState): void {
    if (this.runs.has(state.threadId)) return;
    const run = (async () => {
      try {
        await this.runPlan(state);
      } catch (err) {
        await this.reportStopped(state, err);
        throw err;
      } finally {
        this.runs.delete(state.threadId);
      }
      // Out of the map first, so a follow-up it held can start the thread's next run; idle() waits for that too.
      if (this.deps.afterRun && !this.stopping) await this.deps.serial.run(state.threadId, () => this.deps.afterRun!(state.threadId));
    })();
    this.runs.set(state.threadId, run);
    // Failures are logged and said in the thread, and surface through idle(); the thread keeps its state so the run can resume.
    run.catch(() => undefined);
  }

  /** A run that stopped on an error: logged, and said in the thread (unless the process is stopping or the thread moved on). */
  private async reportStopped(started: RunningState, err: unknown): Promise<void> {
    const reason = err instanceof Error ? err.message : String(err);
    this.deps.log(`threadcount: the run ${started.run.number} of ${started.threadId} stopped: ${reason}`);
    if (this.stopping) return;
    try {
      await this.deps.serial.run(started.threadId, async () => {
        const state = await this.deps.store.get(started.threadId);
        if (!isCurrent(state, started.run.number)) return;
        const step = new Step(this.deps.steps, whoOf(state), state);
        step.reply('run-stopped', replies.runStopped(state.run.posted.length, state.plan.items.length, err));
        await step.commit(state);
      });
    } catch (again) {
      this.deps.log(`threadcount: could not say so in ${started.threadId}: ${again instanceof Error ? again.message : String(again)}`);
    }
  }

  private async runPlan(started: RunningState): Promise<void> {
    const ws = this.deps.datasets.of(started);
    // What this run's sub-questions share (one rollup; identical queries run once); freed when the run ends.
    const scope = openRunScope(started.plan.items, ws);
    try {
      await this.runIn(started, ws, scope);
    } finally {
      await scope.close();
    }
  }

  /**
   * One data-quality pass per run, its SQL in the audit log; one that fails for resources is tried
   * once more with a smaller plan (smaller: what it changed). If it cannot run, the thread says so.
   */
  private async checkRunQuality(items: SubQuestion[], ws: Workspace, who: Who): Promise<{ report?: QualityReport; failure?: unknown; smaller?: string }> {
    const ran: NamedQuery[] = [];
    const onQuery = (q: NamedQuery) => ran.push(q);
    const quality: { report?: QualityReport; failure?: unknown; smaller?: string } = await timePhase(this.deps.phases, 'checks', async () => {
      try {
        return { report: await checkQuality(items, ws, { onQuery }) };
      } catch (failure) {
        const reason = resourceFailure(failure);
        if (reason === null) return { failure };
        try {
          const smaller = await checkQualitySmaller(items, ws, { onQuery });
          return smaller ? { report: smaller.report, smaller: replies.qualityCheckSmaller(reason, smaller.change) } : { failure };
        } catch (again) {
          return { failure: again };
        }
      }
    });
    if (quality.failure !== undefined) {
      const f = quality.failure;
      this.deps.log(`threadcount: the data-quality check of ${who.threadId} failed: ${f instanceof Error ? f.message : String(f)}`);
    }
    for (const q of ran) await this.deps.audit.append(who, 'sql', { subQuestion: null, template: 'quality_check', query: q.name, sql: q.sql, params: q.params, dataset: ws.dataset.name });
    return quality;
  }

  private async runIn(started: RunningState, ws: Workspace, scope: RunScope): Promise<void> {
    const { threadId, plan } = started;
    const audience = started.brief.audience ?? 'managers';
    const who = whoOf(started);
    const phases = this.deps.phases;
    const taken = await this.takeUp(started, who);
    if (!taken) return;
    const run = taken.state.run;
    const checked = await this.checkRunQuality(plan.items, ws, who);
    const quality = checked.report;
    // A check that could not run is said in the thread, never skipped silently.
    if (checked.failure !== undefined) await this.deps.posting.postOnce(threadId, runKey(taken.state, 'quality-failed'), { text: replies.qualityCheckFailed(checked.failure) }, who);
    if (checked.smaller !== undefined) await this.deps.posting.postOnce(threadId, runKey(taken.state, 'quality-smaller'), { text: checked.smaller }, who);
    // The queries each sub-question ran, for the audit log (kept even when presenting fails).
    const ran = plan.items.map(() => [] as NamedQuery[]);
    // Once the run stops (cancelled, finished, failed, or the process stopping), jobs still waiting their turn are skipped.
    let stopped = false;
    // Jobs queue in start order (the long table scans first, so they are not left for last);
    // answers are still posted in plan order.
    const pending: (Promise<JobResult> | null)[] = plan.items.map(() => null);
    for (const i of scope.startOrder(plan.items)) {
      const sq = plan.items[i]!;
      pending[i] = run.posted.includes(sq.id)
        ? null
        : this.deps
            .jobs(async () => {
              if (stopped || this.stopping) throw new Error('the run stopped');
              this.deps.onJobStart?.(threadId, sq);
              // One that fails for resources is tried once more with a smaller plan, which its post says.
              const answer = await answerWithSmallerPlanOnFailure(sq, ws, {
                ...(quality ? { quality } : {}),
                now: this.deps.now(),
                scope,
                ...(phases ? { timings: phases } : {}),
                // Kept before they run, so the audit log has the SQL of a sub-question that failed too.
                onCompiled: (queries) => {
                  ran[i] = queries;
                },
              });
              return this.deps.presentAnswer(answer, { workspace: ws, audience, position: i + 1, ...(phases ? { timings: phases } : {}) });
            })
            // Settled at once, so a failure waiting its turn to be posted is never "unhandled".
            .then(
              (presented): JobResult => ({ presented }),
              (err: unknown): JobResult => {
                this.deps.log(`threadcount: answer ${i + 1} of ${threadId} (run ${run.number}) failed: ${err instanceof Error ? err.message : String(err)}`);
                return { failure: replies.subQuestionFailed(i + 1, err) };
              },
            );
    }
    try {
      await this.postInOrder(taken, ws, audience, who, pending, ran, quality);
    } finally {
      // The run's scope closes after this returns: no job may still be using it.
      stopped = true;
      await Promise.all(pending);
    }
  }

  /**
   * Takes the run up, if it may start: it is still the thread's current one, and the channel may
   * still use the dataset. A run queued or resumed after a restart may meet access rules changed
   * since it was agreed: it is then cancelled with the refusal in the thread and the audit log.
   * Taking it up is logged, counted, and shown by a progress message of this process's own.
   */
  private takeUp(started: RunningState, who: Who): Promise<TakenUp | null> {
    return this.deps.serial.run(started.threadId, async () => {
      const state = await this.deps.store.get(started.threadId);
      if (!isCurrent(state, started.run.number)) return null;
      const refusal = this.deps.datasets.refusal(state, who.channel);
      if (refusal) {
        const step = new Step(this.deps.steps, who, state);
        step.log('denied', { reason: refusal.reason, run: state.run.number, ...(state.dataset ? { dataset: state.dataset } : {}) });
        step.say('note', refusal.text);
        await step.commit(enterStage<CancelledState>(state, { stage: 'cancelled', plan: state.plan, run: state.run }));
        return null;
      }
      const attempt = (state.run.attempt ?? 0) + 1;
      state.run.attempt = attempt;
      state.updatedAt = this.deps.now().toISOString();
      const done = state.run.posted.length;
      const total = state.plan.items.length;
      const progress = attempt === 1 ? replies.progress(done, total) : replies.progressResumed(done, total);
      // Each take-up's progress key is new: its attempt number is written with it.
      const progressRef = await this.deps.posting.postOnce(started.threadId, progressKey(state, attempt), { text: progress }, who, {
        before: [this.deps.audit.runEntry(who, 'started', state.run.number)],
        state,
        fresh: true,
      });
      return { state, progressRef };
    });
  }

  /** Posts each answer in plan order as it is ready, then the summary, while the run is current. */
  private async postInOrder(
    taken: TakenUp,
    ws: Workspace,
    audience: Audience,
    who: Who,
    pending: (Promise<JobResult> | null)[],
    ran: NamedQuery[][],
    quality: QualityReport | undefined,
  ): Promise<void> {
    const { threadId, plan, run } = taken.state;
    // Charts of this process's answers, for the digest (after a restart, only those made since).
    const charts = new Map<number, DigestChart>();
    // Files of this process's answers, for the thread's zip (the same limit after a restart, said in its post).
    const answerFiles: BundleSource['answers'] = [];
    for (const [i, sq] of plan.items.entries()) {
      const job = pending[i];
      if (!job) continue;
      const result = await job;
      const presented = 'presented' in result ? result.presented : null;
      const stillOn = await this.deps.serial.run(threadId, async () => {
        const state = await this.deps.store.get(threadId);
        if (!isCurrent(state, run.number)) return false;
        // Posted meanwhile by another process that took the run up.
        if (state.run.posted.includes(sq.id)) return true;
        const sql = ran[i]!.map((q) => this.sqlEntry(who, ws, sq, q, !presented));
        const post: Omit<OutgoingPost, 'key'> = 'presented' in result ? result.presented.post : { text: result.failure };
        state.run.posted.push(sq.id);
        if (presented?.takeaway) state.run.takeaways.push({ ...presented.takeaway, position: i + 1 });
        if (!presented) state.run.failures++;
        state.updatedAt = this.deps.now().toISOString();
        await this.postAnswer(state, i, runKey(state, `answer:${sq.id}`), post, who, sql);
        await this.showProgress(threadId, taken.progressRef, state);
        return true;
      });
      if (presented?.chart) charts.set(i + 1, { png: presented.chart, ...(presented.chartSpec ? { spec: presented.chartSpec } : {}) });
      if (presented?.post.files?.length) answerFiles.push({ position: i + 1, files: presented.post.files });
      if (!stillOn) return;
    }
    await this.deps.serial.run(threadId, async () => {
      const state = await this.deps.store.get(threadId);
      if (!isCurrent(state, run.number)) return;
      const summary = await this.summary(state, ws, audience, charts, quality);
      const done = enterStage<DoneState>(state, { stage: 'done', plan: state.plan, run: state.run });
      done.updatedAt = this.deps.now().toISOString();
      // The run's end is logged with its summary post and its state: all or nothing, once.
      // Still running, so no summary yet: the summary's key is written with the state that ends the run.
      await this.deps.posting.postOnce(threadId, runKey(state, 'summary'), summary, who, { after: [this.deps.audit.runEntry(who, 'finished', run.number)], state: done, fresh: true });
      // The zip follows the summary it holds. A process stopped between the two leaves the thread
      // without it (the run is finished); the answers and the summary are all in the thread.
      if (answerFiles.length > 0 || summary.files?.length) {
        const at = this.deps.now();
        const postedEarlier = plan.items.flatMap((_, i) => (pending[i] ? [] : [i + 1]));
        const name = `${ws.dataset.name}-${at.toISOString().slice(0, 10)}-run${run.number}`;
        await this.deps.posting.postOnce(threadId, runKey(state, 'bundle'), bundlePost({ answers: answerFiles, postedEarlier, summary, name, at }), who);
      }
    });
  }

  /**
   * An answer's post, with its SQL's audit entries and the run's progress in one commit. One the
   * platform will not take is said in a note instead, and the run goes on; if even the note
   * cannot be posted, the run stops here (and carries on after a restart).
   */
  private async postAnswer(state: RunningState, index: number, key: string, post: Omit<OutgoingPost, 'key'>, who: Who, sql: AuditEntry[]): Promise<void> {
    try {
      // Not in the run's posted list, which is written with each answer's key: not posted yet.
      await this.deps.posting.postOnce(state.threadId, key, post, who, { before: sql, state, fresh: true });
    } catch (err) {
      this.deps.log(`threadcount: answer ${index + 1} of ${state.threadId} (run ${state.run.number}) could not be posted: ${err instanceof Error ? err.message : String(err)}`);
      state.run.failures++;
      state.run.takeaways = state.run.takeaways.filter((t) => t.position !== index + 1);
      await this.deps.posting.postOnce(state.threadId, `${key}:failed`, { text: replies.answerNotPosted(index + 1, err) }, who, { before: sql, state });
    }
  }

  /** The progress message, edited in place; a failure to edit it is logged and the run goes on. */
  private async showProgress(threadId: string, ref: string, state: RunningState): Promise<void> {
    try {
      await this.deps.posting.update(threadId, ref, replies.progress(state.run.posted.length, state.plan.items.length));
    } catch (err) {
      this.deps.log(`threadcount: the progress message of ${threadId} could not be updated: ${err instanceof Error ? err.message : String(err)}`);
    }
  }

  /** The closing summary; if it cannot be written, a note saying so closes the run instead. */
  private async summary(
    state: RunningState,
    ws: Workspace,
    audience: Audience,
    charts: Map<number, DigestChart>,
    quality: QualityReport | undefined,
  ): Promise<Omit<OutgoingPost, 'key'>> {
    const phases = this.deps.phases;
    try {
      return await this.deps.presentSummary(state.run.takeaways, {
        workspace: ws,
        audience,
        failures: state.run.failures,
        charts,
        requestText: state.brief.requestText,
        ...(phases ? { timings: phases } : {}),
        items: state.plan.items,
        ...(quality ? { quality } : {}),
        now: this.deps.now(),
      });
    } catch (err) {
      this.deps.log(`threadcount: the summary of ${state.threadId} (run ${state.run.number}) failed: ${err instanceof Error ? err.message : String(err)}`);
      return { text: replies.summaryFailed(err) };
    }
  }

  private sqlEntry(who: Who, ws: Workspace, sq: SubQuestion, q: NamedQuery, failed: boolean): AuditEntry {
    return this.deps.audit.entry(who, 'sql', {
      subQuestion: sq.id,
      template: sq.template,
      query: q.name,
      sql: q.sql,
      params: q.params,
      dataset: ws.dataset.name,
      ...(failed ? { failed: true } : {}),
    });
  }
}

/** The thread is running this run (not cancelled, not replaced by a rerun). */
function isCurrent(state: ThreadState | undefined, number: number): state is RunningState {
  return !!state && state.stage === 'running' && state.run.number === number;
}

/** A run's post key: "<thread>:run<n>:<name>". */
function runKey(state: RunningState, name: string): string {
  return `${state.threadId}:run${state.run.number}:${name}`;
}

/** The first take-up's progress keeps the plain key; each later one has its own. */
function progressKey(state: RunningState, attempt: number): string {
  return runKey(state, attempt === 1 ? 'progress' : `progress:${attempt}`);
}
