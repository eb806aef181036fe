// What the local channel's HTTP API accepts, checked once at the edge.
import { z } from 'zod';

export const MAX_BODY_BYTES = 64 * 1024;

export const newMessageSchema = z
  .object({
    author: z.string().trim().min(1).max(80).default('you'),
    text: z.string().trim().min(1, 'text must not be empty').max(4000),
    /** For a click: what the requester chose, shown in the thread in place of the value sent as `text`. */
    label: z.string().trim().min(1).max(400).optional(),
  })
  .strict();
export type NewMessage = z.infer<typeof newMessageSchema>;
