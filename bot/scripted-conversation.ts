// Plays the requester's side of a conversation from an answers file: each prompt gets the
// scripted answer for its topic (or "ok" for the recommendation); at the brief card, each
// scripted card topic (audience, deadline, grain, window, breakdowns) is typed as a correction,
// once, then the scripted plan replies (or "go"). Drives `threadcount ask` and conversation tests.
import type { Bot } from './Bot.js';
import type { ScriptedAnswers } from './scripted-answers.js';
import type { StateStore } from './thread-state.js';

export interface ScriptedConversation {
  bot: Bot;
  store: StateStore;
  threadId: string;
  requester: string;
  request: string;
  answers: ScriptedAnswers;
  /** The channel key the requester writes in (decides the datasets it may use). */
  channel?: string;
  /** Called with each message the requester sends, so the thread can record it. */
  onRequesterMessage?: (text: string) => void;
}

export type ConversationEnd = 'done' | 'cancelled' | 'stalled';

export async function playScriptedConversation(c: ScriptedConversation): Promise<ConversationEnd> {
  const say = async (text: string) => {
    c.onRequesterMessage?.(text);
    await c.bot.handle({ threadId: c.threadId, author: c.requester, text, ...(c.channel ? { channel: c.channel } : {}) });
    // A run goes on in the background; the scripted requester waits for it like a person would.
    await c.bot.idle();
  };
  await say(c.request);
  const planReplies = [...(c.answers.plan ?? ['go'])];
  const cardCorrections = cardWords(c.answers);
  const followUps = [...(c.answers.after ?? [])];
  const tries = new Map<string, number>();
  // A requester says "go" by default; saying it again to a card that will not run (an empty plan)
  // is a stalled conversation, not fifty more replies.
  let defaultGos = 0;
  // Bounded: a wrong scripted answer is re-asked, and a second wrong answer takes the default.
  for (let turn = 0; turn < 50; turn++) {
    const state = await c.store.get(c.threadId);
    if (!state) return 'stalled';
    if (state.stage === 'done' || state.stage === 'cancelled') {
      const next = followUps.shift();
      if (next === undefined) return state.stage;
      await say(next);
      continue;
    }
    if (state.stage === 'clarifying' && state.prompt) {
      const topic = state.prompt.topic;
      const n = (tries.get(topic) ?? 0) + 1;
      tries.set(topic, n);
      const scripted = c.answers[topic];
      await say(n === 1 && scripted !== undefined ? scripted : 'ok');
      continue;
    }
    if (state.stage === 'planning') {
      const correction = cardCorrections.shift();
      const scripted = correction ?? planReplies.shift();
      if (scripted === undefined && ++defaultGos > 2) return 'stalled';
      await say(scripted ?? 'go');
      continue;
    }
    return 'stalled';
  }
  return 'stalled';
}

/** The card topics of an answers file as a requester would type them on the card. */
function cardWords(a: ScriptedAnswers): string[] {
  const out: string[] = [];
  if (a.audience !== undefined) out.push(/^(?:leadership|managers|analysts)$/i.test(a.audience) ? `for ${a.audience}` : a.audience);
  if (a.deadline !== undefined) out.push(/^\d{4}-\d{2}-\d{2}$|^(?:asap|none)$/i.test(a.deadline) ? `deadline ${a.deadline}` : a.deadline);
  if (a.grain !== undefined) out.push(a.grain);
  if (a.window !== undefined) out.push(/^all$/i.test(a.window) ? 'all the data' : a.window);
  if (a.dimensions !== undefined) out.push(/^none$/i.test(a.dimensions) ? 'no breakdown' : `add ${a.dimensions}`);
  return out;
}
