// A named value's share of the total ("What share of all flights does ATL have?", "what
// percentage of flights leave from ORD"): the value is read like any other, as a filter, and a
// question that asks a part of a whole (lexicon SHARE_ASK) turns it into its focus instead, so the
// total it is a share of still counts every value. Said back on the card.
import { addsAcrossSegments, dimensionByName, isBreakdownDimension } from '../../analysis/catalog.js';
import { inSentence } from '../../analysis/captions/grammar.js';
import { isDayFilter } from '../../analysis/day-of-week.js';
import type { DatasetConfig } from '../../config/schema.js';
import type { Question, ShareFocus } from '../brief.js';

/** A question that points back ("is it growing?", "and has that changed?"). */
const POINTS_BACK = /\b(?:it|its|that|this|they|their|them|those|these)\b/;

/**
 * Turns the one value named in each share question into its focus, in place, and returns what
 * to say back. A follow-up that points back to such a question with nothing of its own ("…, and is
 * it growing?") asks about the same share. A share of a measure that does not add up across
 * values (an average) stays a filter: it has no shares.
 */
export function focusShares(questions: Question[], ds: DatasetConfig): string[] {
  const notes: string[] = [];
  for (const [i, q] of questions.entries()) {
    if (q.shareOf || q.contrast) continue;
    const previous = i > 0 ? questions[i - 1]! : undefined;
    if (q.shareAsked) {
      const focus = shareFocusOf(q, ds);
      if (!focus) continue;
      setFocus(q, focus);
      notes.push(focusWords(focus, q, ds));
    } else if (previous?.shareOf && followsShare(q, previous)) {
      setFocus(q, previous.shareOf);
    }
  }
  return notes;
}

/** The filter that names exactly one value of a breakdown, where it is the question's only such filter and its measures have shares. */
export function shareFocusOf(q: Question, ds: DatasetConfig): ShareFocus | null {
  if (q.metrics.length === 0 || !q.metrics.every((m) => { const metric = ds.metrics.find((x) => x.name === m); return metric !== undefined && addsAcrossSegments(metric); })) return null;
  const named = q.filters.filter((f) => !f.exclude && !isDayFilter(f) && isBreakdownDimension(ds, f.dimension));
  if (named.length !== 1 || named[0]!.values.length !== 1) return null;
  // Two values of the breakdown asked side by side, or a breakdown by it, read the values as they are.
  if (q.dimensions.includes(named[0]!.dimension)) return null;
  return { dimension: named[0]!.dimension, value: String(named[0]!.values[0]) };
}

function setFocus(q: Question, focus: ShareFocus): void {
  q.shareOf = focus;
  q.filters = q.filters.filter((f) => !(f.dimension === focus.dimension && !f.exclude && f.values.length === 1 && String(f.values[0]) === focus.value));
}

/** Points back to the share question before it, with no other value, breakdown or measure of its own. */
function followsShare(q: Question, previous: Question): boolean {
  const focus = previous.shareOf!;
  const onlyCarried = q.filters.every((f) => f.dimension === focus.dimension && f.values.length === 1 && String(f.values[0]) === focus.value);
  return POINTS_BACK.test(q.text.toLowerCase()) && onlyCarried && q.dimensions.length === 0 && !q.contrast && q.metrics.every((m) => previous.metrics.includes(m));
}

/** "ORD" read as the origin airport whose share of all flights is asked. */
export function focusWords(focus: ShareFocus, q: Pick<Question, 'metrics'>, ds: DatasetConfig): string {
  const dim = inSentence(dimensionByName(ds, focus.dimension).label);
  const labels = q.metrics.map((m) => inSentence(ds.metrics.find((x) => x.name === m)?.label ?? m));
  return `"${focus.value}" read as the ${dim} whose share of all ${labels.join(' and ')} is asked: the total counts every ${dim}, not only ${focus.value}.`;
}
