// A post as a Slack message: plain mrkdwn text, plus Block Kit for a prompt, for the brief card's
// controls, or for the plan's quick replies. Action and block ids carry what a click means.
// A prompt shows its recommendation once: among the option buttons (styled primary), or, where
// the options are a select, as the one button beside it. Several choices are a multi-select
// with the recommendation already picked and a "Send selected" button, so one click accepts it.
import type { OutgoingPost, PostControl, QuickReply } from '../../bot/port.js';
import { postControls, promptView, type PostContent, quickReplies, type PromptView } from '../post-view.js';
import { checkSlackMessage, clip, SLACK_LIMITS as L, type SlackBlock, type SlackButton, type SlackElement, type SlackMessage, type SlackOption } from './slack-limits.js';
import { chunks, toMrkdwn } from './slack-text.js';

export const ACTION = {
  option: 'tc.option.', // + index: one option's button
  recommended: 'tc.recommended', // the recommendation when it is none of the options
  select: 'tc.select', // one of many options
  multi: 'tc.multi', // several options: changing it sends nothing
  send: 'tc.send', // sends what the multi-select holds
  date: 'tc.date',
  quick: 'tc.quick.', // + index
  cardQuick: 'tc.card.q.', // + index: the card's Go and Cancel
  cardSelect: 'tc.card.s.', // + topic
  cardDate: 'tc.card.d.', // + topic
} as const;
export const ACTION_PATTERN = /^tc\./;
/** A card control's block id: "tc.card:" and the control's name and what a date sends, as JSON. */
export const CARD_BLOCK = 'tc.card:';
const MAX_BUTTONS = 5;

export function slackMessage(post: PostContent): SlackMessage {
  const text = clip(toMrkdwn(post.text), L.messageText);
  const prompt = promptView(post);
  if (prompt) return checkSlackMessage({ text, blocks: promptBlocks(prompt) });
  const quick = quickReplies(post);
  const controls = postControls(post);
  if (controls.length) return checkSlackMessage({ text, blocks: cardBlocks(post.text, controls, quick) });
  if (quick.length) {
    const buttons = quick.map((q, i): SlackButton => button(`${ACTION.quick}${i}`, q.label, q.value, q.primary ? 'primary' : undefined));
    return checkSlackMessage({ text, blocks: [...sections(post.text), { type: 'actions', block_id: 'tc.quick', elements: buttons }] });
  }
  const table = monospaceSection(post);
  if (table) return checkSlackMessage({ text, blocks: [...sections(post.text), table] });
  return checkSlackMessage({ text });
}

/**
 * The brief card: its text, then a section per control with the control beside its name (a select
 * showing the choice in force, or a datepicker), then Go and Cancel. The controls stay after a
 * click: the bot edits the card in place with what changed.
 */
function cardBlocks(text: string, controls: PostControl[], quick: QuickReply[]): SlackBlock[] {
  const rows = controls.slice(0, L.blocks - 2).map((c): SlackBlock => {
    const block_id = clip(`${CARD_BLOCK}${JSON.stringify({ label: c.label, ...(c.sends ? { sends: c.sends } : {}) })}`, L.blockId);
    const name = { type: 'mrkdwn' as const, text: `*${clip(toMrkdwn(c.label), 200)}*` };
    if (c.kind === 'date') {
      const initial = c.current && /^\d{4}-\d{2}-\d{2}$/.test(c.current) ? { initial_date: c.current } : {};
      return { type: 'section', block_id, text: name, accessory: { type: 'datepicker', action_id: `${ACTION.cardDate}${c.topic}`, placeholder: plain('Pick a date'), ...initial } };
    }
    const options = c.choices.slice(0, L.selectOptions).map(option);
    const current = options.find((o) => o.value === c.current);
    return {
      type: 'section',
      block_id,
      text: name,
      accessory: { type: 'static_select', action_id: `${ACTION.cardSelect}${c.topic}`, placeholder: plain(clip(`Choose ${c.label.toLowerCase()}`, L.placeholder)), options, ...(current ? { initial_option: current } : {}) },
    };
  });
  const buttons = quick.map((q, i): SlackButton => button(`${ACTION.cardQuick}${i}`, q.label, q.value, q.primary ? 'primary' : undefined));
  const textBlocks = sections(text).slice(0, L.blocks - rows.length - (buttons.length ? 1 : 0));
  return [...textBlocks, ...rows, ...(buttons.length ? [{ type: 'actions' as const, block_id: 'tc.card.quick', elements: buttons }] : [])];
}

/** The first of the post's monospace blocks that fits one section as a code block, if any does. */
function monospaceSection(post: PostContent): SlackBlock | null {
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
  const recommendedIsOption = p.options.some((o) => o.value === p.recommended.value);
  if (p.many) {
    const options = p.options.slice(0, L.selectOptions).map(option);
    const initial = options.filter((o) => o.value === p.recommended.value);
    elements.push({ type: 'multi_static_select', action_id: ACTION.multi, placeholder: plain('Choose one or more'), options, ...(initial.length ? { initial_options: initial } : {}) });
    elements.push(button(ACTION.send, 'Send selected', 'selected', 'primary'));
    if (!recommendedIsOption) elements.push(button(ACTION.recommended, p.recommended.label, p.recommended.value));
  } else if (p.options.length <= MAX_BUTTONS) {
    // The recommendation is the primary button among the options: shown once.
    p.options.forEach((o, i) => elements.push(button(`${ACTION.option}${i}`, o.label, o.value, o.value === p.recommended.value ? 'primary' : undefined)));
    if (!recommendedIsOption) elements.push(button(ACTION.recommended, p.recommended.label, p.recommended.value, 'primary'));
  } else {
    elements.push({ type: 'static_select', action_id: ACTION.select, placeholder: plain('Choose one'), options: p.options.slice(0, L.selectOptions).map(option) });
    // A select cannot mark an option, so the recommendation is the one button beside it.
    elements.push(button(ACTION.recommended, p.recommended.label, p.recommended.value, 'primary'));
  }
  if (p.topic === 'deadline') elements.push({ type: 'datepicker', action_id: ACTION.date, placeholder: plain('Pick a date') });
  const how = p.many ? ' Pick one or more and press *Send selected*; the recommended one is already picked.' : '';
  return [
    ...sections(p.lead),
    { type: 'actions', block_id: 'tc.prompt', elements },
    { type: 'context', elements: [{ type: 'mrkdwn', text: clip(`Recommended: *${toMrkdwn(p.recommended.label)}* (${toMrkdwn(p.recommended.reason)}).${how} Or reply in this thread in your own words.`, L.contextText) }] },
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

/** A card control's name and what its date sends, from the block id it was posted with. */
export function readCardBlockId(blockId: string | undefined): { label: string; sends?: string } | null {
  if (!blockId?.startsWith(CARD_BLOCK)) return null;
  try {
    const parsed = JSON.parse(blockId.slice(CARD_BLOCK.length)) as { label?: unknown; sends?: unknown };
    if (typeof parsed.label !== 'string') return null;
    return { label: parsed.label, ...(typeof parsed.sends === 'string' ? { sends: parsed.sends } : {}) };
  } catch {
    return null;
  }
}

function sections(text: string): SlackBlock[] {
  return chunks(toMrkdwn(text), L.sectionText).map((t) => ({ type: 'section', text: { type: 'mrkdwn', text: t } }));
}

function option(o: { value: string; label: string }): SlackOption {
  return { text: plain(clip(o.label, L.optionText)), value: clip(o.value, L.optionValue) };
}

function plain(text: string): { type: 'plain_text'; text: string } {
  return { type: 'plain_text', text };
}

function button(actionId: string, label: string, value: string, style?: 'primary' | 'danger'): SlackButton {
  return { type: 'button', action_id: actionId, text: { type: 'plain_text', text: clip(label, L.buttonText) }, value, ...(style ? { style } : {}) };
}

function isBlock(b: unknown): b is { type: string } {
  return typeof b === 'object' && b !== null && typeof (b as { type?: unknown }).type === 'string';
}
