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
// A ranking's place is a breakdown's too: "top 5 carriers", "the 3 busiest carriers", "rank carriers by delay".
const DIMENSION_SLOT = /(?:\bby|\bper|\bacross|\beach|\bevery|\bwhich|\bwhat|\bsplit by|\bbroken down by|\bbreakdown by|\bbreak(?:ing)? (?:it |that |this )?down by|\b(?:top|bottom|best|worst|biggest|largest|smallest|highest|lowest|busiest|quietest)\s+(?:\d{1,2}|three|five|ten)|\b(?:the|our)\s+(?:\d{1,2}|three|five|ten)\s+(?:busiest|biggest|largest|leading|smallest|quietest|costliest|highest|lowest|worst|best|top)|\b(?:rank|ranked|ranking|sort|sorted|list)(?:\s+(?:the|our|all))?)\s+(?:the\s+|our\s+|each\s+|individual\s+|different\s+)?$/u;
const VALUE_SLOT = /(?:\bin|\bat|\bfrom|\bvia|\bthrough|\bonly|\bjust|\bexcluding|\bexcept|\bfor|\bon|\bvs\.?|\bversus)\s+(?:the\s+)?$/;
// After a value's place, the words that end it: the end, a period, a comparison.
const VALUE_END = /^\s*(?:[?.!,;:)]|$|last\b|this\b|next\b|in\b|since\b|vs\b|versus\b|and\b|or\b|\d|for\b|so\s+far|yesterday|today|during\b|over\b|compared\b|last\b)/;
// Nouns that name a measure when a request asks "how is X trending", "X by Y", "what's the X".
const ASKS_OF = /(?:\bhow\s+(?:is|are|has|have|was|were)\s+(?:our\s+|the\s+)?|\bwhat(?:'s|s|\s+is|\s+was|\s+are)\s+(?:our\s+|the\s+)?|\bshow\s+(?:me\s+|us\s+)?(?:the\s+|our\s+)?|^\s*)$/;
const QUESTION_VERB = /\b(?:what|how|show|compare|see|give|tell|break\s+down|pull|chart|plot|which|need|want|send|check)\b[^.?!;]{0,60}$/;
// A change whose effect is asked about is named by its noun ("the price rise", "the pricing change").
const CHANGE_AFTER = /^\s*(?:rise|rises|increase|increases|change|changes|cut|cuts|hike|hikes|drop|reduction|update|launch|rollout|roll-out|review|freeze|restructure|reorg)\b/;
const METRIC_SLOT_BEFORE = /(?:\btrends?\s+(?:of|in|for)|\bgrowth\s+(?:of|in)|\bhow\s+(?:has|have|did|do|does|is|are|was|were)(?:\s+(?:our|the|my))?|\bshow\s+(?:me\s+|us\s+)?(?:the\s+|our\s+)?|\btotal|\bnumber\s+of|\bhow\s+many|\bhow\s+much|\blevel\s+of|\bwhat(?:'s| is| was| are| were)\s+(?:our\s+|the\s+)?(?:total\s+|average\s+)?|\bwhere\s+(?:does|do|is|are)\s+(?:our\s+|the\s+)?|\bchart\s+(?:of\s+)?(?:our\s+|the\s+)?|\b(?:are|is|did|were|was)\s+(?:our\s+|the\s+)?)\s*$/;
const METRIC_SLOT_AFTER = /^\s*(?:over\s+time|trend\w*|growth|looking\s+like|by\s+(?:day|week|month|quarter|year)|(?:per|a|each)\s+(?:day|week|month)|(?:up|down)\s+(?:on|or)|(?:moved|changed|grown|trended|grew|fell|risen|dropped|develop\w*|look(?:ed|ing)?|doing|going|gone)\b)/;

export interface UnknownOptions {
  /** Words read as something else (catalog terms, values, periods, deadlines...) are claimed in `text`. */
  catalog: PreparedCatalog;
}

export function findUnknownTerms(text: RequestText, opts: UnknownOptions): UnknownTerm[] {
  const out: UnknownTerm[] = [];
  // Noun phrases asked about as a measure with nothing the catalog knows in them ("load factor by vessel").
  const covered = new Set<number>();
  for (const run of askedPhrases(text)) {
    const phrase = run.map((w) => w.norm).join(' ').replace(/\s*-\s*/g, '-');
    const written = text.lower.slice(run[0]!.start, run[run.length - 1]!.end).replace(/\s+/g, ' ');
    const textOf = written.includes('-') ? written : phrase;
    if (out.some((u) => u.text === textOf)) continue;
    out.push({ text: textOf, closest: closestEntries(textOf, opts.catalog, ['metric']), role: 'metric' });
    for (const w of run) covered.add(w.index);
  }
  const candidates: { word: Word; role: UnknownTerm['role'] }[] = [];
  for (const w of text.freeWords()) {
    if (covered.has(w.index)) continue;
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

/** Runs of free words in a measure's place: after "how is", "what's the", "how many" or at the start, before "trending", "by …", "over time". */
function askedPhrases(text: RequestText): Word[][] {
  const runs: Word[][] = [];
  let run: Word[] = [];
  const flush = () => {
    // Trim ordinary words at either end, but keep a hyphenated pair ("on-time") whole.
    const joined = (i: number) => i > 0 && /^-$/.test(text.lower.slice(run[i - 1]!.end, run[i]!.start).trim());
    let a = 0;
    let b = run.length;
    while (a < b && isPlain(run[a]!.norm) && !MEASURE_WORDS.has(run[a]!.norm) && !(a + 1 < b && joined(a + 1))) a++;
    while (b > a && STOPWORDS.has(run[b - 1]!.norm) && !joined(b - 1)) b--;
    const core = run.slice(a, b);
    if (core.length > 0 && core.some((w, i) => !isPlain(w.norm) || joined(i) || (i + 1 < core.length && joined(i + 1)))) {
      const before = text.lower.slice(Math.max(0, core[0]!.start - 40), core[0]!.start);
      const after = text.lower.slice(core[core.length - 1]!.end, core[core.length - 1]!.end + 30);
      const startOfClause = /(?:^|[.?!;:\n]\s*)$/.test(before);
      const asks = ASKS_OF.test(before) || /\b(?:how\s+many|how\s+much|number\s+of|total|trends?\s+(?:of|in)|growth\s+(?:of|in))\s+(?:our\s+|the\s+)?$/.test(before);
      if ((asks || startOfClause) && (METRIC_SLOT_AFTER.test(after) || /^\s*(?:by|per|for|across|in|last|this|did|do|does|have|has|are|is|were|was)\b/.test(after) || /^\s*[?.!]?\s*$/.test(after)) && !core.some((w) => isVerbLike(w.norm) && !joined(core.indexOf(w)))) {
        if (asks || /^\s*(?:by|per|over|trend)/.test(after)) runs.push(core);
      }
    }
    run = [];
  };
  for (const w of text.words) {
    const prev = run[run.length - 1];
    const hyphened = prev !== undefined && /^\s*-\s*$/.test(text.lower.slice(prev.end, w.start));
    const free = !text.isClaimed(w) && /\p{L}/u.test(w.norm) && !PRONOUNS.has(w.norm) && !MONTH_OR_DAY.test(w.norm) && (!STOPWORDS.has(w.norm) || hyphened || /^\s*-/.test(text.lower.slice(w.end, w.end + 2)));
    if (free && (!prev || /^[\s-]*$/.test(text.lower.slice(prev.end, w.start)))) {
      run.push(w);
      continue;
    }
    if (run.length > 0) flush();
    if (free) run.push(w);
  }
  if (run.length > 0) flush();
  return runs;
}

// Words that begin the name of a measure ("average order value", "total cost").
const MEASURE_WORDS = new Set(['average', 'avg', 'mean', 'median', 'total', 'gross', 'net']);

function isPlain(w: string): boolean {
  return STOPWORDS.has(w) || ORDINARY.has(w) || ORDINARY.has(stem(w)) || GRAIN_TERMS.has(w) || /^\d/.test(w);
}

function roleOf(w: Word, text: RequestText): UnknownTerm['role'] | undefined {
  const n = w.norm;
  const s = stem(n);
  if (n.length < 2 || /^\d/.test(n) || /^[a-z]$/.test(n)) return undefined;
  // A short word written in capitals is a name ("the UK", "the US"), even when it spells a common word.
  const acronym = /^\p{Lu}{2,4}$/u.test(w.raw.replace(/'s$/, '')) && !KNOWN_ACRONYMS.has(n);
  if (!acronym && (STOPWORDS.has(n) || ORDINARY.has(n) || ORDINARY.has(s) || PRONOUNS.has(n) || MONTH_OR_DAY.test(n) || GRAIN_TERMS.has(n) || GRAIN_TERMS.has(s))) return undefined;
  if (acronym && (MONTH_OR_DAY.test(n) || GRAIN_TERMS.has(n))) return undefined;
  if (!/\p{L}/u.test(n)) return undefined;
  const before = text.lower.slice(Math.max(0, w.start - 40), w.start);
  const after = text.lower.slice(w.end, w.end + 30);
  if (CHANGE_AFTER.test(after)) return undefined;
  // The name of a change whose effect is asked ("the impact of the new pricing") is not a measure.
  if (/\b(?:impact|effect|effects|result|results|success|outcome)\s+of\s+(?:the\s+|our\s+|this\s+)?(?:new\s+|recent\s+|latest\s+)?(?:\S+\s+)?$|\bthe\s+new\s+(?:\S+\s+)?$/.test(before)) return undefined;
  // "by passenger nationality": a catalog word before it is the unit, the unknown word the breakdown.
  const prevWord = text.words[w.index - 1];
  const byUnit = prevWord !== undefined && text.isClaimed(prevWord) && /\bby\s+(?:the\s+)?$/.test(text.lower.slice(Math.max(0, prevWord.start - 12), prevWord.start));
  if ((DIMENSION_SLOT.test(before) || byUnit) && !/^\s*(?:day|week|month|quarter|year)/.test(n)) return BUSINESS_NOUNS.has(n) || BUSINESS_NOUNS.has(s) || !isVerbLike(n) ? 'dimension' : undefined;
  const next = text.words[w.index + 1];
  const nextKnown = next && text.isClaimed(next) && /^\s*$/.test(text.lower.slice(w.end, next.start));
  if (BUSINESS_NOUNS.has(n) || BUSINESS_NOUNS.has(s)) {
    if (METRIC_SLOT_AFTER.test(after) || METRIC_SLOT_BEFORE.test(before) || ASKS_OF.test(before)) return 'metric';
    return QUESTION_VERB.test(text.lower.slice(Math.max(0, w.start - 90), w.start)) ? 'other' : undefined;
  }
  // A name, or a word the data does not hold, in a value's place: "revenue in Oslo", "sign-ups on
  // tiktok", "the rathlin route", "minibus bookings", "the UK".
  if (acronym && (VALUE_SLOT.test(before) || /\b(?:the)\s+$/.test(before))) return 'value';
  if ((w.named || !isVerbLike(n)) && VALUE_SLOT.test(before) && (w.named || VALUE_END.test(after))) return 'value';
  if (nextKnown && !isVerbLike(n) && !/^(?:each|every|all|both|our|total|average|new|more|less|most|top|gross|net)$/.test(n) && isModifierSlot(before)) return 'value';
  if (w.named && /^\s*(?:route|site|store|branch|channel|region|line|office|location|team|plan|product)s?\b/.test(after)) return 'value';
  // "Apple's share price": a name owning a catalog term is a value the data may call otherwise.
  if (/'s$/i.test(w.raw) && nextKnown && !isVerbLike(n)) return 'value';
  // "amazn and microsfot prices": listed with a word that stands before a catalog term, it is one of the same kind.
  const joined = text.words[w.index + 2];
  if (joined && /^\s*(?:,|and|or|&|vs\.?|versus)\s*$/.test(text.lower.slice(w.end, joined.start)) && !isVerbLike(n)) {
    const after2 = text.words[joined.index + 1];
    if (text.isClaimed(joined) || (!STOPWORDS.has(joined.norm) && after2 && text.isClaimed(after2) && /^\s*$/.test(text.lower.slice(joined.end, after2.start)))) return 'value';
  }
  // A noun phrase asked about with nothing the catalog knows in it: "How is on-time performance trending?", "load factor by vessel".
  if (ASKS_OF.test(before) && METRIC_SLOT_AFTER.test(after) && !isVerbLike(n)) return 'metric';
  if ((METRIC_SLOT_BEFORE.test(before) && METRIC_SLOT_AFTER.test(after)) || (/\b(?:trends?\s+(?:of|in)|growth\s+(?:of|in)|number\s+of|how\s+many|total)\s+(?:our\s+|the\s+)?$/.test(before) && !isVerbLike(n))) return 'metric';
  return undefined;
}

const KNOWN_ACRONYMS = new Set(['kpi', 'kpis', 'ytd', 'mtd', 'qtd', 'yoy', 'mom', 'wow', 'qoq', 'ceo', 'cfo', 'coo', 'cmo', 'cto', 'md', 'vp', 'svp', 'evp', 'hr', 'ops', 'eod', 'eow', 'eom', 'asap', 'fyi', 'pls', 'thx', 'aka', 'ttm', 'ltm', 'ok', 'am', 'pm', 'it']);

/** Words before a catalog word with nothing between, not after a verb that takes them as an object. */
function isModifierSlot(before: string): boolean {
  return /(?:^|[\s(])(?:the|our|for|in|on|of|with|from|any|all|and|,|:)\s*$|^\s*$/.test(before);
}

/** Words ending like verbs and adverbs are rarely the name of a measure or a breakdown. */
function isVerbLike(word: string): boolean {
  // "hourly wage", "nightly rate": a word of the calendar in -ly names the measure's unit.
  if (/(?:hour|dai|night|week|fortnight|month|quarter|year)ly$/.test(word)) return false;
  return /(?:ing|ed|ly)$/.test(word) && word.length > 4;
}
