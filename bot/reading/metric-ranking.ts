// Which of a catalog's measures to offer first when a request's measure word is not one of its
// names: one ranking for every metric prompt ("I don't have a metric called …", "Which metric?")
// and for the measure the card assumes. A measure whose label shares a word with what was asked
// comes first ("generation" for "Net generation"), then one that money words point to ("money",
// "box office" for a gross), the request's other words deciding between them ("in the US" for US
// Gross). A count of rows is a measure only of how many things there are: it comes first only when
// the request counts ("how many", "number of") or when the catalog has no other measure.
import type { DatasetConfig, Metric } from '../../config/schema.js';
import { allowedEdits, stem } from './catalog-match.js';
import { STOPWORDS } from './lexicon.js';
import { phraseWords } from './text.js';
import { distance } from 'fastest-levenshtein';

export interface RankedMetric {
  name: string;
  /** The metric answers the words asked (a shared word, or money words for an amount). */
  fits: boolean;
  /** Why it is where it is, for the prompt's recommendation. */
  reason: string;
}

/** Words that count things: the row count is their measure. */
export const COUNTING = /\b(?:how\s+many|number\s+of|no\.?\s+of|count(?:s|ed|ing)?\s+(?:of\s+)?|counts?\b|tally)/i;
// Money that comes in, and money that goes out: "money", "earn", "box office" ask for the first.
const MONEY_ASKED = /\b(?:money|takings|income|sales|turnover|revenues?|earnings?|earn(?:s|ed|t)?|receipts|gross(?:ed|es)?|box[- ]office|top[- ]?line|cash|makes?\s+(?:more|less|the\s+most)?\s*money|made\s+(?:more|less)?\s*money)\b/i;
const MONEY_IN_LABEL = /\b(?:gross|revenues?|sales|takings|income|earnings|turnover|receipts|box office)\b/i;
const MONEY_OUT_LABEL = /\b(?:budget|costs?|spend|spending|expenses?|price|prices)\b/i;

/**
 * Words of a quality that point to the measure of it when no measure is named: "warmer" to a
 * temperature, "windier" to wind, "wetter" to rainfall, "pricier" to a price. Each entry: the
 * request's words (cue), the words of a metric's names that measure it (nouns), and the cue words
 * that ask for its low end ("coldest", "driest", "cheapest"; the others ask for the high end).
 */
export const QUALITY_MEASURES: { cue: RegExp; nouns: RegExp; low?: RegExp; about: string }[] = [
  { cue: /\b(?:warm(?:er|est|ing|th)?|hot(?:ter|test)?|heat(?:wave)?s?|cold(?:er|est)?|cool(?:er|est|ing)?|chill(?:y|ier|iest)?|freezing|milder|mildest)\b/, nouns: /\b(?:temp|temps|temperatures?|heat|degrees?)\b/, low: /\b(?:cold(?:er|est)?|cool(?:er|est|ing)?|chill(?:y|ier|iest)?|freezing)\b/, about: 'temperature' },
  { cue: /\bwind(?:y|ier|iest)?\b|\bgust(?:s|y)?\b|\bcalm(?:er|est)?\b/, nouns: /\bwinds?\b|\bgusts?\b/, low: /\bcalm(?:er|est)?\b/, about: 'wind' },
  { cue: /\b(?:wet(?:ter|test)?|rain(?:y|ier|iest|fall)?|dry|drier|driest|damp(?:er|est)?)\b/, nouns: /\b(?:precip\w*|rain\w*|wet)\b/, low: /\b(?:dry|drier|driest)\b/, about: 'rainfall' },
  { cue: /\b(?:late|delay(?:ed|s)?|punctual(?:ity)?|on[- ]time|slow(?:er|est)?)\b/, nouns: /\b(?:delays?|late|lateness|on[- ]time|punctual\w*)\b/, low: /\b(?:punctual(?:ity)?|on[- ]time)\b/, about: 'delay' },
  { cue: /\b(?:expensive|pricier|priciest|cheap(?:er|est)?|costl(?:y|ier|iest))\b/, nouns: /\b(?:prices?|fares?|costs?)\b/, low: /\bcheap(?:er|est)?\b/, about: 'price' },
  { cue: /\b(?:far(?:ther|thest)?|furthest)\b/, nouns: /\b(?:distance|miles|km|kilomet\w*)\b/, about: 'distance' },
];

/** A measure named as the whole of a quantity ("Cost Total", "total_revenue", "Gross total"). */
const TOTAL_IN_LABEL = /\b(?:total|overall|all|gross\s+total)\b/i;

/** Words of a measure's own name that say it holds the high or the low end of a reading ("Daily low temperature"). */
const HIGH_END = /\b(?:high|highs|max|maximum|peak|top|upper)\b/;
const LOW_END = /\b(?:low|lows|min|minimum|bottom|lower)\b/;

/** A row count named only as rows ("Rows", "Records"): the catalog says nothing of what one row is. */
const GENERIC_ROWS = /^(?:rows?|records?|row\s+count|count|entries|observations|number\s+of\s+(?:rows|records))$/i;

/** Words of volume ("busiest", "quietest", "traffic"): like counting words, their measure is how many rows. */
export const VOLUME_ASKED = /\b(?:busiest|busier|busy|quietest|quieter|slowest|traffic|how\s+often)\b/i;
/** Volume words that ask for the low end: the fewest rows. */
export const VOLUME_LOW = /\b(?:quietest|quieter|slowest|fewest|least)\b/i;

/** A plain count of rows: a measure only of how many things there are. */
export function isRowCount(m: Metric): boolean {
  return m.definition.type === 'count' && !m.definition.where;
}

function labelWords(m: Metric): string[] {
  return [...new Set([m.name.replaceAll('_', ' '), m.label, ...m.synonyms].flatMap((n) => phraseWords(n)))];
}

/** A word asked matches a word of the metric's names, plurals alike, forgiving a small typo. */
function sharesWord(asked: readonly string[], m: Metric): boolean {
  const own = labelWords(m).filter((w) => !STOPWORDS.has(w) && w.length > 2).map(stem);
  return asked.some((a) => own.some((w) => w === a || (w.length >= 5 && a.length >= 5 && distance(w, a) <= allowedEdits(Math.min(w.length, a.length)))));
}

/**
 * The metric's other label words the request holds ("US" beside "gross" for US Gross): a word that
 * is also a function word ("us") counts only written in capitals.
 */
function evidenceIn(requestText: string, m: Metric, asked: readonly string[]): string[] {
  const written = requestText.split(/[^\p{L}\p{N}]+/u).filter((w) => w.length > 0);
  const out: string[] = [];
  for (const w of labelWords(m)) {
    if (asked.includes(stem(w)) || w.length < 2) continue;
    const hit = written.find((x) => x.toLowerCase() === w && (!STOPWORDS.has(w) || /^\p{Lu}+$/u.test(x)));
    if (hit) out.push(hit);
  }
  return out;
}

/**
 * The catalog's metrics, best first, for a request and the words of its measure that were not
 * matched (`asked`; none for a request that named no measure). `among` keeps to some metrics (the
 * ones a shared word stands for).
 */
export function rankMetrics(ds: DatasetConfig, requestText: string, asked?: string, among?: readonly string[]): RankedMetric[] {
  const pool = ds.metrics.filter((m) => !among || among.includes(m.name));
  const askedWords = asked ? phraseWords(asked).filter((w) => !STOPWORDS.has(w)).map(stem) : [];
  const counting = COUNTING.test(requestText) || VOLUME_ASKED.test(requestText);
  const lower = requestText.toLowerCase();
  const qualities = QUALITY_MEASURES.filter((q) => q.cue.test(lower));
  const money = MONEY_ASKED.test(asked ?? requestText);
  const real = pool.filter((m) => !isRowCount(m));
  // "number of releases", "how many films": the words asked are what is counted. A row count the
  // catalog names only as rows counts whatever its rows are, so it answers them (said as rows).
  const countedWords = asked !== undefined && new RegExp(`\\b(?:how\\s+many|number\\s+of|no\\.?\\s+of|count(?:s)?\\s+of)\\s+(?:the\\s+|our\\s+|all\\s+)?${asked.toLowerCase().replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}\\b`).test(requestText.toLowerCase());
  // The dataset's own name ("Iowa electricity") asked as a measure: its one measure, when it has one.
  const ofDataset = askedWords.length > 0 && real.length === 1 && phraseWords(ds.label).map(stem).some((w) => askedWords.includes(w));
  // A word of one measure's name beside the word asked, function words included ("other costs"
  // for Cost Other), qualifies it: the total is then not the one meant.
  const written = new Set(requestText.toLowerCase().split(/[^\p{L}\p{N}]+/u));
  const qualifierOf = (m: Metric) => labelWords(m).filter((w) => w.length >= 3 && !askedWords.includes(stem(w)) && !TOTAL_IN_LABEL.test(w) && written.has(w)).length;
  const qualified = askedWords.length > 0 && pool.some((m) => sharesWord(askedWords, m) && qualifierOf(m) > 0);
  const scored = pool.map((m, order) => {
    const byWord = askedWords.length > 0 && sharesWord(askedWords, m);
    const moneyIn = money && !isRowCount(m) && (MONEY_IN_LABEL.test(labelWords(m).join(' ')) || (m.unit === 'currency' && m.definition.type === 'sum' && !MONEY_OUT_LABEL.test(labelWords(m).join(' '))));
    const evidence = evidenceIn(requestText, m, askedWords);
    const counts = isRowCount(m) && counting;
    const rowsCounted = countedWords && isRowCount(m) && GENERIC_ROWS.test(m.label.trim());
    // "Which city is warming faster?": the temperature, not the catalog's first measure.
    const quality = isRowCount(m) ? undefined : qualities.find((q) => q.nouns.test(labelWords(m).join(' ')));
    const cue = quality ? quality.cue.exec(lower)?.[0] : undefined;
    // "coldest" asks for the low end: a measure of lows ("Daily low temperature") before one of highs.
    const end = quality ? ((quality.low?.test(lower) ? LOW_END : HIGH_END).test(labelWords(m).join(' ')) ? 0.1 : 0) : 0;
    const fits = rowsCounted || byWord || moneyIn || (ofDataset && !isRowCount(m)) || (counts && !asked) || (quality !== undefined && !asked);
    // Higher first: words asked, then money words, then a count asked for, then any real measure.
    const tier = byWord ? 4 : rowsCounted ? 3.5 : moneyIn ? 3 : ofDataset && !isRowCount(m) ? 3 : quality ? 2.5 + end : counts ? 2 : isRowCount(m) ? (real.length === 0 ? 1 : 0) : 1;
    const said = asked ? `"${asked}"` : 'your request';
    const reason = rowsCounted
      ? `${said} is counted, and ${m.label} counts the rows of ${ds.label} (one per ${asked!.toLowerCase().replace(/s$/, '')} if each row is one)`
      : asked && evidence.length > 0 && (byWord || moneyIn)
      ? `closest match to ${said}, and your request says "${evidence.join(' ')}"`
      : byWord ? `closest match to ${said}`
      : moneyIn && asked ? `${said} reads as money coming in, and ${m.label} is the first such measure`
      : ofDataset && !isRowCount(m) ? `the one measure of ${ds.label}`
      : quality && cue ? `"${cue}" is about ${quality.about}, and ${m.label} measures ${end > 0 ? `its ${quality.low?.test(lower) ? 'low' : 'high'} end` : 'it'}`
      : counts ? (COUNTING.test(requestText) ? 'your request counts things ("how many", "number of"), and this counts rows' : `"${VOLUME_ASKED.exec(requestText)?.[0]}" asks how many, and this counts rows`)
      : isRowCount(m) ? 'the dataset has no other measure'
      : real.length === 1 ? `the one measure of ${ds.label} besides the row count`
      : order === 0 ? 'the headline metric of this dataset'
      : 'the first measure in the catalog after the row count';
    // An unqualified word ("cost") among its parts (Cost Other, Cost Repair, Cost Total) means the whole.
    const whole = byWord && !qualified && TOTAL_IN_LABEL.test(labelWords(m).join(' '));
    return { m, order, tier, evidence: Math.max(evidence.length, byWord ? qualifierOf(m) : 0), whole: whole ? 1 : 0, fits, reason: whole ? `${reason}; ${m.label} is the total of what "${asked}" can mean` : reason };
  });
  // The request's other words decide only between measures that answer the words asked.
  scored.sort((a, b) => b.tier - a.tier || (asked && a.tier >= 3 ? b.evidence - a.evidence || b.whole - a.whole : 0) || a.order - b.order);
  return scored.map((s) => ({ name: s.m.name, fits: s.fits, reason: s.reason }));
}
