// Ours, end to end: the `threadcount ask` path (cli/ask.ts) with the scripted answers, timed by
// phase through the optional PhaseTimings collector. Runs in a child process of its own.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Phase, PhaseTimings } from '../analysis/phase-timings.js';
import type { NamedQuery } from '../analysis/types.js';
import { ask } from '../cli/ask.js';
import { numbersFromThreadTables, type Numbers } from './numbers.js';
import { DEMO_ANSWERS, DEMO_NOW, DEMO_REQUEST } from './plan.js';

export const PHASES: Phase[] = ['open', 'checks', 'sql', 'read', 'render', 'post'];

export interface PhaseTotal {
  /** Wall-clock time during which at least one step of the phase was running. */
  wallMs: number;
  /** The steps' durations added up (more than wallMs when jobs overlap). */
  sumMs: number;
  steps: number;
}

export interface OursResult {
  end: string;
  totalMs: number;
  /** CPU time (user + system, every thread of the process: DuckDB's too) from the call to its return. */
  cpuMs: number;
  phases: Record<Phase, PhaseTotal>;
  /** Each chart's render time (the digest excluded), in plan order of completion. */
  chartRenderMs: number[];
  digestRenderMs: number[];
  /** The answers' SQL as run, in the order it started. */
  queries: NamedQuery[];
  numbers: Numbers;
  posts: number;
  files: number;
  maxRssKb: number;
}

interface Step {
  phase: Phase;
  start: number;
  end: number;
  query?: NamedQuery;
}

class Collector implements PhaseTimings {
  readonly steps: Step[] = [];
  record(phase: Phase, start: number, end: number, query?: NamedQuery): void {
    this.steps.push({ phase, start, end, ...(query ? { query } : {}) });
  }
}

export async function runOurs(args: { configPath: string }): Promise<OursResult> {
  const dir = mkdtempSync(join(tmpdir(), 'threadcount-bench-'));
  try {
    const answersFile = join(dir, 'answers.yaml');
    writeFileSync(answersFile, DEMO_ANSWERS);
    const phases = new Collector();
    const outDir = join(dir, 'thread');
    const cpuBefore = process.cpuUsage();
    const started = performance.now();
    const result = await ask({ configFile: args.configPath, request: DEMO_REQUEST, answersFile, outDir, now: new Date(DEMO_NOW), phases });
    const totalMs = performance.now() - started;
    const cpu = process.cpuUsage(cpuBefore);
    const renders = phases.steps.filter((s) => s.phase === 'render');
    // The digest is drawn once, after every answer: the last render step.
    const digest = renders.length > 0 ? renders.reduce((a, b) => (b.start > a.start ? b : a)) : undefined;
    const posts = result.thread.thread.posts;
    return {
      end: result.end,
      totalMs,
      cpuMs: (cpu.user + cpu.system) / 1000,
      phases: Object.fromEntries(PHASES.map((p) => [p, totalOf(phases.steps.filter((s) => s.phase === p))])) as Record<Phase, PhaseTotal>,
      chartRenderMs: renders.filter((s) => s !== digest).map((s) => s.end - s.start),
      digestRenderMs: digest ? [digest.end - digest.start] : [],
      queries: phases.steps
        .filter((s) => s.phase === 'sql' && s.query)
        .sort((a, b) => a.start - b.start)
        .map((s) => s.query!),
      numbers: numbersFromThreadTables(join(outDir, 'tables')),
      posts: posts.length,
      files: posts.reduce((n, p) => n + p.files.length, 0),
      maxRssKb: process.resourceUsage().maxRSS,
    };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

function totalOf(steps: Step[]): PhaseTotal {
  const sorted = [...steps].sort((a, b) => a.start - b.start);
  let wallMs = 0;
  let openStart = -Infinity;
  let openEnd = -Infinity;
  for (const s of sorted) {
    if (s.start > openEnd) {
      if (openEnd > openStart) wallMs += openEnd - openStart;
      openStart = s.start;
      openEnd = s.end;
    } else openEnd = Math.max(openEnd, s.end);
  }
  if (openEnd > openStart) wallMs += openEnd - openStart;
  return { wallMs, sumMs: steps.reduce((n, s) => n + (s.end - s.start), 0), steps: steps.length };
}
