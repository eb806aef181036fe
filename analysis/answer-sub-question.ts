// Compile -> run -> read for one sub-question: the only analysis step that touches a database.
import { templateFor } from './templates/index.js';
import type { Answer, ResultTable, SubQuestion } from './types.js';
import type { Workspace } from './workspace.js';

export async function answerSubQuestion(sq: SubQuestion, ws: Workspace): Promise<Answer> {
  const template = templateFor(sq);
  const queries = template.compile(sq, ws.context);
  const tables: Record<string, ResultTable> = {};
  for (const q of queries) tables[q.name] = await ws.source.run(q, ws.runOptions);
  const { findings, caveats } = template.read(sq, tables, { dataset: ws.dataset, coverage: ws.coverage });
  return { subQuestion: sq, queries, tables, findings, caveats };
}
