// The conversation: a message in a thread moves it from one stage to the next (request -> a
// question only for what cannot be defaulted -> the brief card, corrected in place -> agreed run
// -> follow-ups that start new runs) and says so in the thread. Each handler gets the
// thread in its own stage and returns the thread's state after the message; what it says and
// logs goes through the Step, written together at the end. A new stage is a member of the
// ThreadState union and a case in `respond`.
import { datasetFacts, refreshCoverage } from '../analysis/workspace.js';
import type { DatasetConfig } from '../config/schema.js';
import { channelKey, chooseDataset } from './access.js';
import { whoOf, type Who } from './AuditLog.js';
import type { Brief } from './brief.js';
import { readCommand, type Command } from './commands.js';
import { readRequest } from './reading/read-request.js';
import { readSchedule, type ScheduleRequest } from './reading/schedule.js';
import { isDue, nextDueAfter } from './rerun-schedule.js';
import { changesSomething, readCorrection, type Correction } from './reading/corrections.js';
import { buildCard, cardControls, cardText } from './card.js';
import { applyCorrection, planFor } from './card-edits.js';
import type { IncomingMessage } from './port.js';
import { datasetPrompt, nextPrompt, personalDataRefusal, readAnswer, readDatasetAnswer, type Prompt } from './prompts.js';
import * as replies from './replies.js';
import { Step, type PostExtras, type StepContext } from './Step.js';
import type { ThreadDatasets } from './ThreadDatasets.js';
import {
  commonOf,
  enterStage,
  type CancelledState,
  type ClarifyingState,
  type PlanningState,
  type RunningState,
  type RunProgress,
  type StateStore,
  type ThreadCommon,
  type ThreadState,
} from './thread-state.js';

export interface WaitTimings {
  remindAfterMs: number;
  deadlineWarningMs: number;
}

export interface ConversationDeps {
  store: Pick<StateStore, 'get' | 'list' | 'listAudit' | 'shared'>;
  datasets: ThreadDatasets;
  steps: StepContext;
  now: () => Date;
  /** Starts (or queues) an agreed run; called once the thread's running state is written. */
  launch: (state: RunningState) => Promise<void>;
}

export class Conversation {
  constructor(private readonly deps: ConversationDeps) {}

  /** Handles one message; the caller serialises the thread's work. */
  async handle(msg: IncomingMessage): Promise<void> {
    // Delivered again by a sweep, or (replicas) both by a sweep and by a replica that was slow to it: handled once.
    const mayBeRepeat = msg.redelivered === true || this.deps.store.shared;
    if (mayBeRepeat && msg.messageId !== undefined && (await this.received(msg.threadId, msg.messageId))) return;
    const channel = channelKey(msg);
    const sender: Who = { threadId: msg.threadId, requester: msg.author, channel };
    const state = await this.deps.store.get(msg.threadId);
    const step = new Step(this.deps.steps, state ? whoOf(state) : sender, state);
    await step.commit(await this.respond(step, msg, state, sender));
  }

  /** Makes the posts the thread's last step decided, if they were not made (a process stopped in between). */
  async finishPosting(threadId: string): Promise<void> {
    const state = await this.deps.store.get(threadId);
    if (!state?.outbox?.length) return;
    await new Step(this.deps.steps, whoOf(state), state).commit(state);
  }

  /** Reminds a requester who has not answered, and warns when a deadline nears with nothing agreed. */
  async checkWaiting(threadId: string, now: number, t: WaitTimings): Promise<void> {
    const state = await this.deps.store.get(threadId);
    if (!state || (state.stage !== 'clarifying' && state.stage !== 'planning')) return;
    const step = new Step(this.deps.steps, whoOf(state), state);
    let said = false;
    if (state.waitingSince && state.remindedAtTurn !== state.turn && now - Date.parse(state.waitingSince) >= t.remindAfterMs) {
      state.remindedAtTurn = state.turn + 1;
      step.say('reminder', replies.reminder(state));
      said = true;
    }
    const deadline = state.brief.deadline;
    // "As soon as possible" is today by choice: a warning that it is close would say nothing new.
    if (deadline && deadline !== 'none' && !state.brief.deadlineAsap && !state.deadlineWarned) {
      const due = Date.parse(`${deadline}T23:59:59Z`);
      if (due - now <= t.deadlineWarningMs) {
        state.deadlineWarned = true;
        step.say('deadline', replies.deadlineNear(deadline, this.deps.datasets.locale));
        said = true;
      }
    }
    if (said) await step.commit(state);
  }

  /**
   * Starts a finished thread's scheduled rerun when it is due. The next due time moves on in the
   * same commit that starts the run, under the thread's lock: a replica that takes the lock after
   * finds nothing due, so each due time runs once. Due times missed while down run once, late.
   */
  async runDue(threadId: string, now: Date): Promise<void> {
    const state = await this.deps.store.get(threadId);
    if (!state || (state.stage !== 'done' && state.stage !== 'cancelled') || !state.plan || !isDue(state.schedule, now)) return;
    const step = new Step(this.deps.steps, whoOf(state), state);
    const schedule = { ...state.schedule, nextDue: nextDueAfter(state.schedule.cron, state.schedule.timeZone, now).toISOString() };
    state.schedule = schedule;
    try {
      await refreshCoverage(this.deps.datasets.of(state), now);
    } catch (err) {
      step.say('note', replies.rerunFailed(err));
      await step.commit(state);
      return;
    }
    step.say('rerun', replies.scheduledRerun(schedule));
    await step.commit(this.agreed(step, state, state.plan, (state.run?.number ?? 0) + 1));
  }

  /** Whether the audit log shows this message as received in the thread (its first write when handled). */
  private async received(threadId: string, messageId: string): Promise<boolean> {
    return (await this.deps.store.listAudit({ threadId })).some((e) => (e.kind === 'request' || e.kind === 'message') && e.detail.messageId === messageId);
  }

  private async respond(step: Step, msg: IncomingMessage, state: ThreadState | undefined, sender: Who): Promise<ThreadState | undefined> {
    const command = readCommand(msg.text);
    if (!state && !command) return this.startThread(step, msg, sender);
    step.log('message', { text: msg.text, ...messageIdOf(msg) }, sender);
    // The access rules may have changed since the thread started: they are checked on every message.
    const refusal = state ? this.deps.datasets.refusal(state, sender.channel) : null;
    if (state && refusal) {
      step.log('denied', { reason: refusal.reason, text: msg.text, ...(state.dataset ? { dataset: state.dataset } : {}) }, sender);
      step.say('note', refusal.text);
      return state;
    }
    if (command) return this.onCommand(step, command, msg, state, sender);
    if (!state) return undefined;
    switch (state.stage) {
      case 'clarifying':
        return state.prompt.topic === 'dataset' ? this.onDatasetAnswer(step, state, msg.text, sender) : this.onAnswer(step, state, msg.text);
      case 'planning':
        return this.onPlanReply(step, state, msg.text);
      case 'running': {
        // A scheduled rerun under way can still be asked about or stopped.
        const scheduling = readSchedule(msg.text);
        if (scheduling && scheduling.kind !== 'set') return this.onSchedule(step, state, scheduling);
        // A follow-up sent before the run ends is kept and taken up when it does (takeHeld), not lost.
        if (this.followUpOf(state, msg.text)) {
          state.held = [...(state.held ?? []), msg.text];
          step.say('note', replies.heldFollowUp(msg.text, state));
          return state;
        }
        step.say('note', replies.stillRunning(state));
        return state;
      }
      case 'done':
      case 'cancelled':
        return this.onFollowUp(step, state, msg.text);
    }
  }

  private async onCommand(step: Step, command: Command, msg: IncomingMessage, state: ThreadState | undefined, sender: Who): Promise<ThreadState | undefined> {
    // In a request's thread a command's reply is one of its posts; elsewhere a one-off reply.
    const answer = (name: string, text: string) => (state ? step.say(name, text) : step.reply(name, text));
    switch (command) {
      case 'help':
        answer('help', replies.helpText());
        return state;
      case 'catalog': {
        if (state) {
          step.say('catalog', replies.catalogText(this.deps.datasets.of(state).dataset));
          return state;
        }
        const allowed = this.deps.datasets.allowedFor(sender.channel);
        if (allowed.length === 0) {
          step.log('denied', { reason: 'no_dataset', text: msg.text }, sender);
          step.reply('denied', replies.noDatasetForChannel());
          return state;
        }
        step.reply('catalog', allowed.map((ws) => replies.catalogText(ws.dataset)).join('\n\n'));
        return state;
      }
      case 'status':
        answer('status', replies.statusText(await this.deps.store.list({ requester: msg.author }), this.deps.datasets.locale));
        return state;
      case 'cancel':
        if (!state || state.stage === 'done' || state.stage === 'cancelled') {
          step.reply('cancel', replies.nothingToCancel());
          return state;
        }
        // A card waiting for "go" is settled, so its controls cannot start what was cancelled.
        if (state.stage === 'planning') this.settleCard(step, state, replies.cancelled());
        step.say('cancelled', replies.cancelled());
        return cancelledFrom(state);
      case 'rerun': {
        if (!state || (state.stage !== 'done' && state.stage !== 'cancelled') || !state.plan) {
          step.reply('rerun', replies.nothingToRerun());
          return state;
        }
        // The data may still be down or changed: say so in the thread and keep the plan for later.
        try {
          await refreshCoverage(this.deps.datasets.of(state), this.deps.now());
        } catch (err) {
          step.say('note', replies.rerunFailed(err));
          return state;
        }
        return this.agreed(step, state, state.plan, (state.run?.number ?? 0) + 1);
      }
    }
  }

  /**
   * A new request: the channel's datasets decide where it may run. One allowed dataset is used
   * at once; of several, the one whose catalog the request names best, else the requester is asked.
   */
  private startThread(step: Step, msg: IncomingMessage, sender: Who): ThreadState | undefined {
    const allowed = this.deps.datasets.allowedFor(sender.channel);
    if (allowed.length === 0) {
      step.log('request', { text: msg.text, ...messageIdOf(msg) });
      step.log('denied', { reason: 'no_dataset', text: msg.text });
      step.reply('denied', replies.noDatasetForChannel());
      return undefined;
    }
    const choice = chooseDataset(msg.text, allowed.map((ws) => ws.dataset), (ds) => allowed.find((w) => w.dataset === ds)?.values);
    const first = choice.kind === 'chosen' ? choice.dataset : choice.ranked[0]!;
    const thread: ThreadCommon = {
      threadId: msg.threadId,
      requester: msg.author,
      channel: sender.channel,
      // Read against the likeliest catalog for now; read again once the dataset is chosen.
      brief: this.readBrief(msg.text, first),
      turn: 0,
      updatedAt: this.stamp(),
      ...(choice.kind === 'chosen' ? { dataset: first.name } : {}),
    };
    step.log('request', { text: msg.text, ...messageIdOf(msg), ...(thread.dataset ? { dataset: thread.dataset } : {}) });
    if (choice.kind === 'ask') return this.ask(step, thread, datasetPrompt(choice.ranked, choice.matched));
    return this.begin(step, thread, allowed.length > 1 ? 'its catalog has the most of the terms in your request' : undefined);
  }

  private readBrief(text: string, ds: DatasetConfig): Brief {
    const ws = this.deps.datasets.of({ threadId: '', dataset: ds.name });
    return readRequest(text, datasetFacts(ws), { now: this.deps.now(), locale: this.deps.datasets.locale });
  }

  /**
   * The dataset is known: log any personal data refused, then ask what cannot be defaulted, or post
   * the card. `datasetWhy` names the dataset (and why) when the channel could use several.
   */
  private begin(step: Step, thread: ThreadCommon, datasetWhy?: string): ThreadState {
    const ds = this.deps.datasets.of(thread).dataset;
    const personal = thread.brief.personalData ?? [];
    if (personal.length > 0) {
      // The card says the refusal (replies.cardNotes); the audit log records it.
      refusedPersonal(step, ds, personal, thread.brief.requestText);
    }
    // A value that picks out one person ("bookings for someone@example.com") is never a filter.
    const values = thread.brief.personalValues ?? [];
    if (values.length > 0) {
      step.log('denied', { reason: 'personal_value', kinds: [...new Set(values.map(replies.personalValueKind))], text: thread.brief.requestText });
      step.say('note', replies.personalValueRefused(values));
    }
    const ack = replies.acknowledgement(thread.brief, ds);
    const named = datasetWhy ? replies.datasetChosen(ds.label) : '';
    return this.advance(step, thread, named ? `${named} ${ack}` : ack, datasetWhy ? [replies.datasetChosen(ds.label, datasetWhy)] : []);
  }

  /** Asks what cannot be defaulted (with `lead` said first), or posts the brief card (with `notes`). */
  private advance(step: Step, thread: ThreadCommon, lead?: string, notes: string[] = []): ThreadState {
    const ws = this.deps.datasets.of(thread);
    const prompt = nextPrompt(thread.brief, this.deps.datasets.promptContext(ws, this.deps.now()));
    if (prompt) return this.ask(step, thread, prompt, lead);
    return this.propose(step, thread, notes);
  }

  /** Posts the brief card (what was read, what is assumed, the plan) and waits for "go" or a correction. */
  private propose(step: Step, thread: ThreadCommon, notes: string[] = []): PlanningState {
    thread.waitingSince = this.stamp();
    const { plan, post } = this.card(thread, notes);
    const cardKey = step.say('card', post.text, post.extras);
    return enterStage<PlanningState>(thread, { stage: 'planning', plan, cardKey });
  }

  /** The card for a thread's brief, and the plan it shows. */
  private card(thread: ThreadCommon, notes: string[] = []): { plan: PlanningState['plan']; post: { text: string; extras: PostExtras } } {
    const ws = this.deps.datasets.of(thread);
    const locale = this.deps.datasets.locale;
    const { plan, defaults } = planFor(thread.brief, ws.dataset, ws.coverage, thread.dropped ?? [], ws.values);
    const card = buildCard(thread.brief, plan, { dataset: ws.dataset, coverage: ws.coverage, locale, defaults });
    card.notes.unshift(...notes);
    card.notes.push(...replies.cardNotes(thread.brief, ws.dataset));
    return { plan, post: { text: cardText(card), extras: { quickReplies: replies.CARD_REPLIES, controls: cardControls(card) } } };
  }

  /** Posts a prompt and waits for its answer. */
  private ask(step: Step, thread: ThreadCommon, prompt: Prompt, lead?: string): ClarifyingState {
    thread.waitingSince = this.stamp();
    step.say('prompt', lead ? `${lead}\n\n${replies.promptText(prompt)}` : replies.promptText(prompt), { prompt, ...(lead ? { promptLead: lead } : {}) });
    return enterStage<ClarifyingState>(thread, { stage: 'clarifying', prompt });
  }

  /** An answer that could not be read: the prompt again, saying why. */
  private askAgain(step: Step, state: ClarifyingState, message: string): ClarifyingState {
    state.waitingSince = this.stamp();
    step.say('prompt', `${message}\n\n${replies.promptText(state.prompt)}`, { prompt: state.prompt, promptLead: message });
    return state;
  }

  private onDatasetAnswer(step: Step, state: ClarifyingState, text: string, sender: Who): ThreadState {
    const reading = readDatasetAnswer(state.prompt, byOptionNumber(state.prompt, text));
    if (!reading.ok) return this.askAgain(step, state, reading.message);
    // The options were the channel's datasets when it was asked; the rules may have changed since.
    const ws = this.deps.datasets.allowedFor(sender.channel).find((w) => w.dataset.name === reading.dataset);
    if (!ws) {
      const label = this.deps.datasets.workspaces.get(reading.dataset)?.dataset.label ?? reading.dataset;
      step.log('denied', { reason: 'dataset_not_allowed', text, dataset: reading.dataset }, sender);
      step.say('note', replies.datasetNoLongerOffered(label));
      return state;
    }
    const thread = commonOf(state);
    thread.dataset = reading.dataset;
    thread.brief = this.readBrief(state.brief.requestText, ws.dataset);
    return this.begin(step, thread, 'as you chose');
  }

  private onAnswer(step: Step, state: ClarifyingState, text: string): ThreadState {
    const ctx = this.deps.datasets.promptContext(this.deps.datasets.of(state), this.deps.now());
    const reading = readAnswer(state.prompt, byOptionNumber(state.prompt, text), state.brief, ctx);
    if (!reading.ok) {
      if (reading.personal) refusedPersonal(step, ctx.dataset, reading.personal, text);
      return this.askAgain(step, state, reading.message);
    }
    // "ok" to the recommendation to stop (nothing in the data measures what was asked).
    if (reading.stop) {
      step.say('cancelled', replies.cancelled());
      return cancelledFrom(state);
    }
    state.brief = reading.brief;
    return this.advance(step, state);
  }

  /** A reply to the card: "go", "cancel", or a correction that edits the card in place. */
  private onPlanReply(step: Step, state: PlanningState, text: string): ThreadState {
    const c = this.correction(state, text);
    if (c.agree) {
      if (state.plan.items.length === 0) {
        step.say('note', replies.emptyPlan());
        return state;
      }
      this.settleCard(step, state, replies.cardAgreed(state.plan.items.length));
      return this.agreed(step, state, state.plan, 1);
    }
    if (c.cancel) {
      this.settleCard(step, state, replies.cancelled());
      step.say('cancelled', replies.cancelled());
      return cancelledFrom(state);
    }
    state.waitingSince = this.stamp();
    const edit = this.edit(step, state, c, text);
    if (!edit) return state;
    state.brief = edit.brief;
    state.dropped = edit.dropped;
    const { plan, post } = this.card(state);
    state.plan = plan;
    if (state.cardKey) step.edit(state.cardKey, post.text, post.extras);
    else state.cardKey = step.say('card', post.text, post.extras);
    step.say('note', replies.cardChanged(edit.changes, edit.problems));
    return state;
  }

  /**
   * After a run: a correction ("rerun it weekly", "same for 2023", "now split that by channel",
   * "drop the seasonality one") starts a new run from the last brief with the change, asking
   * nothing again; a new question gets a card of its own, keeping what the thread settled.
   */
  private onFollowUp(step: Step, state: ThreadState, text: string): ThreadState {
    const scheduling = readSchedule(text);
    if (scheduling) return this.onSchedule(step, state, scheduling);
    const kind = this.followUpOf(state, text);
    const ws = this.deps.datasets.of(state);
    if (kind === 'change' && 'plan' in state && state.plan) {
      const c = this.correction(state, text);
      const edit = this.edit(step, state, c, text);
      if (!edit) return state;
      const thread = commonOf(state);
      thread.brief = edit.brief;
      thread.dropped = edit.dropped;
      const { plan } = planFor(edit.brief, ws.dataset, ws.coverage, edit.dropped, ws.values);
      step.say('rerun', replies.followUpRun(edit.changes, edit.problems, replies.planLines(plan, ws.dataset, this.deps.datasets.locale)));
      return this.agreed(step, thread, plan, ('run' in state && state.run ? state.run.number : 0) + 1);
    }
    if (kind === 'question') {
      const read = this.readBrief(text, ws.dataset);
      const thread = commonOf(state);
      const before = state.brief;
      // What the thread already settled carries over unless the new question says otherwise.
      thread.brief = { ...read, audience: read.audience ?? before.audience, grain: read.grain ?? before.grain, ...(read.deadline || !before.deadline ? {} : { deadline: before.deadline, ...(before.deadlineAsap ? { deadlineAsap: true as const } : {}) }) };
      delete thread.dropped;
      return this.advance(step, thread);
    }
    step.say('note', replies.finished());
    return state;
  }

  /** What a message after (or during) a run asks: a change to the last run, a new question, or neither. */
  private followUpOf(state: ThreadState, text: string): 'change' | 'question' | null {
    const c = this.correction(state, text);
    if (c.agree || c.cancel) return null;
    if (changesSomething(c) && 'plan' in state && state.plan) return 'change';
    const read = this.readBrief(text, this.deps.datasets.of(state).dataset);
    // A new question names something to measure, break down, filter or date; "thanks!" names nothing (its kind is only a default).
    const namesSomething = read.metrics.length > 0 || read.questions.some((q) => q.metrics.length > 0 || q.dimensions.length > 0 || q.filters.length > 0 || q.window || q.comparisonGroup);
    return read.questions.length > 0 && namesSomething && c.unread.length === 0 ? 'question' : null;
  }

  /** A finished run's first held follow-up, taken up as if sent now; the rest wait for the run it starts. */
  async takeHeld(threadId: string): Promise<void> {
    const state = await this.deps.store.get(threadId);
    if (!state || state.stage !== 'done' || !state.held?.length) return;
    const [text, ...rest] = state.held;
    const step = new Step(this.deps.steps, whoOf(state), state);
    if (rest.length > 0) state.held = rest;
    else delete state.held;
    step.say('note', replies.takingUpHeld(text!));
    await step.commit(this.onFollowUp(step, state, text!));
  }

  /** "every Monday at 9", "stop the schedule", "when does it run?" on a finished thread. */
  private onSchedule(step: Step, state: ThreadState, asked: ScheduleRequest): ThreadState {
    if (asked.kind === 'ask') {
      step.say('schedule', replies.scheduleTold(state.schedule));
      return state;
    }
    if (asked.kind === 'stop') {
      step.say('schedule', replies.scheduleStopped(state.schedule));
      delete state.schedule;
      return state;
    }
    if (!('plan' in state && state.plan)) {
      step.say('schedule', replies.nothingToRerun());
      return state;
    }
    const configured = this.deps.datasets.of(state).dataset.timezone;
    const timeZone = configured || 'UTC';
    const { cron, words, assumed } = asked.schedule;
    state.schedule = { cron, words, timeZone, nextDue: nextDueAfter(cron, timeZone, this.deps.now()).toISOString() };
    step.say('schedule', replies.scheduleSet(state.schedule, assumed, !!configured));
    return state;
  }

  private correction(state: ThreadState, text: string): Correction {
    const ws = this.deps.datasets.of(state);
    return readCorrection(text, datasetFacts(ws), this.deps.now(), this.deps.datasets.locale, state.brief);
  }

  /** A correction applied to the thread's brief; undefined (with the reason said) when nothing could change. */
  private edit(step: Step, state: PlanningState | ThreadState, c: Correction, text: string): ReturnType<typeof applyCorrection> | undefined {
    const ws = this.deps.datasets.of(state);
    if (c.personalData.length > 0) {
      refusedPersonal(step, ws.dataset, c.personalData, text);
      step.say('note', personalDataRefusal(ws.dataset, c.personalData));
      return undefined;
    }
    const plan = 'plan' in state && state.plan ? state.plan : planFor(state.brief, ws.dataset, ws.coverage, state.dropped ?? [], ws.values).plan;
    const edit = applyCorrection(state.brief, c, plan, state.dropped ?? [], { dataset: ws.dataset, coverage: ws.coverage, locale: this.deps.datasets.locale, words: text });
    if (edit.changes.length === 0) {
      step.say('note', replies.correctionNotRead(text, c.unread, edit.problems));
      return undefined;
    }
    return edit;
  }

  /** The card answered: its controls removed, so it cannot be answered twice; its text stays with a last line. */
  private settleCard(step: Step, state: PlanningState, last: string): void {
    if (!state.cardKey) return;
    const { post } = this.card(state);
    step.edit(state.cardKey, `${post.text.split('\n').filter((l) => !/^For example:/.test(l)).join('\n')}\n${last}`);
  }

  /** A plan agreed (or rerun): the thread runs it once its state is written. */
  private agreed(step: Step, thread: ThreadCommon, plan: PlanningState['plan'], number: number): RunningState {
    const run: RunProgress = { number, posted: [], takeaways: [], failures: 0 };
    const running = enterStage<RunningState>(thread, { stage: 'running', plan, run });
    delete running.waitingSince;
    step.then(() => this.deps.launch(running));
    return running;
  }

  private stamp(): string {
    return this.deps.now().toISOString();
  }
}

/** A refusal to touch personal data, in the audit log: which dimensions (by label) and the words that asked. */
function refusedPersonal(step: Step, ds: DatasetConfig, names: readonly string[], text: string): void {
  // Labels, not catalog names: a personal dimension's name is often its column's.
  const labels = names.map((n) => ds.dimensions.find((d) => d.name === n)?.label ?? n);
  step.log('denied', { reason: 'personal_data', dimensions: labels, text });
}

/** Cancelled from any stage; the plan and run are kept, so "rerun" can start it again. */
function cancelledFrom(state: ThreadState): CancelledState {
  const cancelled = enterStage<CancelledState>(state, {
    stage: 'cancelled',
    ...('plan' in state && state.plan ? { plan: state.plan } : {}),
    ...('run' in state && state.run ? { run: state.run } : {}),
  });
  delete cancelled.waitingSince;
  // Follow-ups held for the run's end go with it.
  delete cancelled.held;
  return cancelled;
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
