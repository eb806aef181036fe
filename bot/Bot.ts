// The conversation: request -> brief -> prompts -> plan -> run -> posts. Talks to chat only
// through ThreadPort, to data only through the Workspace, and keeps every step in the store so
// a restart resumes where it was.
import type { LimitFunction } from 'p-limit';
import { answerSubQuestion } from '../analysis/answer-sub-question.js';
import { timePhase, type PhaseTimings } from '../analysis/phase-timings.js';
import { checkQuality } from '../analysis/quality/check-run.js';
import type { Takeaway } from '../analysis/present/presenter.js';
import type { Answer, Audience, ResultTable, SubQuestion } from '../analysis/types.js';
import { refreshCoverage, type Workspace } from '../analysis/workspace.js';
import { readCommand } from './commands.js';
import { readRequest } from './intake.js';
import { applyPlanEdit, buildPlan, readPlanEdit } from './plan.js';
import type { IncomingMessage, OutgoingPost, ThreadPort } from './port.js';
import { nextPrompt, readAnswer, type Prompt, type PromptContext } from './prompts.js';
import * as replies from './replies.js';
import type { StateStore, ThreadState } from './thread-state.js';

export interface PresentedPost {
  post: Omit<OutgoingPost, 'key'>;
  takeaway: Takeaway | null;
  /** The chart PNG, kept for the digest. */
  chart: Buffer | null;
}

/** Turns one answered sub-question into a post (chart, caption, CSV, SQL) and its takeaway. */
export type AnswerPresenter = (
  answer: Answer,
  ctx: { workspace: Workspace; audience: Audience; position: number; timings?: PhaseTimings },
) => Promise<PresentedPost>;
/** Writes the closing summary from the takeaways of the answers. */
export type SummaryPresenter = (
  takeaways: (Takeaway & { position: number })[],
  ctx: { workspace: Workspace; audience: Audience; failures: number; charts: Map<number, Buffer>; requestText: string; timings?: PhaseTimings },
) => Promise<Omit<OutgoingPost, 'key'>>;

export interface BotTimings {
  remindAfterMs: number;
  deadlineWarningMs: number;
}

export interface BotDeps {
  workspace: Workspace;
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
}

export class Bot {
  constructor(private readonly deps: BotDeps) {}

  /** Messages in one thread are handled one at a time; runs go on in the background. */
  handle(msg: IncomingMessage): Promise<void> {
    return this.inThread(msg.threadId, () => this.handleNow(msg));
  }

  private async handleNow(msg: IncomingMessage): Promise<void> {
    const state = await this.deps.store.get(msg.threadId);
    const command = readCommand(msg.text);
    if (command) return this.onCommand(command, msg, state);
    if (!state) return this.startThread(msg);
    switch (state.stage) {
      case 'clarifying':
        return this.onAnswer(state, msg.text);
      case 'planning':
        return this.onPlanReply(state, msg.text);
      case 'running':
        return this.say(state, 'note', replies.stillRunning(state));
      default:
        return this.say(state, 'note', replies.finished());
    }
  }

  /** After a restart: carry on every run that was under way. */
  async resume(): Promise<void> {
    for (const state of await this.deps.store.list({ stages: ['running'] })) this.startRun(state);
  }

  /** Resolves when every run started so far has finished; rejects if one of them failed. */
  async idle(): Promise<void> {
    while (this.runs.size > 0) await Promise.all([...this.runs.values()]);
  }

  private readonly runs = new Map<string, Promise<void>>();
  private readonly queues = new Map<string, Promise<unknown>>();

  /** Serialises work on one thread's state, so a reply, a tick and a run step never interleave. */
  private inThread<T>(threadId: string, work: () => Promise<T>): Promise<T> {
    const prior = this.queues.get(threadId) ?? Promise.resolve();
    const next = prior.then(work, work);
    const settled = next.then(
      () => undefined,
      () => undefined,
    );
    this.queues.set(threadId, settled);
    void settled.then(() => {
      if (this.queues.get(threadId) === settled) this.queues.delete(threadId);
    });
    return next;
  }

  private startRun(state: ThreadState): void {
    if (this.runs.has(state.threadId)) return;
    const run = this.runPlan(state).finally(() => this.runs.delete(state.threadId));
    this.runs.set(state.threadId, run);
    // Failures surface through idle(); the thread keeps its state so the run can resume.
    run.catch(() => undefined);
  }

  /** Periodic check: remind a requester who has not answered, warn when a deadline nears unagreed. */
  async tick(): Promise<void> {
    const now = this.deps.now().getTime();
    const t = this.deps.timings ?? { remindAfterMs: 4 * 3_600_000, deadlineWarningMs: 24 * 3_600_000 };
    for (const listed of await this.deps.store.list({ stages: ['clarifying', 'planning'] })) {
      await this.inThread(listed.threadId, () => this.checkWaiting(listed.threadId, now, t));
    }
  }

  private async checkWaiting(threadId: string, now: number, t: BotTimings): Promise<void> {
    const state = await this.deps.store.get(threadId);
    if (!state || (state.stage !== 'clarifying' && state.stage !== 'planning')) return;
    if (state.waitingSince && state.remindedAtTurn !== state.turn && now - Date.parse(state.waitingSince) >= t.remindAfterMs) {
      state.remindedAtTurn = state.turn + 1;
      await this.say(state, 'reminder', replies.reminder(state));
    }
    const deadline = state.brief.deadline;
    if (deadline && deadline !== 'none' && !state.deadlineWarned) {
      const due = Date.parse(`${deadline}T23:59:59Z`);
      if (due - now <= t.deadlineWarningMs) {
        state.deadlineWarned = true;
        await this.say(state, 'deadline', replies.deadlineNear(deadline, this.locale));
      }
    }
  }

  private get locale(): string {
    return this.deps.workspace.config.charts.locale;
  }

  private get promptContext(): PromptContext {
    const ws = this.deps.workspace;
    return { dataset: ws.dataset, coverage: ws.coverage, now: this.deps.now(), locale: this.locale };
  }

  private async onCommand(command: NonNullable<ReturnType<typeof readCommand>>, msg: IncomingMessage, state: ThreadState | undefined): Promise<void> {
    const ds = this.deps.workspace.dataset;
    const once = async (name: string, text: string) => {
      // Commands outside a request's thread have no state; their key is the message's own.
      await this.postOnce(msg.threadId, `${msg.threadId}:${name}:${state?.turn ?? 0}:${Date.now()}`, { text });
    };
    switch (command) {
      case 'help':
        return state ? this.say(state, 'help', replies.helpText()) : once('help', replies.helpText());
      case 'catalog':
        return state ? this.say(state, 'catalog', replies.catalogText(ds)) : once('catalog', replies.catalogText(ds));
      case 'status': {
        const mine = await this.deps.store.list({ requester: msg.author });
        return state ? this.say(state, 'status', replies.statusText(mine, this.locale)) : once('status', replies.statusText(mine, this.locale));
      }
      case 'cancel':
        if (!state || state.stage === 'done' || state.stage === 'cancelled') return once('cancel', replies.nothingToCancel());
        state.stage = 'cancelled';
        delete state.waitingSince;
        return this.say(state, 'cancelled', replies.cancelled());
      case 'rerun':
        if (!state?.plan || (state.stage !== 'done' && state.stage !== 'cancelled')) return once('rerun', replies.nothingToRerun());
        // The data may still be down or changed: say so in the thread and keep the plan for later.
        try {
          await refreshCoverage(this.deps.workspace);
        } catch (err) {
          return this.say(state, 'note', replies.rerunFailed(err));
        }
        state.run = { number: (state.run?.number ?? 0) + 1, posted: [], takeaways: [], failures: 0 };
        state.stage = 'running';
        await this.deps.store.put(state);
        return this.startRun(state);
    }
  }

  private async startThread(msg: IncomingMessage): Promise<void> {
    const ds = this.deps.workspace.dataset;
    const brief = readRequest(msg.text, ds, { now: this.deps.now(), timeZone: ds.timezone });
    const state: ThreadState = {
      threadId: msg.threadId,
      requester: msg.author,
      stage: 'clarifying',
      brief,
      turn: 0,
      updatedAt: this.deps.now().toISOString(),
    };
    await this.say(state, 'ack', replies.acknowledgement(brief, ds));
    await this.advance(state);
  }

  /** Asks the next prompt, or proposes the plan when nothing is left to ask. */
  private async advance(state: ThreadState): Promise<void> {
    const prompt = nextPrompt(state.brief, this.promptContext);
    state.waitingSince = this.deps.now().toISOString();
    if (prompt) {
      state.prompt = prompt;
      await this.say(state, 'prompt', replies.promptText(prompt), prompt);
      return;
    }
    delete state.prompt;
    state.plan = buildPlan(state.brief, this.deps.workspace.dataset, this.deps.workspace.coverage);
    state.stage = 'planning';
    await this.say(state, 'plan', replies.planText(state.plan, this.deps.workspace.dataset, this.locale), undefined, { quickReplies: replies.PLAN_REPLIES });
  }

  private async onAnswer(state: ThreadState, text: string): Promise<void> {
    const prompt = state.prompt!;
    const reading = readAnswer(prompt, byOptionNumber(prompt, text), state.brief, this.promptContext);
    if (!reading.ok) {
      state.waitingSince = this.deps.now().toISOString();
      return this.say(state, 'prompt', `${reading.message}\n\n${replies.promptText(prompt)}`, prompt, { promptLead: reading.message });
    }
    state.brief = reading.brief;
    await this.advance(state);
  }

  private async onPlanReply(state: ThreadState, text: string): Promise<void> {
    const edit = readPlanEdit(text);
    if (edit.type === 'agree') {
      if (!state.plan || state.plan.items.length === 0) return this.say(state, 'note', replies.emptyPlan());
      state.stage = 'running';
      delete state.waitingSince;
      state.run = { number: 1, posted: [], takeaways: [], failures: 0 };
      await this.deps.store.put(state);
      return this.startRun(state);
    }
    if (edit.type === 'cancel') {
      state.stage = 'cancelled';
      delete state.waitingSince;
      return this.say(state, 'cancelled', replies.cancelled());
    }
    state.waitingSince = this.deps.now().toISOString();
    if (edit.type === 'unknown') return this.say(state, 'note', replies.planEditHelp());
    const { plan, error } = applyPlanEdit(state.plan!, edit);
    if (error) return this.say(state, 'note', error);
    state.plan = plan;
    await this.say(state, 'plan', replies.planText(plan, this.deps.workspace.dataset, this.locale), undefined, { quickReplies: replies.PLAN_REPLIES });
  }

  /**
   * Runs (or resumes) the plan: sub-questions compute through the shared job queue, and their
   * posts go out in plan order as each is ready. A sub-question already posted is skipped, so
   * a resumed run never posts twice.
   */
  private async runPlan(started: ThreadState): Promise<void> {
    const threadId = started.threadId;
    const plan = started.plan!;
    const run = started.run!;
    const audience = started.brief.audience ?? 'managers';
    const ws = this.deps.workspace;
    const runKey = (name: string) => `${threadId}:run${run.number}:${name}`;
    // Charts of this process's answers, for the digest (after a restart, only those made since).
    const charts = new Map<number, Buffer>();
    // One data-quality pass per run; if it cannot run, each answer reports its own error.
    const quality = await checkQuality(plan.items, ws).catch(() => undefined);
    const progressRef = await this.postOnce(threadId, runKey('progress'), { text: replies.progress(run.posted.length, plan.items.length) });
    const pending = plan.items.map((sq, i) =>
      run.posted.includes(sq.id)
        ? null
        : this.deps
            .jobs(async () => {
              this.deps.onJobStart?.(threadId, sq);
              const answer = await answerSubQuestion(sq, ws, { ...(quality ? { quality } : {}), now: this.deps.now() });
              return this.deps.presentAnswer(answer, { workspace: ws, audience, position: i + 1 });
            })
            // Settled at once, so a failure waiting its turn to be posted is never "unhandled".
            .then(
              (presented) => ({ presented, failure: null }),
              (err: unknown) => ({ presented: null, failure: replies.subQuestionFailed(i + 1, err) }),
            ),
    );
    // This run is still the thread's current one and has not been cancelled.
    const current = (s: ThreadState | undefined): s is ThreadState => !!s && s.stage === 'running' && s.run?.number === run.number;
    for (const [i, sq] of plan.items.entries()) {
      const job = pending[i];
      if (!job) continue;
      const { presented, failure } = await job;
      const stillOn = await this.inThread(threadId, async () => {
        const state = await this.deps.store.get(threadId);
        if (!current(state)) return false;
        await this.postOnce(threadId, runKey(`answer:${sq.id}`), presented ? presented.post : { text: failure! });
        state.run!.posted.push(sq.id);
        if (presented?.takeaway) state.run!.takeaways.push({ ...presented.takeaway, position: i + 1 });
        if (failure) state.run!.failures++;
        state.updatedAt = this.deps.now().toISOString();
        await this.deps.store.put(state);
        await this.deps.port.update(threadId, progressRef, replies.progress(state.run!.posted.length, plan.items.length));
        return true;
      });
      if (presented?.chart) charts.set(i + 1, presented.chart);
      if (!stillOn) return;
    }
    await this.inThread(threadId, async () => {
      const state = await this.deps.store.get(threadId);
      if (!current(state)) return;
      const summary = await this.deps.presentSummary(state.run!.takeaways, {
        workspace: ws,
        audience,
        failures: state.run!.failures,
        charts,
        requestText: state.brief.requestText,
      });
      await this.postOnce(threadId, runKey('summary'), summary);
      state.stage = 'done';
      state.updatedAt = this.deps.now().toISOString();
      await this.deps.store.put(state);
    });
  }

  /** Posts under a fresh key; the state (with its turn counter) is saved first. */
  private async say(state: ThreadState, prefix: string, text: string, prompt?: Prompt, extra: Pick<OutgoingPost, 'promptLead' | 'quickReplies'> = {}): Promise<void> {
    const key = `${state.threadId}:${prefix}:${state.turn++}`;
    state.updatedAt = this.deps.now().toISOString();
    await this.deps.store.put(state);
    await this.postOnce(state.threadId, key, { text, ...(prompt ? { prompt } : {}), ...extra });
  }

  /** A key posted before (in this process or before a restart) is not posted again. */
  private async postOnce(threadId: string, key: string, post: Omit<OutgoingPost, 'key'>): Promise<string> {
    const known = await this.deps.store.postRef(key);
    if (known !== undefined) return known;
    const ref = await this.deps.port.post(threadId, { key, ...post });
    await this.deps.store.recordPost(key, threadId, ref);
    return ref;
  }
}

/** "2" picks the second option; anything else is read as typed. */
function byOptionNumber(prompt: Prompt, text: string): string {
  const n = /^\s*(\d{1,2})\s*[.)]?\s*$/.exec(text);
  const option = n ? prompt.options[Number(n[1]) - 1] : undefined;
  return option ? option.value : text;
}
