// What the local channel's HTTP API accepts, checked once at the edge.
import { z } from 'zod';
import { REQUEST_READ_LIMIT } from '../../bot/reading/read-request.js';

export const MAX_BODY_BYTES = 64 * 1024;

/**
 * The longest message, in UTF-16 code units as the bot and the page's maxlength count it (zod's
 * max counts code points, so an emoji would count once here and twice in the bot).
 */
export const MAX_MESSAGE_LENGTH = REQUEST_READ_LIMIT;

export const newMessageSchema = z
  .object({
    author: z.string().trim().min(1).max(80).default('you'),
    text: z
      .string()
      .trim()
      .min(1, 'text must not be empty')
      .refine((t) => t.length <= MAX_MESSAGE_LENGTH, `text must be at most ${MAX_MESSAGE_LENGTH} characters (UTF-16 code units)`),
    /** For a click: what the requester chose, shown in the thread in place of the value sent as `text`. */
    label: z.string().trim().min(1).max(400).optional(),
  })
  .strict();
export type NewMessage = z.infer<typeof newMessageSchema>;
