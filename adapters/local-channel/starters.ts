// Starter questions for the local page and the start-up hint, drawn from the datasets being served
// (their metrics, breakdowns and the years their data covers), so a page serving stock prices never
// suggests the demo's ferry revenue.
import { inSentence, isPluralLabel } from '../../analysis/captions/grammar.js';
import type { DatasetConfig } from '../../config/schema.js';

/** "has bookings" reads wrong: the verb agrees with the label. */
const has = (label: string) => (isPluralLabel(label) ? 'have' : 'has');

export interface StarterSource {
  dataset: DatasetConfig;
  /** The first and last dates of the data (ISO), when known. */
  firstDate: string | null;
  lastDate: string | null;
}

/** A handful of requests this data can answer, the first the one the hint suggests. */
export function startersFor(sources: readonly StarterSource[]): string[] {
  const out: string[] = [];
  for (const { dataset, firstDate, lastDate } of sources) {
    const metrics = dataset.metrics.filter((m) => m.name !== 'rows' || dataset.metrics.length === 1);
    const metric = (metrics[0] ?? dataset.metrics[0])!;
    const what = inSentence(metric.label);
    const dim = dataset.dimensions.find((d) => !d.personal_data);
    const last = lastDate ? Number(lastDate.slice(0, 4)) : null;
    const first = firstDate ? Number(firstDate.slice(0, 4)) : null;
    out.push(`How ${has(what)} ${what} moved over time, month by month?`);
    if (dim && last !== null && first !== null && last - 1 >= first) {
      out.push(`Which ${inSentence(dim.label)} drove the change in ${what} in ${last - 1} against ${last - 2 >= first ? last - 2 : first}?`);
    } else if (dim) {
      out.push(`How ${isPluralLabel(what) ? 'do' : 'does'} ${what} compare by ${inSentence(dim.label)}?`);
    }
    const second = metrics[1];
    if (second) out.push(`How ${has(second.label)} ${inSentence(second.label)} moved year by year?`);
  }
  out.push('What can you measure?');
  return [...new Set(out)].slice(0, 5);
}
