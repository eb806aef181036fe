// A post as a Slack message: plain mrkdwn text, plus Block Kit for a prompt (buttons for up to
// five options, a static select beyond, a "Use recommended" button, a datepicker when asking for
// a deadline) or for the plan's quick replies. Action ids carry what a click means.
import type { OutgoingPost } from '../../bot/port.js';
import { promptView, quickReplies, type PromptView } from '../post-view.js';
import { checkSlackMessage, clip, SLACK_LIMITS as L, type SlackBlock, type SlackButton, type SlackElement, type SlackMessage } from './slack-limits.js';
import { chunks, toMrkdwn } from './slack-text.js';

export const ACTION = {
  option: 'tc.option.', // + index
  recommended: 'tc.recommended',
  select: 'tc.select',
  date: 'tc.date',
  quick: 'tc.quick.', // + index
} as const;
export const ACTION_PATTERN = /^tc\./;
const MAX_BUTTONS = 5;

export function slackMessage(post: OutgoingPost): SlackMessage {
  const text = clip(toMrkdwn(post.text), L.messageText);
  const prompt = promptView(post);
  if (prompt) return checkSlackMessage({ text, blocks: promptBlocks(prompt) });
  const quick = quickReplies(post);
  if (quick.length) {
    const buttons = quick.map((q, i): SlackButton => button(`${ACTION.quick}${i}`, q.label, q.value, q.primary ? 'primary' : undefined));
    return checkSlackMessage({ text, blocks: [...sections(post.text), { type: 'actions', block_id: 'tc.quick', elements: buttons }] });
  }
  const table = monospaceSection(post);
  if (table) return checkSlackMessage({ text, blocks: [...sections(post.text), table] });
  return checkSlackMessage({ text });
}

/** The first of the post's monospace blocks that fits one section as a code block, if any does. */
function monospaceSection(post: OutgoingPost): SlackBlock | null {
  if (sections(post.text).length >= L.blocks) return null;
  for (const block of post.monospace ?? []) {
    // Inside a code block Slack reads no formatting; only &, < and > still need escaping.
    const code = `\`\`\`\n${block.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;')}\n\`\`\``;
    if (code.length <= L.sectionText) return { type: 'section', text: { type: 'mrkdwn', text: code } };
  }
  return null;
}

function promptBlocks(p: PromptView): SlackBlock[] {
  const elements: SlackElement[] = [];
  if (p.options.length <= MAX_BUTTONS) {
    p.options.forEach((o, i) => elements.push(button(`${ACTION.option}${i}`, o.label, o.value)));
  } else {
    elements.push({
      type: 'static_select',
      action_id: ACTION.select,
      placeholder: { type: 'plain_text', text: 'Choose one' },
      options: p.options.slice(0, L.selectOptions).map((o) => ({ text: { type: 'plain_text', text: clip(o.label, L.optionText) }, value: o.value })),
    });
  }
  if (p.topic === 'deadline') elements.push({ type: 'datepicker', action_id: ACTION.date, placeholder: { type: 'plain_text', text: 'Pick a date' } });
  elements.push(button(ACTION.recommended, 'Use recommended', p.recommended.value, 'primary'));
  const several = p.many ? ' For several, reply with them separated by commas.' : '';
  return [
    ...sections(p.lead),
    { type: 'actions', block_id: 'tc.prompt', elements },
    { type: 'context', elements: [{ type: 'mrkdwn', text: clip(`Recommended: *${toMrkdwn(p.recommended.label)}* (${toMrkdwn(p.recommended.reason)}). Or reply in this thread in your own words.${several}`, L.contextText) }] },
  ];
}

/** The prompt after a click: its text stays, the choices give way to who chose what. */
export function answeredBlocks(blocks: unknown[], userId: string, label: string): SlackBlock[] {
  // Rebuilt rather than echoed: Slack adds fields (block_id, verbatim) to the blocks it returns.
  const kept = blocks.flatMap((b): SlackBlock[] => {
    const text = isBlock(b) && b.type === 'section' ? (b as { text?: { text?: unknown } }).text?.text : undefined;
    return typeof text === 'string' && text ? [{ type: 'section', text: { type: 'mrkdwn', text } }] : [];
  });
  return [...kept, { type: 'context', elements: [{ type: 'mrkdwn', text: clip(`<@${userId}> chose *${toMrkdwn(label)}*`, L.contextText) }] }];
}

function sections(text: string): SlackBlock[] {
  return chunks(toMrkdwn(text), L.sectionText).map((t) => ({ type: 'section', text: { type: 'mrkdwn', text: t } }));
}

function button(actionId: string, label: string, value: string, style?: 'primary' | 'danger'): SlackButton {
  return { type: 'button', action_id: actionId, text: { type: 'plain_text', text: clip(label, L.buttonText) }, value, ...(style ? { style } : {}) };
}

function isBlock(b: unknown): b is { type: string } {
  return typeof b === 'object' && b !== null && typeof (b as { type?: unknown }).type === 'string';
}
