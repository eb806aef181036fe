// Compile -> run -> read for one sub-question: the only analysis step that touches a database.
import { qualityCaveatsFor } from './quality/check-run.js';
import type { QualityReport } from './quality/quality-checks.js';
import { templateFor } from './templates/index.js';
import type { Answer, ResultTable, SubQuestion } from './types.js';
import type { Workspace } from './workspace.js';

export interface AnswerOptions {
  /** The run's data-quality report; its caveats are attached to the answers they touch. */
  quality?: QualityReport;
  now?: Date;
}

export async function answerSubQuestion(sq: SubQuestion, ws: Workspace, opts: AnswerOptions = {}): Promise<Answer> {
  const template = templateFor(sq);
  const queries = template.compile(sq, { ...ws.context, coverage: ws.coverage });
  const tables: Record<string, ResultTable> = {};
  for (const q of queries) tables[q.name] = await ws.source.run(q, ws.runOptions);
  const { findings, caveats } = template.read(sq, tables, { dataset: ws.dataset, coverage: ws.coverage });
  const quality = opts.quality ? qualityCaveatsFor(sq, opts.quality, ws, opts.now ?? new Date()) : [];
  return { subQuestion: sq, queries, tables, findings, caveats: [...caveats, ...quality] };
}
