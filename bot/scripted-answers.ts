// The answers file of `threadcount ask`: what the requester would type for each prompt topic.
// A topic left out takes the bot's recommended default; an unknown key is an error.
import { readFileSync } from 'node:fs';
import { z } from 'zod';
import { ConfigError, parseYamlWithSchema } from '../config/load.js';

const typed = z.union([z.string(), z.number()]).transform(String);

export const scriptedAnswersSchema = z
  .object({
    /** When the channel may use several datasets and the request does not settle which. */
    dataset: typed.optional(),
    audience: typed.optional(),
    deadline: typed.optional(),
    metrics: z.union([typed, z.array(typed).transform((xs) => xs.join(', '))]).optional(),
    /** When a word matches several values of the data: which was meant. */
    values: z.union([typed, z.array(typed).transform((xs) => xs.join(', '))]).optional(),
    grain: typed.optional(),
    window: typed.optional(),
    dimensions: z.union([typed, z.array(typed).transform((xs) => xs.join(', '))]).optional(),
    /** Plan replies in order, e.g. ["drop 2", "go"]; the last one should agree or cancel. */
    plan: z.union([typed.transform((s) => [s]), z.array(typed)]).optional(),
    /** Follow-ups sent after the run finishes, each once the run before it has ("rerun it weekly", "same for 2023"). */
    after: z.union([typed.transform((s) => [s]), z.array(typed)]).optional(),
  })
  .strict();
export type ScriptedAnswers = z.output<typeof scriptedAnswersSchema>;

export function loadScriptedAnswers(file: string): ScriptedAnswers {
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (err) {
    throw new ConfigError([{ file, line: null, key: '', message: `cannot read the answers file (${(err as NodeJS.ErrnoException).code ?? String(err)})` }]);
  }
  return parseYamlWithSchema(text, file, scriptedAnswersSchema).data;
}
