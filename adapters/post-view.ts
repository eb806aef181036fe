// How a post's interactive parts look to an adapter: the prompt without the numbered option list
// the plain text carries (buttons show the options instead), and quick replies for the plan.
// Shared by every adapter so the platforms offer the same choices.
import type { OutgoingPost } from '../bot/port.js';
import type { Prompt, PromptOption } from '../bot/prompts.js';
import { promptText } from '../bot/replies.js';

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
  const full = promptText(p);
  // The bot may put a message before the prompt ("I couldn't read that as a date.").
  const before = post.text.endsWith(full) ? post.text.slice(0, -full.length).trim() : null;
  const lead = before === null ? post.text : [before, p.question].filter(Boolean).join('\n\n');
  return { topic: p.topic, lead, options: p.options, recommended: p.recommended, many: p.many };
}

export interface QuickReply {
  value: string;
  label: string;
  primary: boolean;
}

/** The plan post invites "go" or "cancel"; offer them as one-click replies. */
export function quickReplies(post: OutgoingPost): QuickReply[] {
  if (post.prompt || !/\bReply "go" to run it\b/.test(post.text)) return [];
  return [
    { value: 'go', label: 'Go: run the plan', primary: true },
    { value: 'cancel', label: 'Cancel', primary: false },
  ];
}

/** "a, b" for a prompt that takes several options, as the bot reads typed lists. */
export function joinChoices(values: string[]): string {
  return values.join(', ');
}
