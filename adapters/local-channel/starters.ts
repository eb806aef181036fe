// Starter questions for the local page and the start-up hint, drawn from the datasets being served
// (their metrics, breakdowns, the years their data covers and how often it is stamped), so a page
// serving stock prices never suggests the demo's ferry revenue, and yearly data is never asked
// about month by month.
import { inSentence, isPluralLabel } from '../../analysis/captions/grammar.js';
import { type Coverage, dataEnd } from '../../analysis/coverage.js';
import { GRAIN_WORDS } from '../../analysis/grains.js';
import type { Grain } from '../../analysis/types.js';
import { recommendedGrain } from '../../bot/prompts.js';
import type { DatasetConfig } from '../../config/schema.js';

/** "has bookings" reads wrong: the verb agrees with the label. */
const has = (label: string) => (isPluralLabel(label) ? 'have' : 'has');

/** "month by month", "year by year". */
const byGrain = (g: Grain) => `${GRAIN_WORDS[g].noun} by ${GRAIN_WORDS[g].noun}`;

export interface StarterSource {
  dataset: DatasetConfig;
  /** The data's first and last dates and how often it is stamped, as the workspace read them. */
  coverage: Coverage;
}

/** A handful of requests this data can answer, the first the one the hint suggests. */
export function startersFor(sources: readonly StarterSource[]): string[] {
  const out: string[] = [];
  for (const { dataset, coverage } of sources) {
    const metrics = dataset.metrics.filter((m) => m.name !== 'rows' || dataset.metrics.length === 1);
    const metric = (metrics[0] ?? dataset.metrics[0])!;
    const what = inSentence(metric.label);
    const dim = dataset.dimensions.find((d) => !d.personal_data);
    // The grain the bot itself would take for a request that names none (its default, one rule).
    const grain = recommendedGrain(coverage).grain;
    const first = coverage.firstDate ? Number(coverage.firstDate.slice(0, 4)) : null;
    // The last year the data covers whole: its last stamped year when the data runs to that year's end.
    const lastYear = coverage.lastDate ? Number(coverage.lastDate.slice(0, 4)) : null;
    const whole = lastYear === null ? null : runsToYearEnd(coverage, lastYear) ? lastYear : lastYear - 1;
    out.push(`How ${has(what)} ${what} moved over time, ${byGrain(grain)}?`);
    if (dim && whole !== null && first !== null && whole - 1 >= first) {
      out.push(`Which ${inSentence(dim.label)} drove the change in ${what} in ${whole} against ${whole - 1}?`);
    } else if (dim) {
      out.push(`How ${isPluralLabel(what) ? 'do' : 'does'} ${what} compare by ${inSentence(dim.label)}?`);
    }
    const second = metrics[1];
    // Year by year where there are years to compare; otherwise the data's own grain.
    const spansYears = first !== null && lastYear !== null && lastYear - first >= 2;
    if (second) out.push(`How ${has(second.label)} ${inSentence(second.label)} moved ${spansYears ? 'year by year' : byGrain(grain)}?`);
  }
  out.push('What can you measure?');
  return [...new Set(out)].slice(0, 5);
}

/** Whether the data covers `year` to its last day (a yearly stamp covers its whole year). */
function runsToYearEnd(coverage: Coverage, year: number): boolean {
  return !!coverage.lastDate && dataEnd({ lastDate: coverage.lastDate, ...(coverage.stamps ? { stamps: coverage.stamps } : {}) }) === `${year + 1}-01-01`;
}
