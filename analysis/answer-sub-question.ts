// Compile -> run -> read for one sub-question: the only analysis step that touches a database.
import { statisticDataset } from './statistic.js';
import { timePhase, type PhaseTimings } from './phase-timings.js';
import { qualityCaveatsFor } from './quality/check-run.js';
import type { QualityReport } from './quality/quality-checks.js';
import { covers, rollupNeeds } from './rollup/eligibility.js';
import { dayLevelQuery } from './rollup/rollup.js';
import { definitionOf } from './sub-questions/registry.js';
import type { Template } from './templates/template.js';
import type { RunScope } from './run-scope.js';
import type { Answer, Caveat, NamedQuery, ResultTable, SubQuestion } from './types.js';
import { ownLevelDimension } from './catalog.js';
import { valueFormatOf } from './format.js';
import { mixedLevelsCaveat } from './captions/own-level-words.js';
import type { Workspace } from './workspace.js';

export interface AnswerOptions {
  /** The run's data-quality report; its caveats are attached to the answers they touch. */
  quality?: QualityReport;
  now?: Date;
  /** Collects the time spent in SQL and in reading the results (the benchmark passes one). */
  timings?: PhaseTimings;
  /**
   * What one run's sub-questions share: a query that two answers compile identically (e.g. a
   * change's drivers and its share shift) runs once per run.
   */
  scope?: RunScope;
  /** Told the sub-question's queries once compiled, before they run (so a failure's SQL is known). */
  onCompiled?: (queries: NamedQuery[]) => void;
}

export async function answerSubQuestion(sq: SubQuestion, ws: Workspace, opts: AnswerOptions = {}): Promise<Answer> {
  const template = definitionOf(sq).template;
  const queries = compileFor(sq, template, ws, opts.scope);
  opts.onCompiled?.(queries);
  const tables: Record<string, ResultTable> = {};
  for (const q of queries) tables[q.name] = await runShared(q, ws, opts);
  const { findings, caveats } = timePhase(opts.timings, 'read', () => template.read(sq, tables, { dataset: statisticDataset(ws.dataset, sq), coverage: ws.coverage }));
  const quality = opts.quality ? qualityCaveatsFor(sq, opts.quality, ws, opts.now ?? new Date()) : [];
  return { subQuestion: sq, queries, tables, findings, caveats: [...caveats, ...mixedLevels(sq, ws), ...quality] };
}

/**
 * A level averaged across members that carry their own level (catalog.ts ownLevelDimension: symbols'
 * prices, cities' temperatures), answered without that breakdown: the combined figure is kept, with
 * the caution that says why it mixes unlike things. An answer by that breakdown (or any other) is
 * not combined across the members and carries none.
 */
function mixedLevels(sq: SubQuestion, ws: Workspace): Caveat[] {
  if (sq.dimension || sq.contrast || sq.focus) return [];
  return sq.metrics.flatMap((name) => {
    const metric = ws.dataset.metrics.find((m) => m.name === name);
    const e = metric ? ownLevelDimension(ws.dataset, metric, sq.filters) : null;
    if (!metric || !e) return [];
    const dim = ws.dataset.dimensions.find((d) => d.name === e.dimension)!;
    return [mixedLevelsCaveat(metric.label, dim.label, e, valueFormatOf(metric, 'en'))];
  });
}

/**
 * The template's queries. A sub-question whose numbers are sums and counts reads a day-level
 * rollup (the table summed by day and the dimensions it uses, over the dates it reads), shown as
 * a CTE so the SQL stays a runnable account of how it was computed: an engine sending the work
 * to where the data is (a partitioned or sharded warehouse) sums each day there and returns only
 * those sums. When the run shares a rollup that covers it, an engine that keeps rollups reads its
 * stored copy instead. The rest (distinct counts, medians, per-unit values) read the table.
 */
function compileFor(sq: SubQuestion, template: Template, ws: Workspace, scope: RunScope | undefined): NamedQuery[] {
  // A statistic named ("median delay"): the metric as the sub-question sees it (analysis/statistic.ts).
  const ctx = { ...ws.context, dataset: statisticDataset(ws.context.dataset, sq), coverage: ws.coverage };
  const need = scope?.readTable ? null : rollupNeeds(sq, ws.dataset);
  if (!need) return template.compile(sq, ctx).map(({ datesRead: _dates, ...q }) => q);
  const shape = scope?.rollup;
  // The coverage is part of a shared rollup's identity: new rows (a rerun with fresh data) make a new one.
  const shared = shape && covers(shape, need) ? { shape, version: JSON.stringify(ws.coverage) } : undefined;
  return template.compile(sq, { ...ctx, rollup: need }).map((q) =>
    q.readsRows ? (({ datesRead: _dates, ...own }) => own)(q) : { name: q.name, ...dayLevelQuery(ctx, need, q, shared) },
  );
}

function runShared(q: NamedQuery, ws: Workspace, opts: AnswerOptions): Promise<ResultTable> {
  const run = () => timePhase(opts.timings, 'sql', () => ws.source.run(q, ws.runOptions), q);
  const shared = opts.scope?.results;
  if (!shared) return run();
  const key = `${q.sql}\u0000${JSON.stringify(q.params)}`;
  // Each answer gets its own copy, so no reader can change another answer's table.
  const copy = (table: ResultTable) => structuredClone(table);
  const earlier = shared.get(key);
  // Waiting for a result another answer is fetching is time spent in SQL too.
  if (earlier) return timePhase(opts.timings, 'sql', () => earlier.then(copy), q);
  const result = run();
  shared.set(key, result);
  return result.then(copy);
}
