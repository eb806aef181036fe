// The conversation: request -> brief -> prompts -> plan -> run -> posts. Talks to chat only
// through ThreadPort and to data only through the Workspace.
import { answerSubQuestion } from '../analysis/answer-sub-question.js';
import type { Answer } from '../analysis/types.js';
import type { Workspace } from '../analysis/workspace.js';
import { readRequest } from './intake.js';
import { applyPlanEdit, buildPlan, readPlanEdit } from './plan.js';
import type { IncomingMessage, OutgoingPost, ThreadPort } from './port.js';
import { nextPrompt, readAnswer, type Prompt, type PromptContext } from './prompts.js';
import * as replies from './replies.js';
import type { StateStore, ThreadState } from './thread-state.js';
import type { Audience } from './brief.js';

/** Turns one answered sub-question into a post (chart, caption, CSV, SQL). */
export type AnswerPresenter = (answer: Answer, ctx: { workspace: Workspace; audience: Audience; position: number }) => Promise<Omit<OutgoingPost, 'key'>>;
/** Writes the closing summary from every answer that succeeded. */
export type SummaryPresenter = (answers: Answer[], ctx: { workspace: Workspace; audience: Audience }) => Omit<OutgoingPost, 'key'>;

export interface BotDeps {
  workspace: Workspace;
  port: ThreadPort;
  store: StateStore;
  now: () => Date;
  presentAnswer: AnswerPresenter;
  presentSummary: SummaryPresenter;
}

const CATALOG_QUESTION = /\b(what can you (measure|do|answer)|which metrics|what metrics|list (the )?metrics)\b/i;

export class Bot {
  constructor(private readonly deps: BotDeps) {}

  async handle(msg: IncomingMessage): Promise<void> {
    const state = await this.deps.store.get(msg.threadId);
    if (!state) return this.startThread(msg);
    switch (state.stage) {
      case 'clarifying':
        return this.onAnswer(state, msg.text);
      case 'planning':
        return this.onPlanReply(state, msg.text);
      default:
        return this.say(state, 'note', state.stage === 'running' ? 'Still working on it; answers will appear here.' : 'This request is finished. Post a new message in the channel to start another.');
    }
  }

  private get promptContext(): PromptContext {
    const ws = this.deps.workspace;
    return { dataset: ws.dataset, coverage: ws.coverage, now: this.deps.now(), locale: ws.config.charts.locale };
  }

  private async startThread(msg: IncomingMessage): Promise<void> {
    const ds = this.deps.workspace.dataset;
    if (CATALOG_QUESTION.test(msg.text)) {
      await this.deps.port.post(msg.threadId, { key: `${msg.threadId}:catalog`, text: replies.catalogText(ds) });
      return;
    }
    const brief = readRequest(msg.text, ds, { now: this.deps.now(), timeZone: ds.timezone });
    const state: ThreadState = { threadId: msg.threadId, requester: msg.author, stage: 'clarifying', brief, turn: 0 };
    await this.post(state, 'ack', replies.acknowledgement(brief, ds));
    await this.advance(state);
  }

  /** Asks the next prompt, or proposes the plan when nothing is left to ask. */
  private async advance(state: ThreadState): Promise<void> {
    const prompt = nextPromptFor(state, this.promptContext);
    if (prompt) {
      state.prompt = prompt;
      await this.say(state, 'prompt', replies.promptText(prompt), prompt);
      return;
    }
    delete state.prompt;
    state.plan = buildPlan(state.brief, this.deps.workspace.dataset, this.deps.workspace.coverage);
    state.stage = 'planning';
    await this.showPlan(state);
  }

  private async showPlan(state: ThreadState): Promise<void> {
    await this.say(state, 'plan', replies.planText(state.plan!, this.deps.workspace.dataset, this.deps.workspace.config.charts.locale));
  }

  private async onAnswer(state: ThreadState, text: string): Promise<void> {
    const prompt = state.prompt!;
    const typed = byOptionNumber(prompt, text);
    const reading = readAnswer(prompt, typed, state.brief, this.promptContext);
    if (!reading.ok) {
      await this.say(state, 'prompt', `${reading.message}\n\n${replies.promptText(prompt)}`, prompt);
      return;
    }
    state.brief = reading.brief;
    await this.advance(state);
  }

  private async onPlanReply(state: ThreadState, text: string): Promise<void> {
    const edit = readPlanEdit(text);
    if (edit.type === 'agree') return this.run(state);
    if (edit.type === 'cancel') {
      state.stage = 'cancelled';
      await this.deps.store.put(state);
      return this.post(state, 'cancelled', replies.cancelled());
    }
    if (edit.type === 'unknown') return this.say(state, 'note', replies.planEditHelp());
    const { plan, error } = applyPlanEdit(state.plan!, edit);
    if (error) return this.say(state, 'note', error);
    state.plan = plan;
    await this.showPlan(state);
  }

  private async run(state: ThreadState): Promise<void> {
    state.stage = 'running';
    await this.deps.store.put(state);
    const plan = state.plan!;
    const audience = state.brief.audience ?? 'managers';
    await this.post(state, 'run:start', replies.runStarted(plan));
    const answers: Answer[] = [];
    for (const [i, sq] of plan.items.entries()) {
      try {
        const answer = await answerSubQuestion(sq, this.deps.workspace);
        answers.push(answer);
        const post = await this.deps.presentAnswer(answer, { workspace: this.deps.workspace, audience, position: i + 1 });
        await this.deps.port.post(state.threadId, { key: `${state.threadId}:answer:${sq.id}`, ...post });
      } catch (err) {
        // One failed sub-question is reported and the rest still run.
        await this.post(state, `answer:${sq.id}`, `${i + 1}. I could not answer this one: ${err instanceof Error ? err.message : String(err)}`);
      }
    }
    const summary = this.deps.presentSummary(answers, { workspace: this.deps.workspace, audience });
    await this.deps.port.post(state.threadId, { key: `${state.threadId}:summary`, ...summary });
    state.stage = 'done';
    await this.deps.store.put(state);
  }

  /** Posts under a fresh key; the state (with its turn counter) is saved first, so a retry after a crash reuses the key. */
  private async say(state: ThreadState, prefix: string, text: string, prompt?: Prompt): Promise<void> {
    const key = `${prefix}:${state.turn++}`;
    await this.deps.store.put(state);
    await this.post(state, key, text, prompt);
  }

  private async post(state: ThreadState, key: string, text: string, prompt?: Prompt): Promise<void> {
    await this.deps.port.post(state.threadId, { key: `${state.threadId}:${key}`, text, ...(prompt ? { prompt } : {}) });
  }
}

function nextPromptFor(state: ThreadState, ctx: PromptContext): Prompt | null {
  return nextPrompt(state.brief, ctx);
}

/** "2" picks the second option; anything else is read as typed. */
function byOptionNumber(prompt: Prompt, text: string): string {
  const n = /^\s*(\d{1,2})\s*[.)]?\s*$/.exec(text);
  const option = n ? prompt.options[Number(n[1]) - 1] : undefined;
  return option ? option.value : text;
}
