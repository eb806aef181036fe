// How a post's interactive parts look to an adapter: the prompt without the numbered option list
// the plain text carries (buttons show the options instead), and quick replies for the plan.
// Shared by every adapter so the platforms offer the same choices.
import type { OutgoingPost, QuickReply } from '../bot/port.js';
import type { Prompt, PromptOption } from '../bot/prompts.js';

export interface PromptView {
  topic: Prompt['topic'];
  /** Text shown above the choices: any message before the prompt, then its question. */
  lead: string;
  options: PromptOption[];
  recommended: PromptOption & { reason: string };
  many: boolean;
}

export function promptView(post: OutgoingPost): PromptView | undefined {
  const p = post.prompt;
  if (!p) return undefined;
  // The bot may put a message before the prompt ("I couldn't read that as a date.").
  const lead = [post.promptLead, p.question].filter(Boolean).join('\n\n');
  return { topic: p.topic, lead, options: p.options, recommended: p.recommended, many: p.many };
}

export type { QuickReply } from '../bot/port.js';

/** One-click replies the bot offers with a post (the plan's "go" and "cancel"). */
export function quickReplies(post: OutgoingPost): QuickReply[] {
  return post.prompt ? [] : (post.quickReplies ?? []);
}

/** "a, b" for a prompt that takes several options, as the bot reads typed lists. */
export function joinChoices(values: string[]): string {
  return values.join(', ');
}
