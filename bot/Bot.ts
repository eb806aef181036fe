// The conversation: request -> brief -> prompts -> plan -> run -> posts. Talks to chat only
// through ThreadPort, to data only through the Workspace, and keeps every step in the store so
// a restart resumes where it was.
import type { LimitFunction } from 'p-limit';
import { answerSubQuestion } from '../analysis/answer-sub-question.js';
import { checkQuality } from '../analysis/quality/check-run.js';
import type { Takeaway } from '../analysis/present/presenter.js';
import type { Answer, Audience, SubQuestion } from '../analysis/types.js';
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
export type AnswerPresenter = (answer: Answer, ctx: { workspace: Workspace; audience: Audience; position: number }) => Promise<PresentedPost>;
/** Writes the closing summary from the takeaways of the answers. */
export type SummaryPresenter = (
  takeaways: (Takeaway & { position: number })[],
  ctx: { workspace: Workspace; audience: Audience; failures: number; charts: Map<number, Buffer>; requestText: string },
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
  /** Called when a sub-question job starts, for tests that stop the process part-way. */
  onJobStart?: (threadId: string, sq: SubQuestion) => void;
}

export class Bot {
  constructor(private readonly deps: BotDeps) {}

  async handle(msg: IncomingMessage): Promise<void> {
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
    for (const state of await this.deps.store.list({ stages: ['running'] })) await this.runPlan(state);
  }

  /** Periodic check: remind a requester who has not answered, warn when a deadline nears unagreed. */
  async tick(): Promise<void> {
    const now = this.deps.now().getTime();
    const t = this.deps.timings ?? { remindAfterMs: 4 * 3_600_000, deadlineWarningMs: 24 * 3_600_000 };
    for (const state of await this.deps.store.list({ stages: ['clarifying', 'planning'] })) {
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
        await refreshCoverage(this.deps.workspace);
        state.run = { number: (state.run?.number ?? 0) + 1, posted: [], takeaways: [], failures: 0 };
        state.stage = 'running';
        await this.deps.store.put(state);
        return this.runPlan(state);
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
    await this.say(state, 'plan', replies.planText(state.plan, this.deps.workspace.dataset, this.locale));
  }

  private async onAnswer(state: ThreadState, text: string): Promise<void> {
    const prompt = state.prompt!;
    const reading = readAnswer(prompt, byOptionNumber(prompt, text), state.brief, this.promptContext);
    if (!reading.ok) {
      state.waitingSince = this.deps.now().toISOString();
      return this.say(state, 'prompt', `${reading.message}\n\n${replies.promptText(prompt)}`, prompt);
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
      return this.runPlan(state);
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
    await this.say(state, 'plan', replies.planText(plan, this.deps.workspace.dataset, this.locale));
  }

  /**
   * Runs (or resumes) the plan: sub-questions compute through the shared job queue, and their
   * posts go out in plan order as each is ready. A sub-question already posted is skipped, so
   * a resumed run never posts twice.
   */
  private async runPlan(state: ThreadState): Promise<void> {
    const plan = state.plan!;
    const run = state.run!;
    const audience = state.brief.audience ?? 'managers';
    const ws = this.deps.workspace;
    const runKey = (name: string) => `${state.threadId}:run${run.number}:${name}`;
    // Charts of this process's answers, for the digest (after a restart, only those made since).
    const charts = new Map<number, Buffer>();
    // One data-quality pass per run; if it cannot run, each answer reports its own error.
    const quality = await checkQuality(plan.items, ws).catch(() => undefined);
    const progressRef = await this.postOnce(state.threadId, runKey('progress'), { text: replies.progress(run.posted.length, plan.items.length) });
    const pending = plan.items.map((sq, i) =>
      run.posted.includes(sq.id)
        ? null
        : this.deps
            .jobs(async () => {
              this.deps.onJobStart?.(state.threadId, sq);
              const answer = await answerSubQuestion(sq, ws, { ...(quality ? { quality } : {}), now: this.deps.now() });
              return this.deps.presentAnswer(answer, { workspace: ws, audience, position: i + 1 });
            })
            // Settled at once, so a failure waiting its turn to be posted is never "unhandled".
            .then(
              (presented) => ({ presented, failure: null }),
              (err: unknown) => ({ presented: null, failure: replies.subQuestionFailed(i + 1, err) }),
            ),
    );
    for (const [i, sq] of plan.items.entries()) {
      const job = pending[i];
      if (!job) continue;
      const { presented, failure } = await job;
      const current = await this.deps.store.get(state.threadId);
      if (current?.stage === 'cancelled') return;
      await this.postOnce(state.threadId, runKey(`answer:${sq.id}`), presented ? presented.post : { text: failure! });
      run.posted.push(sq.id);
      if (presented?.takeaway) run.takeaways.push({ ...presented.takeaway, position: i + 1 });
      if (presented?.chart) charts.set(i + 1, presented.chart);
      if (failure) run.failures++;
      state.updatedAt = this.deps.now().toISOString();
      await this.deps.store.put(state);
      await this.deps.port.update(state.threadId, progressRef, replies.progress(run.posted.length, plan.items.length));
    }
    const summary = await this.deps.presentSummary(run.takeaways, { workspace: ws, audience, failures: run.failures, charts, requestText: state.brief.requestText });
    await this.postOnce(state.threadId, runKey('summary'), summary);
    state.stage = 'done';
    state.updatedAt = this.deps.now().toISOString();
    await this.deps.store.put(state);
  }

  /** Posts under a fresh key; the state (with its turn counter) is saved first. */
  private async say(state: ThreadState, prefix: string, text: string, prompt?: Prompt): Promise<void> {
    const key = `${state.threadId}:${prefix}:${state.turn++}`;
    state.updatedAt = this.deps.now().toISOString();
    await this.deps.store.put(state);
    await this.postOnce(state.threadId, key, { text, ...(prompt ? { prompt } : {}) });
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
