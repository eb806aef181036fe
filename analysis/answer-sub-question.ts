// Compile -> run -> read for one sub-question: the only analysis step that touches a database.
import { templateFor } from './templates/index.js';
import type { Answer, SubQuestion } from './types.js';
import type { Workspace } from './workspace.js';

export async function answerSubQuestion(sq: SubQuestion, ws: Workspace): Promise<Answer> {
  const template = templateFor(sq);
  const query = template.compile(sq, ws.context);
  const table = await ws.source.run(query, ws.runOptions);
  const { findings, caveats } = template.read(sq, table, ws.coverage);
  return { subQuestion: sq, query, table, findings, caveats };
}
