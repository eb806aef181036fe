// A post as Discord messages: the text, split at line ends into as many 2,000-character messages
// as it needs (the components and files go with the last), plus components:
// - a prompt: buttons for up to four options with the recommendation the primary one; past that,
//   or when several may be chosen, a string select and the recommendation as one primary button;
// - the brief card: a select per control (a date becomes a select of sensible days), then Go and
//   Cancel. Discord allows five rows a message, so a card with more than four controls carries the
//   first ones on the message before the last (its text split in two when it fits one message);
// - the plan: Go and Cancel.
// A custom_id carries what a click means: "tc:<v|r|q|k>:<value>" for a button (option,
// recommendation, quick reply, the card's quick reply; the letter keeps ids unique within a
// message, as Discord requires), "tc:select" for a prompt's select, "tc:c:<topic>" for a card's.
import type { PostControl } from '../../bot/port.js';
import { controlReplyLabel, postControls, promptView, quickReplies, type PostContent, type PromptView } from '../post-view.js';
import { chunks } from '../text-chunks.js';
import { deadlineChoices } from './discord-dates.js';
import { checkDiscordMessage, clip, DISCORD_LIMITS as L, type DiscordButton, type DiscordMessage, type DiscordRow } from './discord-limits.js';
import { toDiscordMarkdown } from './discord-text.js';

const BUTTON_ID = /^tc:[vrqk]:(.+)$/s;
export const SELECT_ID = 'tc:select';
const CARD_SELECT = 'tc:c:';
const STYLE = { primary: 1, secondary: 2, danger: 4 } as const;
/** A card is split with room to spare, so an edit that adds a few words still fits its messages. */
const CARD_PART = L.content - 200;

export interface DiscordOptions {
  /** Today as an ISO day, for the choices of a date control. */
  today: string;
}

/** The messages a post becomes, in order; the last carries the components. */
export function discordMessages(post: PostContent, opts: DiscordOptions): DiscordMessage[] {
  const prompt = promptView(post);
  const controls = postControls(post);
  const text = prompt ? `${prompt.lead}\n-# Recommended: *${prompt.recommended.label}* (${prompt.recommended.reason}).${prompt.many ? ' Pick one or more.' : ''} Or reply in your own words.` : post.text;
  const components = prompt ? promptRows(prompt) : controls.length ? cardRows(controls, post.quickReplies ?? [], opts) : quickRows(quickReplies(post));
  const parts = chunks(toDiscordMarkdown(text), controls.length ? CARD_PART : L.content);
  if (parts.length === 0) parts.push('-# (no text)');
  if (!prompt && !controls.length && components.length === 0) parts[parts.length - 1] = withMonospace(parts.at(-1)!, post.monospace ?? []);
  return spread(parts, components).map(checkDiscordMessage);
}

/** The text's parts with the rows spread from the last message back, five a message, splitting the text further if it must. */
export function spread(parts: string[], rows: DiscordRow[]): DiscordMessage[] {
  const texts = [...parts];
  while (texts.length * L.rows < rows.length) {
    const lines = texts[0]!.split('\n');
    if (lines.length < 2) {
      texts.unshift('-# More choices:');
      continue;
    }
    const half = Math.ceil(lines.length / 2);
    texts.splice(0, 1, lines.slice(0, half).join('\n'), lines.slice(half).join('\n'));
  }
  const out = texts.map((content): DiscordMessage => ({ content, components: [] }));
  let end = rows.length;
  for (let i = out.length - 1; i >= 0 && end > 0; i--) {
    out[i]!.components = rows.slice(Math.max(0, end - L.rows), end);
    end -= L.rows;
  }
  return out;
}

/** One message: the first of `discordMessages` with the rest of the text clipped (tests and short posts). */
export function discordMessage(post: PostContent, opts: DiscordOptions = { today: new Date().toISOString().slice(0, 10) }): DiscordMessage {
  const all = discordMessages(post, opts);
  return all.length === 1 ? all[0]! : { content: clip(all.map((m) => m.content).join('\n'), L.content), components: all.at(-1)!.components };
}

/** The content with the first monospace block that still fits Discord's limit as a code block, if any does. */
function withMonospace(content: string, blocks: string[]): string {
  // Discord reads no markdown inside a code block, so the block goes in as it is.
  const fitting = blocks.map((b) => `${content}\n\`\`\`\n${b}\n\`\`\``).find((c) => c.length <= L.content);
  return fitting ?? content;
}

function quickRows(quick: ReturnType<typeof quickReplies>, kind: 'q' | 'k' = 'q'): DiscordRow[] {
  if (quick.length === 0) return [];
  return [{ type: 1, components: quick.slice(0, L.buttonsPerRow).map((q) => button(kind, q.value, q.label, q.primary ? 'primary' : q.value === 'cancel' ? 'danger' : 'secondary')) }];
}

function cardRows(controls: PostControl[], quick: ReturnType<typeof quickReplies>, opts: DiscordOptions): DiscordRow[] {
  const rows = controls.map((c): DiscordRow => {
    const choices = c.kind === 'date' ? deadlineChoices(c, opts.today) : c.choices.map((o) => ({ ...o, current: o.value === c.current }));
    const options = choices.slice(0, L.selectOptions).map((o) => ({
      // The control's name goes with each choice, so the closed select says what it sets.
      label: clip(controlReplyLabel(c.label, o.label), L.optionLabel),
      value: clip(o.value, L.optionValue),
      ...(o.current ? { default: true } : {}),
    }));
    return { type: 1, components: [{ type: 3, custom_id: clip(`${CARD_SELECT}${c.topic}`, L.customId), placeholder: clip(c.label, L.placeholder), min_values: 1, max_values: 1, options }] };
  });
  return [...rows, ...quickRows(quick, 'k')];
}

function promptRows(p: PromptView): DiscordRow[] {
  const isOption = p.options.some((o) => o.value === p.recommended.value);
  if (!p.many && p.options.length + (isOption ? 0 : 1) <= L.buttonsPerRow) {
    // The recommendation is the primary one among the options: shown once.
    const buttons = p.options.map((o) => button(o.value === p.recommended.value ? 'r' : 'v', o.value, o.label, o.value === p.recommended.value ? 'primary' : 'secondary'));
    if (!isOption) buttons.push(button('r', p.recommended.value, p.recommended.label, 'primary'));
    return [{ type: 1, components: buttons }];
  }
  const options = p.options.slice(0, L.selectOptions).map((o) => ({ label: clip(o.label, L.optionLabel), value: o.value }));
  return [
    {
      type: 1,
      components: [
        {
          type: 3,
          custom_id: SELECT_ID,
          placeholder: p.many ? 'Choose one or more' : 'Choose one',
          min_values: 1,
          max_values: p.many ? options.length : 1,
          options,
        },
      ],
    },
    // A select cannot mark an option, so the recommendation is the one button below it: one click takes it.
    { type: 1, components: [button('r', p.recommended.value, p.recommended.label, 'primary')] },
  ];
}

function button(kind: 'v' | 'r' | 'q' | 'k', value: string, label: string, style: keyof typeof STYLE): DiscordButton {
  return { type: 2, style: STYLE[style], label: clip(label, L.buttonLabel), custom_id: `tc:${kind}:${value}` };
}

/** The text a click stands for: a button's value, or the chosen select options joined. */
export function readCustomId(customId: string, values: readonly string[] = []): string | null {
  const m = BUTTON_ID.exec(customId);
  if (m) return m[1]!;
  if ((customId === SELECT_ID || customId.startsWith(CARD_SELECT)) && values.length > 0) return values.join(', ');
  return null;
}

/** Whether a click came from the brief card, whose components stay. */
export function isCardCustomId(customId: string): boolean {
  return customId.startsWith(CARD_SELECT) || customId.startsWith('tc:k:');
}
