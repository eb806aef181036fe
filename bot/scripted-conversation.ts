// Plays the requester's side of a conversation from an answers file: each prompt gets the
// scripted answer for its topic (or "ok" for the recommendation), the plan gets the scripted
// plan replies (or "go"). Drives `threadcount ask` and conversation tests.
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
  const tries = new Map<string, number>();
  // Bounded: a wrong scripted answer is re-asked, and a second wrong answer takes the default.
  for (let turn = 0; turn < 50; turn++) {
    const state = await c.store.get(c.threadId);
    if (!state) return 'stalled';
    if (state.stage === 'done' || state.stage === 'cancelled') return state.stage;
    if (state.stage === 'clarifying' && state.prompt) {
      const topic = state.prompt.topic;
      const n = (tries.get(topic) ?? 0) + 1;
      tries.set(topic, n);
      const scripted = c.answers[topic];
      await say(n === 1 && scripted !== undefined ? scripted : 'ok');
      continue;
    }
    if (state.stage === 'planning') {
      await say(planReplies.shift() ?? 'go');
      continue;
    }
    return 'stalled';
  }
  return 'stalled';
}
