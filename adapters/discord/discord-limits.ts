// Discord's limits on what we send, stated once and checked with zod before anything is posted:
// message content up to 2000 characters, 10 attachments, 5 action rows of up to 5 buttons or one
// select; a button label up to 80 characters, a custom_id up to 100; a select up to 25 options
// whose labels and values are up to 100 characters; a thread name up to 100; an attachment's
// description (its alt text) up to 1024.
import { z } from 'zod';

export const DISCORD_LIMITS = {
  content: 2_000,
  attachments: 10,
  rows: 5,
  buttonsPerRow: 5,
  buttonLabel: 80,
  customId: 100,
  selectOptions: 25,
  optionLabel: 100,
  optionValue: 100,
  placeholder: 150,
  threadName: 100,
  attachmentDescription: 1_024,
} as const;

const L = DISCORD_LIMITS;
const customId = z.string().min(1).max(L.customId);

// Component types and styles are the gateway's numbers: 1 action row, 2 button, 3 string select.
const button = z
  .object({ type: z.literal(2), style: z.union([z.literal(1), z.literal(2), z.literal(4)]), label: z.string().min(1).max(L.buttonLabel), custom_id: customId })
  .strict();
const select = z
  .object({
    type: z.literal(3),
    custom_id: customId,
    placeholder: z.string().max(L.placeholder),
    min_values: z.number().int().min(0).max(L.selectOptions),
    max_values: z.number().int().min(1).max(L.selectOptions),
    options: z
      .array(z.object({ label: z.string().min(1).max(L.optionLabel), value: z.string().min(1).max(L.optionValue), default: z.boolean().optional() }).strict())
      .min(1)
      .max(L.selectOptions),
  })
  .strict();
const row = z.object({ type: z.literal(1), components: z.union([z.array(button).min(1).max(L.buttonsPerRow), z.array(select).length(1)]) }).strict();

export const messageSchema = z
  .object({
    content: z.string().min(1).max(L.content),
    components: z.array(row).max(L.rows),
  })
  .strict();
export type DiscordMessage = z.infer<typeof messageSchema>;
export type DiscordRow = z.infer<typeof row>;
export type DiscordButton = z.infer<typeof button>;

export class DiscordLimitError extends Error {
  readonly code = 'discord_limit';
}

export function checkDiscordMessage(message: DiscordMessage): DiscordMessage {
  const parsed = messageSchema.safeParse(message);
  if (!parsed.success) {
    const i = parsed.error.issues[0]!;
    throw new DiscordLimitError(`a Discord message is over a limit at ${i.path.join('.')}: ${i.message}`);
  }
  return parsed.data;
}

export function clip(text: string, max: number): string {
  return text.length <= max ? text : `${text.slice(0, max - 1)}…`;
}
