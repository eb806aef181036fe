// What one sub-question declares about itself, in one place: which request kind and lens it
// answers, what it needs from the run's rollup, how it compiles to SQL and reads its results
// (its template), how it is presented (caption, chart, takeaway), and how the plan describes it.
import type { DatasetConfig } from '../../config/schema.js';
import type { Presenter } from '../present/presenter.js';
import type { Template } from '../templates/template.js';
import type { Lens, RequestKind, SubQuestion } from '../types.js';
import type { PlanWords } from './plan-words.js';

/**
 * How a sub-question may read the run's rollup (one row per local day and dimension values,
 * with the metrics' additive pieces). Absent: it always reads the table.
 */
export interface RollupUse {
  /** Only when this holds (default: always); catalog errors mean "read the table". */
  when?(sq: SubQuestion, ds: DatasetConfig): boolean;
  /** The metrics its queries aggregate (default: the sub-question's own). */
  metrics?(sq: SubQuestion, ds: DatasetConfig): string[];
  /** The metrics it compares between groups row by row, whose moments the rollup keeps (default: none). */
  moments?(sq: SubQuestion, ds: DatasetConfig): string[];
}

export interface SubQuestionDefinition<N extends string = string> {
  name: N;
  kind: RequestKind;
  lens: Lens;
  /** Set only when every number it computes is a sum or count of rows by day and dimensions. */
  rollup?: RollupUse;
  template: Template;
  present: Presenter;
  /**
   * Its chart is the metric's own series as a line (marks, a trend line or a mean over it): two such
   * items of one metric, window and grain look nearly alike, so a capped plan drops the second first.
   */
  drawsSeriesLine?: true;
  /** One plain sentence for the plan ("Monthly revenue, January 2022 to June 2025, ..."). */
  describe(words: PlanWords, sq: SubQuestion): string;
}

/** Declares a sub-question, keeping its name as a literal type for the registry's union. */
export function defineSubQuestion<const N extends string>(def: SubQuestionDefinition<N>): SubQuestionDefinition<N> {
  return def;
}
