// A post as a Discord message: content, and for a prompt either buttons (up to four options and
// "Use recommended" in one row) or a string select (more options, or several may be chosen)
// with "Use recommended" below; the plan gets "Go" and "Cancel" buttons. A custom_id carries
// what a click means: "tc:<v|r|q>:<value>" for a button (option, recommended, quick reply; the
// letter keeps ids unique within a message, as Discord requires), "tc:select" for the select.
import type { OutgoingPost } from '../../bot/port.js';
import { promptView, quickReplies, type PromptView } from '../post-view.js';
import { checkDiscordMessage, clip, DISCORD_LIMITS as L, type DiscordButton, type DiscordMessage, type DiscordRow } from './discord-limits.js';
import { toDiscordMarkdown } from './discord-text.js';

const BUTTON_ID = /^tc:[vrq]:(.+)$/s;
export const SELECT_ID = 'tc:select';
const STYLE = { primary: 1, secondary: 2, danger: 4 } as const;

export function discordMessage(post: OutgoingPost): DiscordMessage {
  const prompt = promptView(post);
  const quick = quickReplies(post);
  const text = prompt ? `${prompt.lead}\n-# Recommended: *${prompt.recommended.label}* (${prompt.recommended.reason}). Or reply in your own words.` : post.text;
  const content = clip(toDiscordMarkdown(text), L.content);
  if (prompt) return checkDiscordMessage({ content, components: promptRows(prompt) });
  if (quick.length) {
    return checkDiscordMessage({ content, components: [{ type: 1, components: quick.map((q) => button('q', q.value, q.label, q.primary ? 'primary' : q.value === 'cancel' ? 'danger' : 'secondary')) }] });
  }
  return checkDiscordMessage({ content: withMonospace(content, post.monospace ?? []), components: [] });
}

/** The content with the first monospace block that still fits Discord's limit as a code block, if any does. */
function withMonospace(content: string, blocks: string[]): string {
  // Discord reads no markdown inside a code block, so the block goes in as it is.
  const fitting = blocks.map((b) => `${content}\n\`\`\`\n${b}\n\`\`\``).find((c) => c.length <= L.content);
  return fitting ?? content;
}

function promptRows(p: PromptView): DiscordRow[] {
  const recommended = button('r', p.recommended.value, 'Use recommended', 'primary');
  if (!p.many && p.options.length < L.buttonsPerRow) {
    return [{ type: 1, components: [...p.options.map((o) => button('v', o.value, o.label, 'secondary')), recommended] }];
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
    { type: 1, components: [recommended] },
  ];
}

function button(kind: 'v' | 'r' | 'q', value: string, label: string, style: keyof typeof STYLE): DiscordButton {
  return { type: 2, style: STYLE[style], label: clip(label, L.buttonLabel), custom_id: `tc:${kind}:${value}` };
}

/** The text a click stands for: a button's value, or the chosen select options joined. */
export function readCustomId(customId: string, values: readonly string[] = []): string | null {
  const m = BUTTON_ID.exec(customId);
  if (m) return m[1]!;
  if (customId === SELECT_ID && values.length > 0) return values.join(', ');
  return null;
}
