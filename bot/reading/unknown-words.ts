// Words the reader could not place: a measure, a breakdown or a value the dataset does not have
// ("profit", "by region", "in Oslo"). They are said back with the nearest catalog terms and
// values, never dropped: answering revenue to a question about profit would answer a different
// question. Ordinary request wording, time words and the catalog's own words are not reported.
import type { UnknownTerm } from '../brief.js';
import { closestEntries, type EntryKind, type PreparedCatalog, stem } from './catalog-match.js';
import { BUSINESS_NOUNS, GRAIN_WORDS, MONTH_PATTERN, ORDINARY, PRONOUNS, STOPWORDS, WEEKDAY_PATTERN } from './lexicon.js';
import type { RequestText, Word } from './text.js';

const MONTH_OR_DAY = new RegExp(`^(?:${MONTH_PATTERN}|${WEEKDAY_PATTERN})$`);
const GRAIN_TERMS = new Set(Object.values(GRAIN_WORDS).flatMap((g) => [g.adjective, g.noun, g.plural]));

/** Slots where a word names data: after "by"/"per"/"which", before "over time", after "in"/"at"/"from". */
const DIMENSION_SLOT = /(?:\bby|\bper|\bacross|\beach|\bevery|\bwhich|\bwhat|\bsplit by|\bbroken down by|\bbreakdown by|\bbreak(?:ing)? (?:it |that |this )?down by)\s+(?:the\s+|our\s+|each\s+|individual\s+|different\s+)?$/;
const VALUE_SLOT = /(?:\bin|\bat|\bfrom|\bvia|\bthrough|\bonly|\bjust|\bexcluding|\bexcept|\bfor)\s+(?:the\s+)?$/;
const METRIC_SLOT_BEFORE = /(?:\btrends?\s+(?:of|in|for)|\bgrowth\s+(?:of|in)|\bhow\s+(?:has|have|did|do|does|is|are|was|were)(?:\s+(?:our|the|my))?|\bshow\s+(?:me\s+|us\s+)?(?:the\s+|our\s+)?|\btotal|\bnumber\s+of|\bhow\s+many|\bhow\s+much|\blevel\s+of|\bwhat(?:'s| is| was| are| were)\s+(?:our\s+|the\s+)?(?:total\s+|average\s+)?|\bwhere\s+(?:does|do|is|are)\s+(?:our\s+|the\s+)?|\bchart\s+(?:of\s+)?(?:our\s+|the\s+)?|\b(?:are|is|did|were|was)\s+(?:our\s+|the\s+)?)\s*$/;
const METRIC_SLOT_AFTER = /^\s*(?:over\s+time|trend\w*|growth|by\s+(?:day|week|month|quarter|year)|(?:per|a|each)\s+(?:day|week|month)|(?:up|down)\s+(?:on|or)|(?:moved|changed|grown|trended|grew|fell|risen|dropped|develop\w*|look(?:ed|ing)?|doing|going|gone)\b)/;

export interface UnknownOptions {
  /** Words read as something else (catalog terms, values, periods, deadlines...) are claimed in `text`. */
  catalog: PreparedCatalog;
}

export function findUnknownTerms(text: RequestText, opts: UnknownOptions): UnknownTerm[] {
  const out: UnknownTerm[] = [];
  const candidates: { word: Word; role: UnknownTerm['role'] }[] = [];
  for (const w of text.freeWords()) {
    const role = roleOf(w, text);
    if (role) candidates.push({ word: w, role });
  }
  // Neighbouring unknown words are one phrase ("gross margin", "net promoter score").
  for (let i = 0; i < candidates.length; i++) {
    const group = [candidates[i]!];
    while (i + 1 < candidates.length && candidates[i + 1]!.word.index === group[group.length - 1]!.word.index + 1 && !/[,.;!?]/.test(text.original.slice(group[group.length - 1]!.word.end, candidates[i + 1]!.word.start))) {
      group.push(candidates[++i]!);
    }
    const phrase = group.map((g) => g.word.norm).join(' ');
    const role = group.find((g) => g.role !== 'other')?.role ?? 'other';
    if (out.some((u) => u.text === phrase)) continue;
    const kinds: EntryKind[] = role === 'value' ? ['value'] : role === 'dimension' ? ['dimension'] : role === 'metric' ? ['metric'] : ['metric', 'dimension'];
    out.push({ text: phrase, closest: closestEntries(phrase, opts.catalog, kinds), role });
  }
  return out;
}

function roleOf(w: Word, text: RequestText): UnknownTerm['role'] | undefined {
  const n = w.norm;
  const s = stem(n);
  if (n.length < 2 || /^\d/.test(n) || /^[a-z]$/.test(n)) return undefined;
  if (STOPWORDS.has(n) || ORDINARY.has(n) || ORDINARY.has(s) || PRONOUNS.has(n) || MONTH_OR_DAY.test(n) || GRAIN_TERMS.has(n) || GRAIN_TERMS.has(s)) return undefined;
  if (!/\p{L}/u.test(n)) return undefined;
  const before = text.lower.slice(Math.max(0, w.start - 40), w.start);
  const after = text.lower.slice(w.end, w.end + 30);
  // The name of a change whose effect is asked ("the impact of the new pricing") is not a measure.
  if (/\b(?:impact|effect|effects|result|results|success|outcome)\s+of\s+(?:the\s+|our\s+|this\s+)?(?:new\s+|recent\s+|latest\s+)?(?:\S+\s+)?$|\bthe\s+new\s+(?:\S+\s+)?$/.test(before)) return undefined;
  if (DIMENSION_SLOT.test(before) && !/^\s*(?:day|week|month|quarter|year)/.test(n)) return BUSINESS_NOUNS.has(n) || BUSINESS_NOUNS.has(s) || !isVerbLike(n) ? 'dimension' : undefined;
  if (BUSINESS_NOUNS.has(n) || BUSINESS_NOUNS.has(s)) return METRIC_SLOT_AFTER.test(after) || METRIC_SLOT_BEFORE.test(before) ? 'metric' : 'other';
  // A name in a value's place: "revenue in Oslo", "the Bergen route".
  if (w.named && (VALUE_SLOT.test(before) || /^\s*(?:route|site|store|branch|channel|region|line|office|location|team|plan|product)s?\b/.test(after))) return 'value';
  if ((METRIC_SLOT_BEFORE.test(before) && METRIC_SLOT_AFTER.test(after)) || (/\b(?:trends?\s+(?:of|in)|growth\s+(?:of|in)|number\s+of|how\s+many|total)\s+(?:our\s+|the\s+)?$/.test(before) && !isVerbLike(n))) return 'metric';
  return undefined;
}

/** Words ending like verbs and adverbs are rarely the name of a measure or a breakdown. */
function isVerbLike(word: string): boolean {
  return /(?:ing|ed|ly)$/.test(word) && word.length > 4;
}
