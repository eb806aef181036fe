// Calendar words as people type them in a hurry: "last yr", "ths quater", "last sumer",
// "novmber", "tmrw". Catalog terms and values have their own typo tolerance (catalog-match.ts);
// this pass mends only the words that periods and deadlines are read from, and only where the
// words around them say a calendar word is meant ("last yr", not "gear").
import damerauLevenshtein from 'damerau-levenshtein';
import { BUSINESS_NOUNS, MONTH_PATTERN, STOPWORDS } from './lexicon.js';

// The request words a typo most often hides ("whcih", "avrage", "waht", "hwo"): function words and
// the few words that carry a question's shape. Mended only when the word is not a word of the
// catalog, the data or the business (a typo there is the catalog's to forgive).
const EVERYDAY_TARGETS = [
  ...new Set([...STOPWORDS].filter((w) => w.length >= 3 && /^[a-z]+$/.test(w))),
  'average', 'compare', 'trend', 'growth', 'breakdown', 'monthly', 'weekly', 'quarterly', 'yearly', 'total', 'number', 'share', 'percentage', 'split', 'looking', 'doing', 'going',
];

const ABBREVIATIONS: Record<string, string> = {
  yr: 'year', yrs: 'years', yy: 'year', mth: 'month', mths: 'months', mnth: 'month', mnths: 'months', wk: 'week', wks: 'weeks',
  qtr: 'quarter', qtrs: 'quarters', tmrw: 'tomorrow', tmw: 'tomorrow', tmrow: 'tomorrow', tomoz: 'tomorrow', tdy: 'today', yday: 'yesterday', ystdy: 'yesterday',
  thsi: 'this', ths: 'this', tihs: 'this', lst: 'last', lsat: 'last', alst: 'last',
  // Question words with a letter left out (a swapped pair is mended below): "wich species", "wat share".
  wich: 'which', whic: 'which', whih: 'which', wat: 'what', wht: 'what', hw: 'how',
};

const UNITS = ['year', 'years', 'month', 'months', 'week', 'weeks', 'quarter', 'quarters', 'day', 'days'];
const SEASONS = ['summer', 'winter', 'spring', 'autumn'];
const MONTHS = ['january', 'february', 'march', 'april', 'june', 'july', 'august', 'september', 'october', 'november', 'december'];
const RELATIVE = ['yesterday', 'tomorrow', 'today'];
const QUALIFIERS = /^(?:this|last|next|past|previous|per|each|every|the|a|of|in|since|from|until|during|so far this)$/;

function closest(word: string, candidates: readonly string[]): string | undefined {
  if (word.length < 4) return undefined;
  let best: string | undefined;
  let bestSteps = Infinity;
  for (const c of candidates) {
    if (Math.abs(c.length - word.length) > 2 || c[0] !== word[0]) continue;
    const steps = damerauLevenshtein(word, c).steps;
    const allowed = c.length >= 8 ? 2 : 1;
    if (steps > 0 && steps <= allowed && steps < bestSteps) {
      best = c;
      bestSteps = steps;
    }
  }
  return best;
}

const KNOWN_MONTH = new RegExp(`^(?:${MONTH_PATTERN})$`);

/** The everyday word a mistyped one was meant to be: one edit (a swap of two letters counts as one) for longer words, only a swap for four letters. */
function everyday(word: string): string | undefined {
  let best: string | undefined;
  for (const c of EVERYDAY_TARGETS) {
    if (Math.abs(c.length - word.length) > 1 || c[0] !== word[0]) continue;
    const steps = damerauLevenshtein(word, c).steps;
    if (steps !== 1) continue;
    // Short words only by a swap of two letters ("hwo", "waht"): one changed letter makes another word too easily.
    if (word.length <= 4 && (c.length !== word.length || [...c].sort().join('') !== [...word].sort().join(''))) continue;
    if (word.length <= 5 && c.length !== word.length) continue;
    if (best) return undefined; // two candidates: leave it as written
    best = c;
  }
  return best;
}

/** The text with mistyped and abbreviated calendar and everyday words mended; everything else as written. */
export function mendCalendarWords(text: string, known: ReadonlySet<string> = new Set()): string {
  const parts = text.split(/(\s+)/);
  const words = parts.map((p) => p.toLowerCase().replace(/[^\p{L}]/gu, ''));
  const out = [...parts];
  const wordIndexes = parts.map((_, i) => i).filter((i) => !/^\s*$/.test(parts[i]!));
  for (let k = 0; k < wordIndexes.length; k++) {
    const i = wordIndexes[k]!;
    const w = words[i]!;
    if (!w || KNOWN_MONTH.test(w) || UNITS.includes(w) || SEASONS.includes(w) || RELATIVE.includes(w) || known.has(w)) continue;
    const prev = k > 0 ? words[wordIndexes[k - 1]!]! : '';
    const next = k + 1 < wordIndexes.length ? words[wordIndexes[k + 1]!]! : '';
    let mended: string | undefined;
    const abbreviation = ABBREVIATIONS[w];
    if (abbreviation) {
      // "yr" and friends only after a qualifier or a number; "tmrw" anywhere.
      const unit = UNITS.includes(abbreviation);
      const qualifier = abbreviation === 'this' || abbreviation === 'last';
      if (!unit || QUALIFIERS.test(prev) || /^\d+$/.test(prev)) mended = abbreviation;
      if (qualifier && !(UNITS.includes(next) || SEASONS.includes(next) || closest(next, [...UNITS, ...SEASONS]))) mended = undefined;
    } else if (QUALIFIERS.test(prev) || /^\d+$/.test(prev) || /^\d{2,4}$/.test(next)) {
      mended = closest(w, [...UNITS, ...SEASONS, ...MONTHS]);
    } else if (/^(?:year|month|week|quarter|summer|winter|spring|autumn)s?$/.test(next)) {
      mended = closest(w, ['this', 'last', 'next', 'past']);
    } else {
      mended = closest(w, RELATIVE);
    }
    if (!mended && !EVERYDAY_TARGETS.includes(w) && !BUSINESS_NOUNS.has(w) && !BUSINESS_NOUNS.has(w.replace(/s$/, '')) && w.length >= 3) mended = everyday(w);
    if (mended) out[i] = parts[i]!.replace(/[\p{L}]+/u, mended);
  }
  return out.join('');
}
