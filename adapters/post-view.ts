// How a post's interactive parts look to an adapter: the prompt without the numbered option list
// the plain text carries (buttons show the options instead), and quick replies for the plan.
// Shared by every adapter so the platforms offer the same choices.
import type { OutgoingPost, PostControl, QuickReply } from '../bot/port.js';
import type { Prompt, PromptOption } from '../bot/prompts.js';

export interface PromptView {
  topic: Prompt['topic'];
  /** Text shown above the choices: any message before the prompt, then its question. */
  lead: string;
  options: PromptOption[];
  recommended: PromptOption & { reason: string };
  many: boolean;
}

/** A post as an edit in place gives it (the key and files stay as they were); the key may still be there. */
export type PostContent = Omit<OutgoingPost, 'key' | 'files'> & { key?: string; files?: OutgoingPost['files'] };

export function promptView(post: Pick<OutgoingPost, 'prompt' | 'promptLead'>): PromptView | undefined {
  const p = post.prompt;
  if (!p) return undefined;
  // The bot may put a message before the prompt ("I couldn't read that as a date.").
  const lead = [post.promptLead, p.question].filter(Boolean).join('\n\n');
  return { topic: p.topic, lead, options: p.options, recommended: p.recommended, many: p.many };
}

export type { QuickReply } from '../bot/port.js';

/** One-click replies the bot offers with a post (the plan's "go" and "cancel"). */
export function quickReplies(post: Pick<OutgoingPost, 'prompt' | 'quickReplies'>): QuickReply[] {
  return post.prompt ? [] : (post.quickReplies ?? []);
}

/** The controls a post carries (the brief card's), none under a prompt. */
export function postControls(post: Pick<OutgoingPost, 'prompt' | 'controls'>): PostControl[] {
  return post.prompt ? [] : (post.controls ?? []);
}

/** What choosing `iso` in a date control sends, as if typed ("deadline 2026-12-10"). */
export function dateReply(control: PostControl, iso: string): string {
  return (control.sends ?? `${control.topic} {date}`).replaceAll('{date}', iso);
}

/**
 * How a click on a control reads as the requester's reply in the thread: the control's name and
 * what was chosen ("Grain: Weekly"), never the value the bot reads.
 */
export function controlReplyLabel(controlLabel: string, chosen: string): string {
  return `${controlLabel}: ${chosen}`;
}

/** An ISO day in words for a reply label ("Thu 10 Dec 2026"), read as a calendar day wherever the server is. */
export function dayInWords(iso: string): string {
  const d = new Date(`${iso}T12:00:00Z`);
  if (Number.isNaN(d.getTime())) return iso;
  return new Intl.DateTimeFormat('en-GB', { weekday: 'short', day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' }).format(d).replace(',', '');
}

/** "a, b" for a prompt that takes several options, as the bot reads typed lists. */
export function joinChoices(values: string[]): string {
  return values.join(', ');
}
