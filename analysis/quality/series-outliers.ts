// Unusual periods in a series, judged on what is left once the series' own cycle and trend are
// taken out, so that every July of a temperature record or every December of a shop's sales is
// not called unusual for being July or December.
//
// Rule: the modified z-score (Iglewicz & Hoaglin 1993; 0.6745·(r − median)/MAD, |z| > 3.5) over
// the remainders of a classical decomposition (Hyndman & Athanasopoulos, FPP 3rd ed., section 3.4;
// seasonal part by the median per season, see stats/decomposition.ts seasonalRemainders). The
// median and MAD keep one storm month from hiding itself by inflating the spread it is judged
// against. Without enough cycles to measure the season the values themselves are screened.
// The moving average and the season's median still lean towards a storm month, so flagged periods are
// replaced by their fit and the decomposition redone, until the flagged periods hold, before the final
// judgement (X-11's treatment of extreme values).
import { nextPeriod } from '../periods.js';
import { MODIFIED_Z_THRESHOLD, modifiedZScores, seasonalRemainders, type SeasonalModel } from '../stats/index.js';
import type { Caveat, Grain, PeriodPoint } from '../types.js';

/**
 * Below this many complete periods no period is called an outlier: a median absolute deviation
 * of three or four values says little about what is usual (a rule of thumb, common practice).
 */
export const MIN_OUTLIER_PERIODS = 5;

/**
 * The cycle each grain repeats: days by the week, weeks, months and quarters by the year (52 weeks:
 * a year is 52.18, so week positions drift a day a year, which a few years' screen can bear).
 * A year has no cycle here: yearly values are screened as they are.
 */
export const CYCLE_OF: Readonly<Partial<Record<Grain, number>>> = { day: 7, week: 52, month: 12, quarter: 4 };

/**
 * Full cycles the seasonal part needs before the remainders alone decide. With three, each season's
 * median stands on three values, so one unusual year cannot set its season's level; with two, the
 * median is the mean of two and an unusual month splits into two half-unusual ones, so a period is
 * then called unusual only when it stands out both in the remainders and among the values themselves.
 */
export const MIN_SEASONAL_CYCLES = 3;

/**
 * Decompositions run at most, the first included (see the X-11 note in screenSeries). The passes stop as soon as one
 * flags the same periods as the one before; on the record of Mauna Loa CO2 with one month 10 ppm too high that takes
 * under ten, and the cap only bounds a series whose flags keep changing.
 */
export const OUTLIER_PASSES = 10;
const MIN_CYCLES_FOR_ANY_SEASONAL = 2;

/**
 * Which rule judged a series: `seasonal` the remainders after cycle and trend; `seasonal_and_values`
 * (two full cycles) the remainders and the values together; `values` the values alone (no cycle at
 * this grain, too few cycles, or periods that do not run on one after another).
 */
export type OutlierRule = 'seasonal' | 'seasonal_and_values' | 'values';

export interface UnusualPeriod {
  period: string;
  value: number;
  /** Modified z-score of the remainder (rule `values`: of the value itself). */
  score: number;
  /** Trend and season together: what the period would have been (rules `seasonal*` only). */
  expected?: number;
}

export interface OutlierScreen {
  rule: OutlierRule;
  /** The cycle length the remainders allow for (rules `seasonal*`). */
  cycle?: number;
  /** Why the values alone were screened, when the grain has a cycle. */
  fallback?: 'too_few_cycles' | 'irregular';
  /** Median of the complete periods' values. */
  median: number;
  threshold: number;
  unusual: UnusualPeriod[];
  /** Every period the rule scored, unusual or not, in time order (the latest period's score for a KPI's context). */
  judged: UnusualPeriod[];
}

/**
 * How far from its usual value (season and trend) a period of a proportional series must be, as a
 * share of that value, to be called unusual besides its score: a manager does not call a month
 * 5% off its usual unusual, however smooth the rest. Our own choice, not a published rule.
 */
export const MATERIAL_SHARE = 0.1;

/**
 * Screens the complete periods of a series (partial and missing ones are left out). `model` is how
 * the metric's cycle behaves (catalog.ts seasonalModel); without it, multiplicative when every value
 * is positive. Null with fewer than MIN_OUTLIER_PERIODS complete periods.
 */
export function screenSeries(points: readonly PeriodPoint[], grain: Grain, model?: SeasonalModel): OutlierScreen | null {
  const complete = points.filter((p): p is PeriodPoint & { value: number } => !p.partial && p.value !== null && Number.isFinite(p.value));
  if (complete.length < MIN_OUTLIER_PERIODS) return null;
  const plain = modifiedZScores(complete.map((p) => p.value), MODIFIED_Z_THRESHOLD);
  if (!plain) return null;
  const byValue: UnusualPeriod[] = plain.outlierIndices.map((i) => ({ period: complete[i]!.period, value: complete[i]!.value, score: plain.scores[i]! }));
  const judgedByValue: UnusualPeriod[] = complete.map((p, i) => ({ period: p.period, value: p.value, score: plain.scores[i]! }));
  const base = { median: plain.median, threshold: MODIFIED_Z_THRESHOLD };
  const cycle = CYCLE_OF[grain];
  if (cycle === undefined) return { ...base, rule: 'values', unusual: byValue, judged: judgedByValue };

  // The run from the first complete period to the last, in order, a partial or missing one as a hole.
  const first = points.indexOf(complete[0]!);
  const last = points.indexOf(complete[complete.length - 1]!);
  const run = points.slice(first, last + 1);
  const consecutive = run.every((p, i) => i === 0 || nextPeriod(run[i - 1]!.period, grain) === p.period);
  if (!consecutive) return { ...base, rule: 'values', fallback: 'irregular', unusual: byValue, judged: judgedByValue };
  const values = run.map((p) => (p.partial || p.value === null || !Number.isFinite(p.value) ? null : p.value));
  // A ratio to the trend means nothing for a series that touches zero or goes below it (a profit, a temperature in °C).
  const positive = values.every((v) => v === null || v > 0);
  const m: SeasonalModel = positive ? (model ?? 'multiplicative') : 'additive';
  const decomposed = seasonalRemainders(values, cycle, m, MIN_CYCLES_FOR_ANY_SEASONAL);
  if (decomposed.kind !== 'ok') return { ...base, rule: 'values', fallback: 'too_few_cycles', unusual: byValue, judged: judgedByValue };

  const both = decomposed.fullCycles < MIN_SEASONAL_CYCLES;
  const flaggedByValue = new Set(byValue.map((u) => u.period));
  const judge = (fit: typeof decomposed) => {
    const z = modifiedZScores(fit.remainder, MODIFIED_Z_THRESHOLD);
    return z ? { z, flagged: z.outlierIndices.filter((i) => !both || flaggedByValue.has(run[i]!.period)) } : null;
  };
  const firstPass = judge(decomposed);
  if (!firstPass) return { ...base, rule: 'values', fallback: 'too_few_cycles', unusual: byValue, judged: judgedByValue };

  // Further passes, as X-11 treats extreme values (Shiskin, Young & Musgrave 1967; Ladiray & Quenneville, "Seasonal
  // Adjustment with the X-11 Method", 2001): the moving-average trend and the season's median of the first pass
  // include the storm month itself, which pulls its own fit towards it, shrinks its remainder and overstates what
  // was usual. Each flagged period is replaced by its fit, the decomposition is redone on the amended series, and the
  // original values are judged against the new fit; that fit is the "usual" reported. One such pass is not enough
  // for a large jump: the neighbours it drags below their inflated fit are flagged too and put back at that inflated
  // fit, so the amended series still leans up; repeating until the flagged periods hold lets the fit settle.
  let fit = decomposed;
  let verdict = firstPass;
  for (let pass = 2; pass <= OUTLIER_PASSES && verdict.flagged.length > 0; pass++) {
    const amended = [...values];
    for (const i of verdict.flagged) amended[i] = fit.expected[i] ?? amended[i]!;
    const refit = seasonalRemainders(amended, cycle, m, MIN_CYCLES_FOR_ANY_SEASONAL);
    if (refit.kind !== 'ok') break;
    const remainder = values.map((v, i) => remainderOf(v, refit.expected[i] ?? null, m));
    const next = judge({ ...refit, remainder });
    if (!next) break;
    const same = next.flagged.length === verdict.flagged.length && next.flagged.every((i, k) => verdict.flagged[k] === i);
    fit = { ...refit, remainder };
    verdict = next;
    if (same) break;
  }
  // A series with little noise (a smooth booking total) makes a 5% wobble score far past 3.5: a
  // period proportional to its fit is called unusual only when it is also MATERIAL_SHARE off it.
  const material = (i: number) => m === 'additive' || !(fit.expected[i]! > 0) || Math.abs(values[i]! / fit.expected[i]! - 1) >= MATERIAL_SHARE;
  const unusual = verdict.flagged.filter(material).map((i) => ({ period: run[i]!.period, value: values[i]!, score: verdict.z.scores[i]!, expected: fit.expected[i]! }));
  const judged = run.flatMap((p, i) => {
    const score = verdict.z.scores[i];
    return score === null || score === undefined ? [] : [{ period: p.period, value: values[i]!, score, expected: fit.expected[i]! }];
  });
  return { ...base, rule: both ? 'seasonal_and_values' : 'seasonal', cycle, unusual, judged };
}

/** What is left of a value once its fit is taken out, as stats/decomposition.ts seasonalRemainders defines it. */
function remainderOf(v: number | null, e: number | null, model: SeasonalModel): number | null {
  if (v === null || e === null) return null;
  if (model === 'additive') return v - e;
  return e > 0 ? v / e - 1 : null;
}

/** One `outlier` caveat per unusual complete period, carrying the rule that judged it. */
export function seriesOutliers(points: PeriodPoint[], grain: Grain, model?: SeasonalModel): Caveat[] {
  const screen = screenSeries(points, grain, model);
  if (!screen) return [];
  return screen.unusual.map((u) => ({
    code: 'outlier' as const,
    data: {
      period: u.period,
      grain,
      value: u.value,
      score: u.score,
      rule: screen.rule,
      ...(screen.cycle !== undefined ? { cycle: screen.cycle } : {}),
      ...(screen.fallback !== undefined ? { fallback: screen.fallback } : {}),
      ...(u.expected !== undefined ? { expected: u.expected } : {}),
    },
  }));
}
