// What every sub-question template provides: pure compilation to named queries for a dialect,
// and a pure reading of their result tables into findings and caveats. Its name, kind and lens
// are declared with the rest of its sub-question (analysis/sub-questions/).
import type { DatasetConfig } from '../../config/schema.js';
import type { CompileContext } from '../compile-context.js';
import type { Coverage } from '../coverage.js';
import type { Caveat, Finding, NamedQuery, ResultTable, SubQuestion } from '../types.js';

export interface ReadContext {
  dataset: DatasetConfig;
  coverage: Coverage;
}

export interface Reading {
  findings: Finding[];
  caveats: Caveat[];
}

export interface Template {
  compile(sq: SubQuestion, ctx: CompileContext): NamedQuery[];
  read(sq: SubQuestion, tables: Record<string, ResultTable>, ctx: ReadContext): Reading;
}
