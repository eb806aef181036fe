// A sub-question that failed for resources (the engine ran out of memory, or the statement ran
// past its time limit) is tried once more with a smaller plan, and the answer says what was made
// smaller: a shorter period (fewer rows read: what memory and time both grow with), else a coarser
// grain (fewer groups). Any other failure is not retried: a smaller plan would not mend it.
import { answerSubQuestion, type AnswerOptions } from './answer-sub-question.js';
import { grainAdjective } from './grains.js';
import { periodsBetween } from './periods.js';
import { SourceError } from './sources/data-source.js';
import type { Answer, DateWindow, Grain, SmallerPlanRetry, SubQuestion } from './types.js';
import { describeWindow } from './window-words.js';
import type { Workspace } from './workspace.js';

export class SmallerPlanFailed extends SourceError {
  constructor(
    first: SourceError,
    readonly retry: SmallerPlanRetry | null,
    second?: unknown,
  ) {
    const again = second instanceof Error ? second.message : second === undefined ? '' : String(second);
    super(
      first.code,
      retry
        ? `${first.message}; tried again with ${retry.change}, and that failed too (${again})`
        : `${first.message}; no smaller plan answers the same question, so it was not tried again`,
      second ?? first,
    );
  }
}

/** Out of memory or past the time limit: the failures a smaller plan can mend. */
export function resourceFailure(err: unknown): string | null {
  if (!(err instanceof SourceError)) return null;
  if (err.code === 'timeout') return /^the query /.test(err.message) ? err.message.replace(/^the query /, '') : `timed out (${err.message})`;
  if (/out of memory/i.test(err.message)) return 'ran out of memory';
  return null;
}

const COARSER: Partial<Record<Grain, Grain>> = { day: 'week', week: 'month' };

/**
 * The same question asked of less: the latest half of its period (at whole periods of its grain,
 * at least one kept), when it has no period of comparison that a shorter one would no longer match;
 * else the next coarser grain for a daily or weekly series; else none.
 */
export function smallerPlan(sq: SubQuestion, ws: Workspace): { subQuestion: SubQuestion; change: string } | null {
  const locale = ws.config.charts.locale;
  const shown = effectiveWindow(sq.window, ws);
  if (!sq.compareWindow && !sq.launchDate && shown) {
    const periods = periodsBetween(shown.start, shown.end, sq.grain);
    if (periods.length >= 2) {
      const start = periods[Math.floor(periods.length / 2)]!;
      const window: DateWindow = { start, end: sq.window.end };
      const kept = { start, end: shown.end };
      return {
        subQuestion: { ...sq, window },
        change: `the period cut to its latest half, ${describeWindow(kept, ws.coverage, locale)} (instead of ${describeWindow(shown, ws.coverage, locale)})`,
      };
    }
  }
  const coarser = COARSER[sq.grain];
  if (coarser) return { subQuestion: { ...sq, grain: coarser }, change: `a ${grainAdjective(coarser)} grain instead of ${grainAdjective(sq.grain)}` };
  return null;
}

/** The window within the data's own dates (an "all time" window starts before the data). */
function effectiveWindow(w: DateWindow, ws: Workspace): DateWindow | null {
  const { firstDate, lastDate } = ws.coverage;
  const start = firstDate && firstDate > w.start ? firstDate : w.start;
  const afterLast = lastDate ? nextDay(lastDate) : w.end;
  const end = afterLast < w.end ? afterLast : w.end;
  return start < end ? { start, end } : null;
}

function nextDay(iso: string): string {
  const d = new Date(`${iso}T00:00:00Z`);
  d.setUTCDate(d.getUTCDate() + 1);
  return d.toISOString().slice(0, 10);
}

/**
 * Answers the sub-question; if it fails for resources, once more with a smaller plan, reading the
 * table itself (a rollup shared by the run is what may have failed, and it covers the whole plan).
 * The answer carries what was changed; a second failure names both attempts.
 */
export async function answerWithSmallerPlanOnFailure(sq: SubQuestion, ws: Workspace, opts: AnswerOptions = {}): Promise<Answer> {
  try {
    return await answerSubQuestion(sq, ws, opts);
  } catch (err) {
    const failure = resourceFailure(err);
    if (failure === null) throw err;
    const smaller = smallerPlan(sq, ws);
    if (!smaller) throw new SmallerPlanFailed(err as SourceError, null);
    const retry: SmallerPlanRetry = { failure, change: smaller.change };
    const { scope: _shared, ...alone } = opts;
    try {
      const answer = await answerSubQuestion(smaller.subQuestion, ws, alone);
      return { ...answer, retry };
    } catch (again) {
      throw new SmallerPlanFailed(err as SourceError, retry, again);
    }
  }
}
