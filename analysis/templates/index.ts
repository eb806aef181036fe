// Every sub-question template by name. A template compiles a sub-question to SQL for a
// dialect and reads the result table into findings; both are pure.
import type { CompileContext } from '../compile-context.js';
import type { Coverage } from '../coverage.js';
import type { Caveat, CompiledQuery, Finding, ResultTable, SubQuestion } from '../types.js';
import { compileSeries, readSeries } from './series.js';

export interface Template {
  name: string;
  compile(sq: SubQuestion, ctx: CompileContext): CompiledQuery;
  read(sq: SubQuestion, table: ResultTable, coverage: Coverage): { findings: Finding[]; caveats: Caveat[] };
}

export const TEMPLATES: Record<string, Template> = {
  series: { name: 'series', compile: compileSeries, read: readSeries },
};

export function templateFor(sq: SubQuestion): Template {
  const t = TEMPLATES[sq.template];
  if (!t) throw new Error(`no template named ${sq.template}`);
  return t;
}
