// Slack's limits on what we send, stated once and checked with zod before anything is posted
// (Block Kit reference: a section's text up to 3000 characters, a button's text 75 and value
// 2000, up to 25 elements in an actions block, up to 100 options in a static select, 50 blocks,
// a block_id or action_id up to 255).
import { z } from 'zod';

export const SLACK_LIMITS = {
  messageText: 40_000,
  sectionText: 3_000,
  contextText: 3_000,
  buttonText: 75,
  buttonValue: 2_000,
  actionId: 255,
  blockId: 255,
  actionsElements: 25,
  selectOptions: 100,
  optionText: 75,
  optionValue: 150,
  placeholder: 150,
  blocks: 50,
} as const;

const L = SLACK_LIMITS;
const plain = (max: number) => z.object({ type: z.literal('plain_text'), text: z.string().min(1).max(max), emoji: z.boolean().optional() }).strict();
const mrkdwn = (max: number) => z.object({ type: z.literal('mrkdwn'), text: z.string().min(1).max(max) }).strict();
const actionId = z.string().min(1).max(L.actionId);
const option = z.object({ text: plain(L.optionText), value: z.string().min(1).max(L.optionValue) }).strict();

const button = z
  .object({
    type: z.literal('button'),
    action_id: actionId,
    text: plain(L.buttonText),
    value: z.string().min(1).max(L.buttonValue),
    style: z.enum(['primary', 'danger']).optional(),
  })
  .strict();
const staticSelect = z
  .object({
    type: z.literal('static_select'),
    action_id: actionId,
    placeholder: plain(L.placeholder),
    options: z.array(option).min(1).max(L.selectOptions),
    initial_option: option.optional(),
  })
  .strict();
const multiSelect = z
  .object({
    type: z.literal('multi_static_select'),
    action_id: actionId,
    placeholder: plain(L.placeholder),
    options: z.array(option).min(1).max(L.selectOptions),
    initial_options: z.array(option).min(1).max(L.selectOptions).optional(),
  })
  .strict();
const datepicker = z
  .object({ type: z.literal('datepicker'), action_id: actionId, placeholder: plain(L.placeholder), initial_date: z.string().regex(/^\d{4}-\d{2}-\d{2}$/).optional() })
  .strict();
const blockId = z.string().min(1).max(L.blockId);

export const blockSchema = z.discriminatedUnion('type', [
  z
    .object({ type: z.literal('section'), block_id: blockId.optional(), text: mrkdwn(L.sectionText), accessory: z.union([staticSelect, datepicker]).optional() })
    .strict(),
  z.object({ type: z.literal('actions'), block_id: blockId.optional(), elements: z.array(z.union([button, staticSelect, multiSelect, datepicker])).min(1).max(L.actionsElements) }).strict(),
  z.object({ type: z.literal('context'), elements: z.array(mrkdwn(L.contextText)).min(1).max(10) }).strict(),
]);
export type SlackBlock = z.infer<typeof blockSchema>;
export type SlackButton = z.infer<typeof button>;
export type SlackOption = z.infer<typeof option>;
export type SlackElement = SlackBlock extends infer B ? (B extends { type: 'actions'; elements: (infer E)[] } ? E : never) : never;

export const messageSchema = z
  .object({ text: z.string().min(1).max(L.messageText), blocks: z.array(blockSchema).max(L.blocks).optional() })
  .strict();
export type SlackMessage = z.infer<typeof messageSchema>;

export class SlackLimitError extends Error {
  readonly code = 'slack_limit';
}

/** Checks a message against Slack's limits; throws naming the first thing over. */
export function checkSlackMessage(message: SlackMessage): SlackMessage {
  const parsed = messageSchema.safeParse(message);
  if (!parsed.success) {
    const i = parsed.error.issues[0]!;
    throw new SlackLimitError(`a Slack message is over a limit at ${i.path.join('.')}: ${i.message}`);
  }
  return parsed.data;
}

/** Cuts text to a limit, marking the cut. */
export function clip(text: string, max: number): string {
  return text.length <= max ? text : `${text.slice(0, max - 1)}…`;
}
