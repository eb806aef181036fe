// Optional timing of one run's phases, for the benchmark (bench/). A caller that passes no
// collector gets the work done exactly as before: nothing is timed and nothing is kept.
import type { NamedQuery } from './types.js';

/**
 * open: opening the dataset and reading its coverage; checks: the run's data-quality query;
 * sql: a sub-question's own queries; read: templates' readings (statistics) and presenters'
 * captions; render: chart and digest PNGs; post: files prepared and posted to the thread.
 */
export type Phase = 'open' | 'checks' | 'sql' | 'read' | 'render' | 'post';

export interface PhaseTimings {
  /** One timed step, start and end from performance.now(); SQL steps carry their query. */
  record(phase: Phase, startMs: number, endMs: number, query?: NamedQuery): void;
}

/** Runs `work` and, when a collector is given, records how long it took (a promise until it settles). */
export function timePhase<T>(timings: PhaseTimings | undefined, phase: Phase, work: () => T, query?: NamedQuery): T {
  if (!timings) return work();
  const start = performance.now();
  const out = work();
  if (out instanceof Promise) {
    return out.finally(() => timings.record(phase, start, performance.now(), query)) as T;
  }
  timings.record(phase, start, performance.now(), query);
  return out;
}
