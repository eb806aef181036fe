// Runs agreed plans: each sub-question computes through the shared job queue and its post goes
// out in plan order as it is ready, then the summary. Runs go on in the background; with a queue
// shared by several processes they are queued and any process takes them up. A run resumed
// after a restart skips what was already posted.
import type { LimitFunction } from 'p-limit';
import { answerWithSmallerPlanOnFailure, resourceFailure } from '../analysis/smaller-plan.js';
import { timePhase, type PhaseTimings } from '../analysis/phase-timings.js';
import { checkQuality, checkQualitySmaller } from '../analysis/quality/check-run.js';
import type { QualityReport } from '../analysis/quality/quality-checks.js';
import { openRunScope, type RunScope } from '../analysis/run-scope.js';
import type { Audience, NamedQuery, SubQuestion } from '../analysis/types.js';
import type { Workspace } from '../analysis/workspace.js';
import { whoOf, type AuditLog, type Who } from './AuditLog.js';
import type { Posting } from './Posting.js';
import type { AnswerPresenter, DigestChart, PresentedPost, SummaryPresenter } from './presenters.js';
import type { RunQueue, RunRef } from './queue/RunQueue.js';
import * as replies from './replies.js';
import { Step, type StepContext } from './Step.js';
import { bundlePost, type BundleSource } from './thread-bundle.js';
import type { ThreadDatasets } from './ThreadDatasets.js';
import type { ThreadSerial } from './ThreadSerial.js';
import { enterStage, type CancelledState, type DoneState, type RunningState, type StateStore, type ThreadState } from './thread-state.js';

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
}

/** A sub-question's outcome: its post, or why it failed. */
type JobResult = { presented: PresentedPost } | { failure: string };

export class RunOrchestrator {
  private readonly runs = new Map<string, Promise<void>>();

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

  private start(state: RunningState): void {
    if (this.runs.has(state.threadId)) return;
    const run = this.runPlan(state).finally(() => this.runs.delete(state.threadId));
    this.runs.set(state.threadId, run);
    // Failures surface through idle(); the thread keeps its state so the run can resume.
    run.catch(() => undefined);
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
    for (const q of ran) await this.deps.audit.append(who, 'sql', { subQuestion: null, template: 'quality_check', query: q.name, sql: q.sql, params: q.params, dataset: ws.dataset.name });
    return quality;
  }

  private async runIn(started: RunningState, ws: Workspace, scope: RunScope): Promise<void> {
    const { threadId, plan, run } = started;
    const audience = started.brief.audience ?? 'managers';
    const who = whoOf(started);
    const phases = this.deps.phases;
    if (!(await this.mayRun(started, who))) return;
    await this.deps.store.appendAudit(this.deps.audit.runEntry(who, 'started', run.number));
    const checked = await this.checkRunQuality(plan.items, ws, who);
    const quality = checked.report;
    // A check that could not run is said in the thread, never skipped silently.
    if (checked.failure !== undefined) await this.deps.posting.postOnce(threadId, runKey(started, 'quality-failed'), { text: replies.qualityCheckFailed(checked.failure) }, who);
    if (checked.smaller !== undefined) await this.deps.posting.postOnce(threadId, runKey(started, 'quality-smaller'), { text: checked.smaller }, who);
    const progressRef = await this.deps.posting.postOnce(threadId, runKey(started, 'progress'), { text: replies.progress(run.posted.length, plan.items.length) }, who);
    // The queries each sub-question ran, for the audit log (kept even when presenting fails).
    const ran = plan.items.map(() => [] as NamedQuery[]);
    // Once the run stops (cancelled, finished, or failed), jobs still waiting their turn are skipped.
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
              if (stopped) throw new Error('the run stopped');
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
              (err: unknown): JobResult => ({ failure: replies.subQuestionFailed(i + 1, err) }),
            );
    }
    try {
      await this.postInOrder(started, ws, audience, who, pending, ran, progressRef, quality);
    } finally {
      // The run's scope closes after this returns: no job may still be using it.
      stopped = true;
      await Promise.all(pending);
    }
  }

  /**
   * Whether the run may start: it is still the thread's current one, and the channel may still use
   * the dataset. A run queued or resumed after a restart may meet access rules changed since it
   * was agreed: it is then cancelled with the refusal in the thread and the audit log.
   */
  private mayRun(started: RunningState, who: Who): Promise<boolean> {
    return this.deps.serial.run(started.threadId, async () => {
      const state = await this.deps.store.get(started.threadId);
      if (!isCurrent(state, started.run.number)) return false;
      const refusal = this.deps.datasets.refusal(state, who.channel);
      if (!refusal) return true;
      const step = new Step(this.deps.steps, who, state);
      step.log('denied', { reason: refusal.reason, run: state.run.number, ...(state.dataset ? { dataset: state.dataset } : {}) });
      step.say('note', refusal.text);
      await step.commit(enterStage<CancelledState>(state, { stage: 'cancelled', plan: state.plan, run: state.run }));
      return false;
    });
  }

  /** Posts each answer in plan order as it is ready, then the summary, while the run is current. */
  private async postInOrder(
    started: RunningState,
    ws: Workspace,
    audience: Audience,
    who: Who,
    pending: (Promise<JobResult> | null)[],
    ran: NamedQuery[][],
    progressRef: string,
    quality: QualityReport | undefined,
  ): Promise<void> {
    const { threadId, plan, run } = started;
    const phases = this.deps.phases;
    // Charts of this process's answers, for the digest (after a restart, only those made since).
    const charts = new Map<number, DigestChart>();
    // Files of this process's answers, for the thread's zip (the same limit after a restart, said in its post).
    const answerFiles: BundleSource['answers'] = [];
    for (const [i, sq] of plan.items.entries()) {
      const job = pending[i];
      if (!job) continue;
      const result = await job;
      const presented = 'presented' in result ? result.presented : null;
      const post = 'presented' in result ? result.presented.post : { text: result.failure };
      const stillOn = await this.deps.serial.run(threadId, async () => {
        const state = await this.deps.store.get(threadId);
        if (!isCurrent(state, run.number)) return false;
        for (const q of ran[i]!) {
          await this.deps.audit.append(who, 'sql', {
            subQuestion: sq.id,
            template: sq.template,
            query: q.name,
            sql: q.sql,
            params: q.params,
            dataset: ws.dataset.name,
            ...(presented ? {} : { failed: true }),
          });
        }
        await this.deps.posting.postOnce(threadId, runKey(started, `answer:${sq.id}`), post, who);
        state.run.posted.push(sq.id);
        if (presented?.takeaway) state.run.takeaways.push({ ...presented.takeaway, position: i + 1 });
        if (!presented) state.run.failures++;
        state.updatedAt = this.deps.now().toISOString();
        await this.deps.store.put(state);
        await this.deps.posting.update(threadId, progressRef, replies.progress(state.run.posted.length, plan.items.length));
        return true;
      });
      if (presented?.chart) charts.set(i + 1, { png: presented.chart, ...(presented.chartSpec ? { spec: presented.chartSpec } : {}) });
      if (presented?.post.files?.length) answerFiles.push({ position: i + 1, files: presented.post.files });
      if (!stillOn) return;
    }
    await this.deps.serial.run(threadId, async () => {
      const state = await this.deps.store.get(threadId);
      if (!isCurrent(state, run.number)) return;
      const summary = await this.deps.presentSummary(state.run.takeaways, {
        workspace: ws,
        audience,
        failures: state.run.failures,
        charts,
        requestText: state.brief.requestText,
        ...(phases ? { timings: phases } : {}),
        items: plan.items,
        ...(quality ? { quality } : {}),
        now: this.deps.now(),
      });
      // The run's end is logged with its summary post: both or neither, once.
      await this.deps.posting.postOnce(threadId, runKey(started, 'summary'), summary, who, [this.deps.audit.runEntry(who, 'finished', run.number)]);
      if (answerFiles.length > 0 || summary.files?.length) {
        const at = this.deps.now();
        const postedEarlier = plan.items.flatMap((_, i) => (pending[i] ? [] : [i + 1]));
        const name = `${ws.dataset.name}-${at.toISOString().slice(0, 10)}-run${run.number}`;
        await this.deps.posting.postOnce(threadId, runKey(started, 'bundle'), bundlePost({ answers: answerFiles, postedEarlier, summary, name, at }), who);
      }
      const done = enterStage<DoneState>(state, { stage: 'done', plan: state.plan, run: state.run });
      done.updatedAt = this.deps.now().toISOString();
      await this.deps.store.put(done);
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
