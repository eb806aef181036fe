// The conversation: request -> brief -> prompts -> plan -> run -> posts. Talks to chat only
// through ThreadPort, to data only through the Workspace, and keeps every step in the store so
// a restart resumes where it was.
import type { LimitFunction } from 'p-limit';
import { answerSubQuestion } from '../analysis/answer-sub-question.js';
import { timePhase, type PhaseTimings } from '../analysis/phase-timings.js';
import { checkQuality } from '../analysis/quality/check-run.js';
import type { QualityReport } from '../analysis/quality/quality-checks.js';
import { openRunScope, type RunScope } from '../analysis/run-scope.js';
import type { ChartSpec } from '../analysis/charts/spec.js';
import type { Takeaway } from '../analysis/present/presenter.js';
import type { Answer, Audience, NamedQuery, SubQuestion } from '../analysis/types.js';
import { refreshCoverage, type Workspace } from '../analysis/workspace.js';
import type { AccessConfig, DatasetConfig } from '../config/schema.js';
import { allowedDatasets, channelKey, chooseDataset } from './access.js';
import type { Brief } from './brief.js';
import { readCommand } from './commands.js';
import { catalogTerms, readRequest } from './intake.js';
import { applyPlanEdit, buildPlan, readPlanEdit, type PlanEdit } from './plan.js';
import type { IncomingMessage, OutgoingPost, ThreadPort } from './port.js';
import { datasetPrompt, nextPrompt, personalDataRefusal, readAnswer, readDatasetAnswer, readWindow, type Prompt, type PromptContext } from './prompts.js';
import { findTerms } from './term-match.js';
import * as replies from './replies.js';
import type { RunQueue, RunRef } from './queue/RunQueue.js';
import type { AuditEntry, AuditKind, SqlSession, StateStore, ThreadState } from './thread-state.js';

/** A chart kept for the digest: its PNG, and its spec when known. */
export interface DigestChart {
  png: Buffer;
  spec?: ChartSpec;
}

export interface PresentedPost {
  post: Omit<OutgoingPost, 'key'>;
  takeaway: Takeaway | null;
  /** The chart PNG, kept for the digest. */
  chart: Buffer | null;
  /** Its spec, so the digest can redraw it legibly at thumbnail size. */
  chartSpec?: ChartSpec;
}

/** Turns one answered sub-question into a post (chart, caption, CSV, SQL) and its takeaway. */
export type AnswerPresenter = (
  answer: Answer,
  ctx: { workspace: Workspace; audience: Audience; position: number; timings?: PhaseTimings },
) => Promise<PresentedPost>;
/** Writes the closing summary from the takeaways of the answers. */
export type SummaryPresenter = (
  takeaways: (Takeaway & { position: number })[],
  ctx: { workspace: Workspace; audience: Audience; failures: number; charts: Map<number, DigestChart>; requestText: string; timings?: PhaseTimings },
) => Promise<Omit<OutgoingPost, 'key'>>;

export interface BotTimings {
  remindAfterMs: number;
  deadlineWarningMs: number;
}

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
}

/** Who an audit entry or a post is for: the thread, the person asking and their channel. */
interface Who {
  threadId: string;
  requester: string;
  channel: string;
}

export class Bot {
  private readonly workspaces: ReadonlyMap<string, Workspace>;
  /** Tells apart the keys of one-off replies outside a request's state (commands, refusals). */
  private oneOff = 0;

  constructor(private readonly deps: BotDeps) {
    const given = deps.workspaces ?? (deps.workspace ? new Map([[deps.workspace.dataset.name, deps.workspace]]) : undefined);
    if (!given || given.size === 0) throw new Error('the bot needs at least one dataset');
    this.workspaces = given;
  }

  /** Messages in one thread are handled one at a time; runs go on in the background. */
  handle(msg: IncomingMessage): Promise<void> {
    return this.inThread(msg.threadId, () => this.handleNow(msg));
  }

  private async handleNow(msg: IncomingMessage): Promise<void> {
    // Delivered twice (a sweep after a replica died, racing a late first delivery): handled once.
    if (msg.messageId !== undefined && (await this.received(msg.threadId, msg.messageId))) return;
    const channel = channelKey(msg);
    const state = await this.deps.store.get(msg.threadId);
    const command = readCommand(msg.text);
    if (!state && !command) return this.startThread(msg, channel);
    const who: Who = { threadId: msg.threadId, requester: msg.author, channel };
    await this.audit(who, 'message', { text: msg.text, ...messageIdOf(msg) });
    // The access rules may have changed since the thread started: they are checked on every message.
    const refusal = state ? this.threadRefusal(state, channel) : null;
    if (state && refusal) {
      await this.audit(who, 'denied', { reason: refusal.reason, text: msg.text, ...(state.dataset ? { dataset: state.dataset } : {}) });
      return this.say(state, 'note', refusal.text);
    }
    if (command) return this.onCommand(command, msg, state, who);
    if (!state) return;
    switch (state.stage) {
      case 'clarifying':
        return state.prompt?.topic === 'dataset' ? this.onDatasetAnswer(state, msg.text, who) : this.onAnswer(state, msg.text);
      case 'planning':
        return this.onPlanReply(state, msg.text);
      case 'running':
        return this.say(state, 'note', replies.stillRunning(state));
      default:
        return this.say(state, 'note', replies.finished());
    }
  }

  /** Whether the audit log shows this message as received in the thread (its first write when handled). */
  private async received(threadId: string, messageId: string): Promise<boolean> {
    return (await this.deps.store.listAudit({ threadId })).some((e) => (e.kind === 'request' || e.kind === 'message') && e.detail.messageId === messageId);
  }

  /** After a restart: carry on every run that was under way (with a queue: make sure it is queued). */
  async resume(): Promise<void> {
    for (const state of await this.deps.store.list({ stages: ['running'] })) await this.launch(state);
  }

  /**
   * A queue worker's handler: carries out the run if it is still the thread's current one, and
   * resolves when it is over. A run already going on in this process is joined, not restarted.
   */
  async runQueued(ref: RunRef): Promise<void> {
    const state = await this.deps.store.get(ref.threadId);
    if (!state || state.stage !== 'running' || state.run?.number !== ref.number) return;
    this.startRun(state);
    await this.runs.get(ref.threadId);
  }

  /** Resolves when every run started so far has finished; rejects if one of them failed. */
  async idle(): Promise<void> {
    while (this.runs.size > 0) await Promise.all([...this.runs.values()]);
  }

  private readonly runs = new Map<string, Promise<void>>();
  private readonly queues = new Map<string, Promise<unknown>>();

  /**
   * Serialises work on one thread's state, so a reply, a tick and a run step never interleave: in
   * this process by a promise chain, across processes by the store's thread lock.
   */
  private inThread<T>(threadId: string, work: () => Promise<T>): Promise<T> {
    const prior = this.queues.get(threadId) ?? Promise.resolve();
    const locked = () => this.deps.store.withThreadLock(threadId, work);
    const next = prior.then(locked, locked);
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

  /** An agreed run (saved as 'running'): queued for any process, or started here. */
  private async launch(state: ThreadState): Promise<void> {
    if (this.deps.queue) await this.deps.queue.enqueue({ threadId: state.threadId, number: state.run!.number });
    else this.startRun(state);
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
    return this.workspaces.values().next().value!.config.charts.locale;
  }

  /** The name of the dataset a thread from before there were several uses: the config's first. */
  private get firstDataset(): string {
    return this.workspaces.keys().next().value!;
  }

  /** The workspace of a thread's dataset. */
  private workspaceOf(state: ThreadState): Workspace {
    const name = state.dataset ?? this.firstDataset;
    const ws = this.workspaces.get(name);
    if (!ws) throw new Error(`the dataset "${name}" of thread ${state.threadId} is not configured`);
    return ws;
  }

  /** The datasets a channel may use, in the config's order. */
  private allowedFor(channel: string): Workspace[] {
    return allowedDatasets(this.deps.access, [...this.workspaces.keys()], channel).map((n) => this.workspaces.get(n)!);
  }

  /** Why a thread may not go on from this channel, if it may not. */
  private threadRefusal(state: ThreadState, channel: string): { reason: string; text: string } | null {
    const allowed = this.allowedFor(channel);
    // Still choosing: the channel must keep at least one dataset.
    if (state.prompt?.topic === 'dataset' && !state.dataset) return allowed.length > 0 ? null : { reason: 'no_dataset', text: replies.noDatasetForChannel() };
    const name = state.dataset ?? this.firstDataset;
    const ws = this.workspaces.get(name);
    if (!ws) return { reason: 'dataset_gone', text: replies.datasetGone(name) };
    if (!allowed.includes(ws)) return { reason: 'dataset_not_allowed', text: replies.datasetNotAllowed(ws.dataset.label) };
    return null;
  }

  private promptContext(ws: Workspace): PromptContext {
    return { dataset: ws.dataset, coverage: ws.coverage, now: this.deps.now(), locale: this.locale };
  }

  private who(state: ThreadState): Who {
    return { threadId: state.threadId, requester: state.requester, channel: state.channel ?? channelKey({ threadId: state.threadId }) };
  }

  private auditEntry(who: Who, kind: AuditKind, detail: Record<string, unknown>): AuditEntry {
    return { at: this.deps.now().toISOString(), ...who, kind, detail };
  }

  private async audit(who: Who, kind: AuditKind, detail: Record<string, unknown>): Promise<void> {
    await this.deps.store.appendAudit(this.auditEntry(who, kind, detail));
  }

  /** A run entry of the audit log: started (each time a process takes it up) or finished (once). */
  private runEntry(who: Who, event: 'started' | 'finished', number: number): AuditEntry {
    return this.auditEntry(who, 'run', { event, number, ...(this.deps.replica ? { replica: this.deps.replica } : {}) });
  }

  /** A reply outside a request's state (a command in a new thread, a refusal): its key is its own. */
  private async oneOffReply(who: Who, name: string, text: string, turn = 0): Promise<void> {
    // The replica's name keeps two processes answering in the same millisecond apart.
    const origin = this.deps.replica ? `${this.deps.replica}:` : '';
    await this.postOnce(who.threadId, `${who.threadId}:${name}:${turn}:${origin}${Date.now()}:${this.oneOff++}`, { text }, who);
  }

  private async onCommand(command: NonNullable<ReturnType<typeof readCommand>>, msg: IncomingMessage, state: ThreadState | undefined, who: Who): Promise<void> {
    const once = (name: string, text: string) => this.oneOffReply(who, name, text, state?.turn ?? 0);
    switch (command) {
      case 'help':
        return state ? this.say(state, 'help', replies.helpText()) : once('help', replies.helpText());
      case 'catalog': {
        if (state) return this.say(state, 'catalog', replies.catalogText(this.workspaceOf(state).dataset));
        const allowed = this.allowedFor(who.channel);
        if (allowed.length === 0) {
          await this.audit(who, 'denied', { reason: 'no_dataset', text: msg.text });
          return once('denied', replies.noDatasetForChannel());
        }
        return once('catalog', allowed.map((ws) => replies.catalogText(ws.dataset)).join('\n\n'));
      }
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
          await refreshCoverage(this.workspaceOf(state));
        } catch (err) {
          return this.say(state, 'note', replies.rerunFailed(err));
        }
        state.run = { number: (state.run?.number ?? 0) + 1, posted: [], takeaways: [], failures: 0 };
        state.stage = 'running';
        await this.deps.store.put(state);
        return this.launch(state);
    }
  }

  /**
   * A new request: the channel's datasets decide where it may run. One allowed dataset is used
   * at once; of several, the one whose catalog the request names best, else the requester is asked.
   */
  private async startThread(msg: IncomingMessage, channel: string): Promise<void> {
    const who: Who = { threadId: msg.threadId, requester: msg.author, channel };
    const allowed = this.allowedFor(channel);
    if (allowed.length === 0) {
      await this.audit(who, 'request', { text: msg.text, ...messageIdOf(msg) });
      await this.audit(who, 'denied', { reason: 'no_dataset', text: msg.text });
      return this.oneOffReply(who, 'denied', replies.noDatasetForChannel());
    }
    const choice = chooseDataset(msg.text, allowed.map((ws) => ws.dataset));
    const first = choice.kind === 'chosen' ? choice.dataset : choice.ranked[0]!;
    const state: ThreadState = {
      threadId: msg.threadId,
      requester: msg.author,
      channel,
      stage: 'clarifying',
      // Read against the likeliest catalog for now; read again once the dataset is chosen.
      brief: this.readBrief(msg.text, first),
      turn: 0,
      updatedAt: this.deps.now().toISOString(),
    };
    if (choice.kind === 'chosen') state.dataset = first.name;
    await this.audit(who, 'request', { text: msg.text, ...messageIdOf(msg), ...(state.dataset ? { dataset: state.dataset } : {}) });
    if (choice.kind === 'ask') {
      const prompt = datasetPrompt(choice.ranked, choice.matched);
      state.prompt = prompt;
      state.waitingSince = this.deps.now().toISOString();
      return this.say(state, 'prompt', replies.promptText(prompt), prompt);
    }
    await this.begin(state, allowed.length > 1);
  }

  private readBrief(text: string, ds: DatasetConfig): Brief {
    return readRequest(text, ds, { now: this.deps.now(), timeZone: ds.timezone });
  }

  /** The dataset is known: acknowledge, refuse any personal data named, then ask or plan. */
  private async begin(state: ThreadState, nameDataset: boolean): Promise<void> {
    const ds = this.workspaceOf(state).dataset;
    const ack = replies.acknowledgement(state.brief, ds);
    await this.say(state, 'ack', nameDataset ? `${replies.datasetChosen(ds.label)} ${ack}` : ack);
    const personal = state.brief.personalData ?? [];
    if (personal.length > 0) {
      // Labels, not catalog names: a personal dimension's name is often its column's.
      const labels = personal.map((n) => ds.dimensions.find((d) => d.name === n)?.label ?? n);
      await this.audit(this.who(state), 'denied', { reason: 'personal_data', dimensions: labels, text: state.brief.requestText });
      await this.say(state, 'note', `${personalDataRefusal(ds, personal)} I'll answer the rest of the request without it.`);
    }
    await this.advance(state);
  }

  private async onDatasetAnswer(state: ThreadState, text: string, who: Who): Promise<void> {
    const prompt = state.prompt!;
    const reading = readDatasetAnswer(prompt, byOptionNumber(prompt, text));
    if (!reading.ok) {
      state.waitingSince = this.deps.now().toISOString();
      return this.say(state, 'prompt', `${reading.message}\n\n${replies.promptText(prompt)}`, prompt, { promptLead: reading.message });
    }
    // The options were the channel's datasets when it was asked; the rules may have changed since.
    const ws = this.allowedFor(who.channel).find((w) => w.dataset.name === reading.dataset);
    if (!ws) {
      const label = this.workspaces.get(reading.dataset)?.dataset.label ?? reading.dataset;
      await this.audit(who, 'denied', { reason: 'dataset_not_allowed', text, dataset: reading.dataset });
      return this.say(state, 'note', replies.datasetNoLongerOffered(label));
    }
    state.dataset = reading.dataset;
    delete state.prompt;
    state.brief = this.readBrief(state.brief.requestText, ws.dataset);
    await this.begin(state, true);
  }

  /** Asks the next prompt, or proposes the plan when nothing is left to ask. */
  private async advance(state: ThreadState): Promise<void> {
    const ws = this.workspaceOf(state);
    const prompt = nextPrompt(state.brief, this.promptContext(ws));
    state.waitingSince = this.deps.now().toISOString();
    if (prompt) {
      state.prompt = prompt;
      await this.say(state, 'prompt', replies.promptText(prompt), prompt);
      return;
    }
    delete state.prompt;
    state.plan = buildPlan(state.brief, ws.dataset, ws.coverage);
    state.stage = 'planning';
    await this.say(state, 'plan', replies.planText(state.plan, ws.dataset, this.locale), undefined, { quickReplies: replies.PLAN_REPLIES });
  }

  private async onAnswer(state: ThreadState, text: string): Promise<void> {
    const prompt = state.prompt!;
    const reading = readAnswer(prompt, byOptionNumber(prompt, text), state.brief, this.promptContext(this.workspaceOf(state)));
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
      return this.launch(state);
    }
    if (edit.type === 'cancel') {
      state.stage = 'cancelled';
      delete state.waitingSince;
      return this.say(state, 'cancelled', replies.cancelled());
    }
    state.waitingSince = this.deps.now().toISOString();
    if (edit.type === 'unknown') return this.say(state, 'note', replies.planEditHelp());
    const resolved = this.resolvePlanEdit(edit, state);
    if ('refusal' in resolved) return this.say(state, 'note', resolved.refusal);
    const { plan, error } = applyPlanEdit(state.plan!, resolved.edit);
    if (error) return this.say(state, 'note', error);
    state.plan = plan;
    await this.say(state, 'plan', replies.planText(plan, this.workspaceOf(state).dataset, this.locale), undefined, { quickReplies: replies.PLAN_REPLIES });
  }

  /** Matches an edit's words to the catalog and the data's coverage. */
  private resolvePlanEdit(edit: PlanEdit, state: ThreadState): { edit: PlanEdit } | { refusal: string } {
    const ws = this.workspaceOf(state);
    if (edit.type === 'add_breakdown') {
      const hit = findTerms(edit.phrase, catalogTerms(ws.dataset)).find((h) => h.term.kind === 'dimension' || h.term.kind === 'personal');
      if (hit?.term.kind === 'personal') return { refusal: personalDataRefusal(ws.dataset, [hit.term.name]) };
      return { edit: { ...edit, ...(hit ? { dimension: hit.term.name } : {}) } };
    }
    if (edit.type === 'window') {
      const w = readWindow(edit.phrase, ws.coverage);
      if ('error' in w) return { refusal: w.error };
      return { edit: { ...edit, window: w.window } };
    }
    return { edit };
  }

  /**
   * Runs (or resumes) the plan: sub-questions compute through the shared job queue, and their
   * posts go out in plan order as each is ready. A sub-question already posted is skipped, so
   * a resumed run never posts twice.
   */
  private async runPlan(started: ThreadState): Promise<void> {
    const plan = started.plan!;
    const ws = this.workspaceOf(started);
    // What this run's sub-questions share (one rollup; identical queries run once); freed when the run ends.
    const scope = openRunScope(plan.items, ws);
    try {
      await this.runPlanIn(started, ws, scope);
    } finally {
      await scope.close();
    }
  }

  /** One data-quality pass per run, its SQL in the audit log; if it cannot run, each answer reports its own error. */
  private async checkRunQuality(items: SubQuestion[], ws: Workspace, who: Who): Promise<{ report?: QualityReport; failure?: unknown }> {
    const ran: NamedQuery[] = [];
    const quality = await timePhase(this.deps.phases, 'checks', () => checkQuality(items, ws, { onQuery: (q) => ran.push(q) })).then(
      (report) => ({ report }),
      (failure: unknown) => ({ failure }),
    );
    for (const q of ran) await this.audit(who, 'sql', { subQuestion: null, template: 'quality_check', query: q.name, sql: q.sql, params: q.params, dataset: ws.dataset.name });
    return quality;
  }

  private async runPlanIn(started: ThreadState, ws: Workspace, scope: RunScope): Promise<void> {
    const threadId = started.threadId;
    const plan = started.plan!;
    const run = started.run!;
    const audience = started.brief.audience ?? 'managers';
    const who = this.who(started);
    const runKey = (name: string) => `${threadId}:run${run.number}:${name}`;
    // Charts of this process's answers, for the digest (after a restart, only those made since).
    const charts = new Map<number, DigestChart>();
    const phases = this.deps.phases;
    if (!(await this.mayRun(started, who))) return;
    await this.deps.store.appendAudit(this.runEntry(who, 'started', run.number));
    const checked = await this.checkRunQuality(plan.items, ws, who);
    const quality = checked.report;
    // A check that could not run is said in the thread, never skipped silently.
    if (checked.failure !== undefined) await this.postOnce(threadId, runKey('quality-failed'), { text: replies.qualityCheckFailed(checked.failure) }, who);
    const progressRef = await this.postOnce(threadId, runKey('progress'), { text: replies.progress(run.posted.length, plan.items.length) }, who);
    // The queries each sub-question ran, for the audit log (kept even when presenting fails).
    const ran = plan.items.map(() => [] as NamedQuery[]);
    // Once the run stops (cancelled, finished, or failed), jobs still waiting their turn are skipped.
    let stopped = false;
    // Jobs queue in start order (the long table scans first, so they are not left for last);
    // answers are still posted in plan order.
    const pending: (Promise<{ presented: PresentedPost | null; failure: string | null }> | null)[] = plan.items.map(() => null);
    for (const i of scope.startOrder(plan.items)) {
      const sq = plan.items[i]!;
      pending[i] = run.posted.includes(sq.id)
        ? null
        : this.deps
            .jobs(async () => {
              if (stopped) throw new Error('the run stopped');
              this.deps.onJobStart?.(threadId, sq);
              const answer = await answerSubQuestion(sq, ws, {
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
              (presented) => ({ presented, failure: null }),
              (err: unknown) => ({ presented: null, failure: replies.subQuestionFailed(i + 1, err) }),
            );
    }
    try {
      await this.postInOrder(started, ws, audience, who, pending, ran, charts, progressRef);
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
  private mayRun(started: ThreadState, who: Who): Promise<boolean> {
    return this.inThread(started.threadId, async () => {
      const state = await this.deps.store.get(started.threadId);
      if (!state || state.stage !== 'running' || state.run?.number !== started.run!.number) return false;
      const refusal = this.threadRefusal(state, who.channel);
      if (!refusal) return true;
      await this.audit(who, 'denied', { reason: refusal.reason, run: state.run.number, ...(state.dataset ? { dataset: state.dataset } : {}) });
      state.stage = 'cancelled';
      await this.say(state, 'note', refusal.text);
      return false;
    });
  }

  /** Posts each answer in plan order as it is ready, then the summary, while the run is current. */
  private async postInOrder(
    started: ThreadState,
    ws: Workspace,
    audience: Audience,
    who: Who,
    pending: (Promise<{ presented: PresentedPost | null; failure: string | null }> | null)[],
    ran: NamedQuery[][],
    charts: Map<number, DigestChart>,
    progressRef: string,
  ): Promise<void> {
    const threadId = started.threadId;
    const plan = started.plan!;
    const run = started.run!;
    const runKey = (name: string) => `${threadId}:run${run.number}:${name}`;
    const phases = this.deps.phases;
    // This run is still the thread's current one and has not been cancelled.
    const current = (s: ThreadState | undefined): s is ThreadState => !!s && s.stage === 'running' && s.run?.number === run.number;
    for (const [i, sq] of plan.items.entries()) {
      const job = pending[i];
      if (!job) continue;
      const { presented, failure } = await job;
      const stillOn = await this.inThread(threadId, async () => {
        const state = await this.deps.store.get(threadId);
        if (!current(state)) return false;
        for (const q of ran[i]!) {
          await this.audit(who, 'sql', {
            subQuestion: sq.id,
            template: sq.template,
            query: q.name,
            sql: q.sql,
            params: q.params,
            dataset: ws.dataset.name,
            ...(failure ? { failed: true } : {}),
          });
        }
        await this.postOnce(threadId, runKey(`answer:${sq.id}`), presented ? presented.post : { text: failure! }, who);
        state.run!.posted.push(sq.id);
        if (presented?.takeaway) state.run!.takeaways.push({ ...presented.takeaway, position: i + 1 });
        if (failure) state.run!.failures++;
        state.updatedAt = this.deps.now().toISOString();
        await this.deps.store.put(state);
        await this.deps.port.update(threadId, progressRef, replies.progress(state.run!.posted.length, plan.items.length));
        return true;
      });
      if (presented?.chart) charts.set(i + 1, { png: presented.chart, ...(presented.chartSpec ? { spec: presented.chartSpec } : {}) });
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
        ...(phases ? { timings: phases } : {}),
      });
      // The run's end is logged with its summary post: both or neither, once.
      await this.postOnce(threadId, runKey('summary'), summary, who, [this.runEntry(who, 'finished', run.number)]);
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
    await this.postOnce(state.threadId, key, { text, ...(prompt ? { prompt } : {}), ...extra }, this.who(state));
  }

  /**
   * A key posted before (by this process, another replica, or before a restart) is not posted
   * again; each post is audited, with any entries that belong with it.
   */
  private async postOnce(threadId: string, key: string, post: Omit<OutgoingPost, 'key'>, who: Who, alsoLog: AuditEntry[] = []): Promise<string> {
    const entry = this.auditEntry(who, 'post', { key, text: post.text, files: (post.files ?? []).map((f) => f.name) });
    return this.deps.store.postOnce({ key, threadId, audit: [entry, ...alsoLog] }, (session?: SqlSession) =>
      this.deps.port.post(threadId, { key, ...post }, session),
    );
  }
}

function messageIdOf(msg: IncomingMessage): { messageId?: string } {
  return msg.messageId !== undefined ? { messageId: msg.messageId } : {};
}

/** "2" picks the second option; anything else is read as typed. */
function byOptionNumber(prompt: Prompt, text: string): string {
  const n = /^\s*(\d{1,2})\s*[.)]?\s*$/.exec(text);
  const option = n ? prompt.options[Number(n[1]) - 1] : undefined;
  return option ? option.value : text;
}
