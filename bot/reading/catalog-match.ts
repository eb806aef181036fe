// Finds the dataset's own words in a request: its metrics, breakdowns, comparison groups,
// personal-data columns and the values of its data, by name, label, other names or part of a
// value's name, forgiving small typos (a transposed pair of letters counts as one edit, as in
// Damerau's measure). The longest phrase wins; a phrase that stands for several entries is kept
// with all of them, so the reader can ask which was meant.
import damerauLevenshtein from 'damerau-levenshtein';
import { distance } from 'fastest-levenshtein';
import type { DatasetConfig } from '../../config/schema.js';
import { BUSINESS_NOUNS, ENDS_JOIN, FROM_END_CUE, FROM_END_WORDS, GRAIN_WORDS, MONTH_PATTERN, ORDINARY, STOPWORDS, TO_END_CUE, TO_END_WORDS, WEEKDAY_PATTERN } from './lexicon.js';
import { phraseWords, type RequestText, type Span, type Word } from './text.js';
import type { ValueIndex } from '../../analysis/values/value-index.js';

export type EntryKind = 'metric' | 'dimension' | 'group' | 'personal' | 'value' | 'dataset';

export interface CatalogEntry {
  kind: EntryKind;
  /** The catalog name (for a value: its dimension's name). */
  name: string;
  /** For a value: the value as the data holds it. */
  value?: string;
  phrase: string;
  /** Part of a value's name ("Saltreach" for "Mainland–Saltreach"), or of a metric's or breakdown's label ("generation" of "Net generation"): several may share it. */
  partial?: boolean;
  /** A value that is also an everyday word ("foot", "high"): taken only with a cue beside it. */
  weak?: boolean;
  /** Another form of a one-word value ("rainy" of "rain"), not the data's own text. */
  form?: boolean;
  /**
   * A part that is the leading word of exactly one value in the whole dataset ("nuclear" of
   * "Nuclear Energy"): it names that value in any case, like a one-word value, and is said back.
   */
  lead?: boolean;
}

export interface CatalogHit extends Span {
  /** Every entry the words stand for (several when a phrase is shared). */
  entries: CatalogEntry[];
  words: Word[];
  exact: boolean;
}

interface Prepared {
  words: string[];
  /** The phrase's words before stemming, to tell "takings" (a noun) from "taking" (a verb). */
  raw: string[];
  target: string;
  edits: number;
  entries: CatalogEntry[];
}

export interface PreparedCatalog {
  dataset: DatasetConfig;
  /** Each breakdown's own words (of its name, label and other names): "wildlife" for "Wildlife size". */
  dimensionWords: Map<string, Set<string>>;
  /** Breakdowns that are the start or the end of a movement, by their names (origin and destination). */
  ends: Map<string, 'from' | 'to'>;
  /** Phrases by their number of words, longest first. */
  byLength: Map<number, Map<string, Prepared>>;
  lengths: number[];
  /** Phrases of several words by "length:position:word", for finding a typo inside a longer name. */
  byWordAt: Map<string, Prepared[]>;
  entries: CatalogEntry[];
}

/** Everyday words that are no evidence of a value on their own. */
const EVERYDAY = new Set([...STOPWORDS, ...ORDINARY, 'high', 'low', 'medium', 'new', 'old', 'other', 'basic', 'standard', 'free', 'small', 'large', 'big', 'open', 'closed', 'none', 'unknown', 'direct', 'foot', 'true', 'false', 'normal', 'regular', 'general', 'main', 'single', 'return', 'returns', 'first', 'second', 'plus', 'pro', 'lite', 'urgent']);

// Words of a person's record: a personal-data column is also found by these words of its name.
const PERSONAL_WORDS = new Set(['email', 'emails', 'mail', 'e', 'phone', 'mobile', 'telephone', 'name', 'names', 'surname', 'address', 'addresses', 'postcode', 'zip', 'birth', 'dob', 'ip', 'passport', 'ssn', 'iban', 'card']);

/** Typos allowed for a phrase of this many letters (none for short words: "fare" is not "care"). */
export function allowedEdits(length: number): number {
  return length >= 9 ? 2 : length >= 5 ? 1 : 0;
}

// Words a measure's name uses interchangeably: "urgent percentage" is the catalog's "urgent share".
// A rate is not always a share ("unemployment rate" is no "Unemployment share" of readings over a
// line): "rate" names a share only where the measure's own names say so (also_called: [urgent rate]).
const SAME_WORD: Record<string, string> = {
  percentage: 'share', percent: 'share', proportion: 'share', ratio: 'share', fraction: 'share', pct: 'share',
  avg: 'average', mean: 'average', typical: 'average',
  num: 'number', count: 'number',
};

// Forms of "be", "have" and "get" that put a participle after its noun ("jobs were added"), as stemmed.
const AUXILIARY = /^(?:were|was|are|is|be|been|being|have|has|had|get|got|gotten)$/;
// A word that reads as a past participle: "added", "shipped", "taken", "grown".
const PARTICIPLE = /(?:ed|en|wn)$/;

/** Plural and singular read alike: "routes" and "route", "categories" and "category". */
export function stem(word: string): string {
  const same = SAME_WORD[word];
  if (same) return same;
  // Their own plural: "species", "series".
  if (/(?:species|series)$/.test(word)) return word;
  if (word.length > 4 && word.endsWith('ies')) return `${word.slice(0, -3)}y`;
  if (word.length > 4 && /(?:ses|xes|ches|shes)$/.test(word)) return word.slice(0, -2);
  if (word.length > 3 && word.endsWith('s') && !word.endsWith('ss') && !word.endsWith('us')) return word.slice(0, -1);
  return word;
}

const cache = new WeakMap<DatasetConfig, WeakMap<object, PreparedCatalog>>();
const NO_VALUES = {};

/** The entries of a dataset's catalog and values, prepared once per dataset and value index. */
export function prepareCatalog(ds: DatasetConfig, values?: ValueIndex): PreparedCatalog {
  let perDataset = cache.get(ds);
  if (!perDataset) cache.set(ds, (perDataset = new WeakMap()));
  const key = values ?? NO_VALUES;
  const known = perDataset.get(key);
  if (known) return known;
  const entries = catalogEntries(ds, values);
  const byLength = new Map<number, Map<string, Prepared>>();
  for (const e of entries) {
    const words = phraseWords(e.phrase).map(stem);
    if (words.length === 0) continue;
    const target = words.join(' ');
    let bucket = byLength.get(words.length);
    if (!bucket) byLength.set(words.length, (bucket = new Map()));
    const p = bucket.get(target) ?? { words, raw: phraseWords(e.phrase), target, edits: allowedEdits(target.length), entries: [] };
    if (!p.entries.some((x) => x.kind === e.kind && x.name === e.name && x.value === e.value)) p.entries.push(e);
    bucket.set(target, p);
  }
  const dimensionWords = new Map(
    ds.dimensions.map((d) => [d.name, new Set([d.name.replaceAll('_', ' '), d.label, ...d.synonyms].flatMap((n) => phraseWords(n)).filter((w) => !STOPWORDS.has(w) && w.length > 2).map(stem))]),
  );
  const ends = new Map<string, 'from' | 'to'>();
  for (const d of ds.dimensions) {
    const words = [d.name.replaceAll('_', ' '), d.label, d.column, ...d.synonyms].flatMap((n) => phraseWords(n));
    const from = words.some((w) => FROM_END_WORDS.has(w));
    const to = words.some((w) => TO_END_WORDS.has(w));
    if (from !== to) ends.set(d.name, from ? 'from' : 'to');
  }
  const byWordAt = new Map<string, Prepared[]>();
  for (const [n, bucket] of byLength) {
    if (n < 2) continue;
    for (const p of bucket.values()) p.words.forEach((w, k) => byWordAt.set(`${n}:${k}:${w}`, [...(byWordAt.get(`${n}:${k}:${w}`) ?? []), p]));
  }
  const prepared = { dataset: ds, dimensionWords, ends, byLength, lengths: [...byLength.keys()].sort((a, b) => b - a), byWordAt, entries };
  perDataset.set(key, prepared);
  return prepared;
}

function catalogEntries(ds: DatasetConfig, values?: ValueIndex): CatalogEntry[] {
  const out: CatalogEntry[] = [];
  const add = (kind: EntryKind, name: string, phrases: readonly string[], extra: Partial<CatalogEntry> = {}) => {
    for (const phrase of new Set(phrases.filter((p) => p.trim().length > 0))) out.push({ kind, name, phrase, ...extra });
  };
  add('dataset', ds.name, [ds.name.replaceAll('_', ' '), ds.label]);
  // A measure named by a quality noun ("lateness", "busyness") is asked by its adjective too: "how late are flights?".
  const adjectiveOf = (p: string) => (/^[a-z]{3,}ness$/i.test(p.trim()) ? [p.trim().slice(0, -4).replace(/i$/, 'y')] : []);
  for (const m of ds.metrics) {
    const names = [m.name.replaceAll('_', ' '), m.label, ...m.synonyms];
    add('metric', m.name, [...names, ...names.flatMap(adjectiveOf)]);
  }
  for (const g of ds.comparison_groups) add('group', g.name, [g.name.replaceAll('_', ' '), g.label, g.members_label, g.others_label, ...g.synonyms]);
  for (const d of ds.dimensions) {
    const names = [d.name.replaceAll('_', ' '), d.label, d.column.replaceAll('_', ' '), ...d.synonyms];
    if (d.personal_data) {
      // Any personal word of its names finds it too: "emails", "their phone numbers".
      const personalWords = names.flatMap((n) => phraseWords(n)).filter((w) => PERSONAL_WORDS.has(w));
      add('personal', d.name, [...names, ...personalWords, ...personalWords.map((w) => `${w} address`), ...personalWords.map((w) => `${w} number`)]);
      continue;
    }
    add('dimension', d.name, names);
    const index = values?.get(d.name);
    if (!index) continue;
    const aliases = d.value_names ?? {};
    for (const v of index.values) {
      const text = v.value;
      const weak = isWeakPhrase(text);
      add('value', d.name, [text, ...(aliases[text] ?? [])], { value: text, weak });
      if (!weak) add('value', d.name, valueWordForms(text).filter((f) => f !== text.toLowerCase()), { value: text, form: true });
    }
    // Parts of multi-word values ("Saltreach" of "Mainland–Saltreach"): distinctive words only.
    const partsSeen = new Map<string, string[]>();
    for (const v of index.values) {
      const words = phraseWords(v.value);
      if (words.length < 2) continue;
      for (const w of new Set(words)) {
        if (w.length < 4 || STOPWORDS.has(w) || ORDINARY.has(w) || /^\d+$/.test(w)) continue;
        partsSeen.set(w, [...(partsSeen.get(w) ?? []), v.value]);
      }
    }
    for (const [part, owners] of partsSeen) {
      // A word every value shares ("Mainland" in most routes) tells them apart from nothing.
      if (owners.length === index.values.length && owners.length > 1) continue;
      for (const owner of owners) add('value', d.name, [part], { value: owner, partial: true, weak: isWeakPhrase(part) });
    }
  }
  markLeadWords(ds, out);
  out.push(...labelParts(ds, out));
  return out;
}

/**
 * Marks the parts of values that name their value on their own, in lower case too: the leading
 * word of a multi-word value ("nuclear" of "Nuclear Energy", "volcanic" of "Volcanic activity"),
 * standing alone in it (not the first half of a hyphenated word: "take" of "Take-off run"), held
 * by that one value of the whole dataset (not "extreme" of "Extreme weather" and "Extreme
 * temperature", nor a word two breakdowns hold), and no word of a measure's or breakdown's names,
 * of the calendar, or of everyday requests. Such a word is as telling as a one-word value.
 */
function markLeadWords(ds: DatasetConfig, entries: CatalogEntry[]): void {
  const owners = new Map<string, Set<string>>();
  for (const e of entries) {
    if (e.kind !== 'value') continue;
    for (const w of phraseWords(e.phrase).map(stem)) owners.set(w, (owners.get(w) ?? new Set()).add(`${e.name}\u0000${e.value}`));
  }
  const catalogWords = new Set(
    [...ds.metrics.flatMap((m) => [m.name.replaceAll('_', ' '), m.label, ...m.synonyms]), ...ds.dimensions.flatMap((d) => [d.name.replaceAll('_', ' '), d.label, d.column.replaceAll('_', ' '), ...d.synonyms]), ...ds.comparison_groups.flatMap((g) => [g.name.replaceAll('_', ' '), g.label, ...g.synonyms])]
      .flatMap((n) => phraseWords(n))
      .map(stem),
  );
  for (const e of entries) {
    if (e.kind !== 'value' || !e.partial || e.weak || !e.value) continue;
    const word = e.phrase.toLowerCase();
    const key = stem(word);
    const value = e.value.trim().toLowerCase();
    if (!value.startsWith(word) || !/^\s/.test(value.slice(word.length))) continue;
    if (owners.get(key)?.size !== 1 || catalogWords.has(key) || ANALYSIS_WORDS.has(key) || GENERAL_LABEL_WORDS.has(word)) continue;
    if (EVERYDAY.has(word) || BUSINESS_NOUNS.has(word) || BUSINESS_NOUNS.has(key) || PERIOD_NOUN.test(word) || CALENDAR_NAME.test(word)) continue;
    e.lead = true;
  }
}

// Words of a label too general to stand for it alone ("Major Genre" is not found by "major").
// Words of analysis that end many labels ("Refund rate", "Running time"): never a label's part alone.
const ANALYSIS_WORDS = new Set(['rate', 'share', 'time', 'ratio', 'mix', 'growth', 'change', 'trend', 'level', 'number', 'total', 'sum', 'percent', 'percentage', 'day', 'week', 'month', 'quarter', 'year', 'period', 'date']);
const GENERAL_LABEL_WORDS = new Set(['total', 'average', 'avg', 'mean', 'median', 'amount', 'number', 'count', 'type', 'types', 'kind', 'major', 'minor', 'main', 'level', 'value', 'score', 'min', 'max', 'net', 'code', 'name', 'group', 'class', 'category']);

/**
 * Words and shorter runs of words of a multi-word metric or breakdown label ("generation" of "Net
 * generation", "genre" of "Major Genre", "gross" of "US Gross" and "Worldwide Gross"), as partial
 * entries: taken only where no whole name, label, other name or value has those words, and only
 * when every owner is of one kind (a word shared by a metric and a breakdown, "rating" of "IMDB
 * Rating" and "MPAA Rating", tells nothing). A part shared by several metrics stays with all of
 * them, to be asked. Other names are the catalog author's own words and are not cut up.
 */
function labelParts(ds: DatasetConfig, whole: readonly CatalogEntry[]): CatalogEntry[] {
  // A word cut from a multi-word value ("states" of the airline "TRANS STATES AIRLINES") does not
  // take a label's head noun ("State" of "Origin State") away: whole names and values do.
  const taken = new Set(whole.filter((e) => !(e.kind === 'value' && e.partial)).map((e) => phraseWords(e.phrase).map(stem).join(' ')));
  const owners = new Map<string, { kind: EntryKind; name: string; phrase: string }[]>();
  // The value a rate counts ("urgent" of "Urgent share") is the data's value first, not the rate's name.
  const filterWords = new Set(ds.metrics.flatMap((m) => ('where' in m.definition && m.definition.where ? [m.definition.where.value].flat() : [])).flatMap((v) => phraseWords(String(v ?? ''))).map(stem));
  const own = (kind: EntryKind, name: string, names: readonly string[]) => {
    for (const n of names) {
      const words = phraseWords(n);
      if (words.length < 2) continue;
      // Single words only: a run of several ("share of revenue" of "Share of revenue refunded")
      // would outrun a whole name it contains ("revenue"), the longest phrase winning.
      for (let len = 1; len < 2; len++) {
        for (let i = 0; i + len <= words.length; i++) {
          const part = words.slice(i, i + len);
          // The label's head noun (its last word: "Budget" of "Production Budget", "Sales" of "US
          // DVD Sales") names it even when it is an everyday word of requests, unless it is a word of analysis.
          const head = (w: string, k: number) => i + k === words.length - 1 && !ANALYSIS_WORDS.has(stem(w));
          const distinctive = part.filter((w, k) => w.length >= 3 && !STOPWORDS.has(w) && !GENERAL_LABEL_WORDS.has(w) && !/^\d+$/.test(w) && (head(w, k) || (!ORDINARY.has(w) && !ORDINARY.has(stem(w)) && !EVERYDAY.has(w))));
          if (distinctive.length === 0 || (len === 1 && distinctive.length !== 1)) continue;
          const phrase = part.join(' ');
          const key = part.map(stem).join(' ');
          if (taken.has(key) || filterWords.has(key)) continue;
          const list = owners.get(key) ?? [];
          if (!list.some((o) => o.kind === kind && o.name === name)) list.push({ kind, name, phrase });
          owners.set(key, list);
        }
      }
    }
  };
  // Only for entries with no other names: an author who wrote them has said which words name it
  // ("first response" for one metric, not "response" for every label holding it).
  for (const m of ds.metrics) if (m.synonyms.length === 0) own('metric', m.name, [m.name.replaceAll('_', ' '), m.label]);
  for (const d of ds.dimensions) if (!d.personal_data && d.synonyms.length === 0) own('dimension', d.name, [d.name.replaceAll('_', ' '), d.label]);
  const out: CatalogEntry[] = [];
  for (const list of owners.values()) {
    if (new Set(list.map((o) => o.kind)).size > 1) continue;
    for (const o of list) out.push({ kind: o.kind, name: o.name, phrase: o.phrase, partial: true });
  }
  return out;
}

/**
 * The other forms of a one-word value a request may use: "rainy", "raining", "rained" for "rain";
 * "foggy", "sunny" for "fog", "sun" (a short closing consonant doubled). Only for a value that is a
 * plain word of three letters or more, not a code in capitals ("LAX") and not an everyday word
 * (those stay weak, read only on evidence), and never a form that is itself an everyday word.
 */
export function valueWordForms(value: string): string[] {
  if (!/^\p{L}{3,}$/u.test(value) || (value === value.toUpperCase() && value.length <= 4)) return [];
  const w = value.toLowerCase();
  // Consonant-vowel-consonant at the end of a short word doubles its last letter: fog → foggy, sun → sunny.
  const stemmed = w.length <= 4 && /[^aeiou][aeiou][^aeiouwxy]$/.test(w) ? w + w.slice(-1) : w;
  const base = /e$/.test(w) ? w.slice(0, -1) : stemmed;
  const forms = [`${base}y`, `${base}ing`, `${base}ed`].filter((f) => f !== w);
  return forms.filter((f) => !EVERYDAY.has(f) && !BUSINESS_NOUNS.has(f) && !STOPWORDS.has(f) && !ORDINARY.has(f));
}

function isWeakPhrase(phrase: string): boolean {
  const words = phraseWords(phrase);
  return words.length === 1 && (EVERYDAY.has(words[0]!) || BUSINESS_NOUNS.has(words[0]!) || words[0]!.length <= 2);
}

/**
 * Every catalog phrase in the text's unclaimed words: an exact pass (plurals read alike), then a
 * pass forgiving typos; longest phrases first; matched words are not matched again.
 */
export function findCatalogHits(text: RequestText, catalog: PreparedCatalog, options: { typos?: boolean } = {}): CatalogHit[] {
  const words = text.words;
  const stems = words.map((w) => stem(w.norm));
  const taken = words.map((w) => text.isClaimed(w));
  const hits: CatalogHit[] = [];
  const free = (i: number, n: number) => {
    for (let k = i; k < i + n; k++) if (taken[k]) return false;
    return true;
  };
  const take = (i: number, n: number, entries: CatalogEntry[], exact: boolean) => {
    for (let k = i; k < i + n; k++) taken[k] = true;
    const ws = words.slice(i, i + n);
    hits.push({ start: ws[0]!.start, end: ws[ws.length - 1]!.end, entries, words: ws, exact });
  };
  // "taking bookings away" is not "takings": a bare -ing word stands for an -ings noun only after
  // "per", "a", "each", "the"... ("revenue per booking").
  const verbForNoun = (i: number, p: Prepared) =>
    p.raw.some((r, k) => r.endsWith('ings') && words[i + k]!.norm.endsWith('ing') && !/^(?:per|a|an|each|every|one|the|our|their|its|by|average|avg|first|last|single)$/.test(words[i + k - 1]?.norm ?? ''));
  const oneWord = catalog.byLength.get(1);
  // A typo inside a longer name ("unemplyment rate") is that name, not a shorter one written
  // right ("rate"): the longest phrase wins across the exact and the typo pass, when the other
  // words are written right and the mistyped one is no catalog word or everyday word itself.
  const typoInLonger = (i: number, n: number): Prepared | undefined => {
    const ws = stems.slice(i, i + n);
    // Only phrases sharing a word in its place with the window: looked up, not scanned.
    const candidates = new Set(ws.flatMap((w, k) => catalog.byWordAt.get(`${n}:${k}:${w}`) ?? []));
    for (const p of candidates) {
      let wrong = 0;
      const ok = p.words.every((target, k) => {
        const w = ws[k]!;
        if (w === target) return true;
        wrong++;
        return w.length >= 5 && !EVERYDAY.has(w) && !oneWord?.has(w) && distance(w, target) <= Math.max(1, allowedEdits(target.length));
      });
      if (ok && wrong === 1) return p;
    }
    return undefined;
  };
  // A value's other form right after a person or an auxiliary is a verb of the request, not the
  // value ("did we carry" is not "car", "we rained" is no weather): "rainy days", "when it rained" stay.
  const onlyForms = (p: Prepared) => p.entries.every((e) => e.form);
  const verbAfterSubject = (i: number, p: Prepared) => onlyForms(p) && /^(?:we|i|you|they|he|she|did|do|does|didn't|don't|doesn't|will|would|could|can|should|shall|must|might|to|not)$/.test(words[i - 1]?.norm ?? '');
  // A name ending in a participle ("Jobs added", "Orders shipped") said as a clause: "jobs were
  // added", "orders have been shipped". Only forms of "be", "have" and "get" may stand between.
  const withAuxiliaries = (i: number, n: number): { p: Prepared; length: number } | null => {
    for (let extra = 1; extra <= 2 && i + n + extra <= words.length; extra++) {
      if (!free(i, n + extra) || /[.!?;,]/.test(text.lower.slice(words[i]!.end, words[i + n + extra - 1]!.start))) continue;
      const inner = stems.slice(i + 1, i + n + extra - 1);
      const kept = [stems[i]!, ...inner.filter((w) => !AUXILIARY.test(w)), stems[i + n + extra - 1]!];
      if (kept.length !== n || inner.length - (kept.length - 2) !== extra) continue;
      const p = catalog.byLength.get(n)?.get(kept.join(' '));
      if (p && PARTICIPLE.test(p.raw[p.raw.length - 1]!)) return { p, length: n + extra };
    }
    return null;
  };
  for (const pass of options.typos === false ? (['exact'] as const) : (['exact', 'typo', 'family'] as const)) {
    const exactPass = pass === 'exact';
    for (const n of catalog.lengths) {
      const bucket = catalog.byLength.get(n)!;
      for (let i = 0; i + n <= words.length; i++) {
        if (!free(i, n)) continue;
        // A phrase does not run across a sentence or a comma-separated list item.
        if (n > 1 && /[.!?;,]/.test(text.lower.slice(words[i]!.end, words[i + n - 1]!.start))) continue;
        const window = stems.slice(i, i + n).join(' ');
        if (exactPass) {
          const p = bucket.get(window);
          if (p && !verbForNoun(i, p) && !verbAfterSubject(i, p)) take(i, n, p.entries, true);
          else if (n > 1) {
            const spread = withAuxiliaries(i, n);
            const q = spread || options.typos === false ? undefined : typoInLonger(i, n);
            if (spread) take(i, spread.length, spread.p.entries, true);
            else if (q && !verbForNoun(i, q)) take(i, n, q.entries, false);
          }
          continue;
        }
        // Typos only in words that are not everyday words themselves ("tips" is not "trips").
        if (stems.slice(i, i + n).every((w) => EVERYDAY.has(w) || /^\d+$/.test(w))) continue;
        // A one-word typo is tried as written too: "speceis" folds to "specei", far from "species".
        const p = pass === 'typo' ? closestWithin(window, bucket) ?? (n === 1 && words[i]!.norm !== window ? closestWithin(words[i]!.norm, bucket) : undefined) : n === 1 ? sameFamily(window, bucket) : undefined;
        // "taking" is not a typo of "takings": a plural noun of its own.
        if (p && p.raw.some((r) => r.endsWith('ings')) && window.split(' ').some((w) => w.endsWith('ing'))) continue;
        // A typo of a value's other form is two guesses deep ("carried" is not "carred" of "car").
        if (p && onlyForms(p)) continue;
        if (p) take(i, n, p.entries, false);
      }
    }
  }
  const kept = hits.flatMap((h) => valuesWithEvidence(h, hits, text, catalog)).sort((a, b) => a.start - b.start);
  return orientEnds(kept, text, catalog);
}

/**
 * "from LAX to SFO", "LAX→SFO", "into SFO from LAX", "between DFW and ORD": a value that both
 * ends of a movement hold (origin and destination airports) is placed at the end its words say,
 * the first of two joined ones at the start and the second at the end. Two parts of one
 * breakdown's values joined so ("from Mainland to Saltreach") are the value that runs from one
 * to the other. With no such words the value keeps every candidate, to be asked about.
 */
function orientEnds(hits: CatalogHit[], text: RequestText, catalog: PreparedCatalog): CatalogHit[] {
  const valueHits = hits.filter((h) => h.entries.some((e) => e.kind === 'value'));
  const endOf = (e: CatalogEntry) => (e.kind === 'value' ? catalog.ends.get(e.name) : undefined);
  const bothEnds = (h: CatalogHit) => h.entries.some((e) => endOf(e) === 'from') && h.entries.some((e) => endOf(e) === 'to');
  const side = new Map<CatalogHit, 'from' | 'to'>();
  const joined = new Map<CatalogHit, CatalogHit>();
  for (const [i, h] of valueHits.entries()) {
    const before = text.lower.slice(Math.max(0, h.start - 30), h.start);
    if (bothEnds(h)) {
      if (FROM_END_CUE.test(before)) side.set(h, 'from');
      else if (TO_END_CUE.test(before)) side.set(h, 'to');
    }
    const prev = valueHits[i - 1];
    if (!prev) continue;
    const gap = text.original.slice(prev.end, h.start);
    const betweenAnd = /^\s*and\s*$/i.test(gap) && /\bbetween\s+(?:the\s+)?$/.test(text.lower.slice(Math.max(0, prev.start - 14), prev.start));
    if (!ENDS_JOIN.test(gap) && !betweenAnd) continue;
    joined.set(h, prev);
    if (bothEnds(prev) && bothEnds(h)) {
      if (side.get(prev) !== 'to') side.set(prev, 'from');
      if (side.get(h) !== 'from' || side.get(prev) === 'from') side.set(h, side.get(prev) === 'to' ? 'from' : 'to');
    }
  }
  // "ORD vs ATL - which has worse delays as an origin?", "as destinations": the role the sentence
  // gives them places every value of both ends in it that no nearer words placed.
  for (const h of valueHits) {
    if (side.has(h) || !bothEnds(h)) continue;
    const sentence = sentenceAround(text.lower, h.start, h.end);
    const role = /\bas\s+(?:an?\s+|the\s+|their\s+|its\s+)?([\p{L}]+)/gu;
    for (const m of sentence.matchAll(role)) {
      const w = m[1]!;
      if (FROM_END_WORDS.has(w) && w !== 'from') side.set(h, 'from');
      else if (TO_END_WORDS.has(w) && w !== 'to') side.set(h, 'to');
      if (side.has(h)) break;
    }
  }
  // Two parts of one breakdown's values joined so: the value named by both, in the order written.
  const route = new Map<CatalogHit, CatalogEntry>();
  for (const [h, prev] of joined) {
    if (side.has(h) || side.has(prev)) continue;
    const shared = h.entries.filter((e) => e.kind === 'value' && (e.partial || prev.entries.some((p) => p.partial)) && prev.entries.some((p) => p.kind === 'value' && p.name === e.name && p.value === e.value));
    const position = (e: CatalogEntry, w: Word) => (e.value ?? '').toLowerCase().indexOf(w.norm);
    const inOrder = shared.filter((e) => position(e, prev.words[0]!) < position(e, h.words[0]!));
    const pick = inOrder.length === 1 ? inOrder[0]! : shared.length === 1 ? shared[0]! : undefined;
    if (!pick) continue;
    route.set(h, { ...pick, partial: false });
    route.set(prev, { ...pick, partial: false });
  }
  return hits.map((h) => {
    const r = route.get(h);
    if (r) return { ...h, entries: [r] };
    const s = side.get(h);
    return s ? { ...h, entries: h.entries.filter((e) => e.kind !== 'value' || endOf(e) === s) } : h;
  });
}

/** The sentence holding a span: from the last stop before it to the first after it. */
function sentenceAround(lower: string, start: number, end: number): string {
  const from = Math.max(...['.', '!', '?', ';'].map((c) => lower.lastIndexOf(c, start - 1))) + 1;
  const stops = ['.', '!', '?', ';'].map((c) => lower.indexOf(c, end)).filter((i) => i >= 0);
  return lower.slice(from, stops.length > 0 ? Math.min(...stops) : lower.length);
}

// Words that name a period or a grain: in lower case they are nearly always the calendar's ("day
// to day", "by day"), whatever the data's values.
const PERIOD_NOUN = new RegExp(`^(?:${Object.values(GRAIN_WORDS).flatMap((w) => [w.noun, w.plural]).join('|')}|today|tonight)$`);
// Names of months and weekdays ("may", "march", "sat"): everyday words when the data writes them otherwise.
const CALENDAR_NAME = new RegExp(`^(?:${MONTH_PATTERN}|${WEEKDAY_PATTERN})$`);

/** How the data writes the words a hit matched: the value, or its word the part is ("large" of "Unknown bird - large"). */
function dataForm(e: CatalogEntry, norm: string): string {
  if (!e.partial) return e.value ?? e.phrase;
  return (e.value ?? '').split(/[^\p{L}\p{N}]+/u).find((w) => w.toLowerCase() === norm) ?? e.phrase;
}

/** A one-word value hit written in lower case as an everyday or calendar word the data writes otherwise. */
function wantsEvidence(h: CatalogHit, e: CatalogEntry): boolean {
  if (h.words.length !== 1 || e.kind !== 'value') return false;
  const w = h.words[0]!;
  const lower = w.raw === w.raw.toLowerCase();
  if (PERIOD_NOUN.test(w.norm)) return lower || dataForm(e, w.norm) !== w.raw;
  return (!!e.weak || CALENDAR_NAME.test(w.norm)) && lower && dataForm(e, w.norm) !== w.raw;
}

// "during the day or at night", "by day and by night": "or" and "and" with the little words of time around them;
// "night strikes compare to day ones": a word of comparison with a few words of any kind.
const SET_AGAINST = /^\s*(?:vs\.?|versus|v|or|and|&|\/)\s*$|^\s*(?:(?:at|in|on|by|during|the|a|an)\s+){0,2}(?:or|and)\s+(?:(?:at|in|on|by|during|the|a|an)\s+){0,2}$|^\s*(?:[\p{L}'-]+\s+){0,2}(?:vs\.?|versus|than|against|compared?\s+(?:to|with))\s+(?:[\p{L}'-]+\s+){0,2}$/u;

/**
 * A value that is also an everyday word ("day", "large", "may") written in lower case when the
 * data writes it otherwise ("DAY" the airport code, "Large" the wildlife size), or a period noun in
 * lower case ("day", "week"), is the word's ordinary sense unless something says it is the data's: its
 * breakdown's own word beside it ("destination airport day", "large wildlife" for Wildlife size),
 * quotes around it, or another value of its breakdown set against it ("Night vs day"). Such entries
 * are dropped from the hit (and the hit with them when none is left), so its words stay free for
 * the calendar ("by day") and the rest of the reader. A whole value left in the hit beats parts of
 * longer values ("large" is Wildlife size Large, not "Unknown bird - large").
 */
function valuesWithEvidence(h: CatalogHit, hits: readonly CatalogHit[], text: RequestText, catalog: PreparedCatalog): CatalogHit[] {
  const values = h.entries.filter((e) => e.kind === 'value');
  if (values.length === 0) return [h];
  const quoted = /["'“‘`]\s*$/.test(text.original.slice(Math.max(0, h.start - 2), h.start)) && /^\s*["'”’`]/.test(text.original.slice(h.end, h.end + 2));
  const at = h.words[0]!.index;
  const near = (k: number) => text.words[k];
  // Its breakdown's word within one word either side ("large wildlife", "medium sized birds", "airport day").
  const ownWordBeside = (dim: string) => {
    const own = catalog.dimensionWords.get(dim);
    if (!own) return false;
    for (const k of [at - 2, at - 1, at + h.words.length, at + h.words.length + 1]) {
      const w = near(k);
      if (!w || !own.has(stem(w.norm))) continue;
      const between = k < at ? text.lower.slice(w.end, h.start) : text.lower.slice(h.end, w.start);
      if (/[.;!?,]/.test(between)) continue;
      return true;
    }
    return false;
  };
  // Another value of its breakdown set against it: "Night vs day", "day or night".
  // A word of comparison may have a few words around it ("night strikes than day strikes", "at night against in the day", "during the day or at night").
  const setAgainst = (dim: string) =>
    hits.some((o) => o !== h && o.entries.some((x) => x.kind === 'value' && x.name === dim && !wantsEvidence(o, x)) && (o.end <= h.start ? o.end : h.end) < (o.end <= h.start ? h.start : o.start) && SET_AGAINST.test(o.end <= h.start ? text.lower.slice(o.end, h.start) : text.lower.slice(h.end, o.start)));
  // An entry kept on evidence is no longer a weak one: the words around it have said what it is.
  let kept = h.entries.flatMap((e) => (!wantsEvidence(h, e) ? [e] : quoted || ownWordBeside(e.name) || setAgainst(e.name) || measureBeside(h, hits, text) ? [{ ...e, weak: false }] : []));
  if (kept.some((e) => e.kind === 'value' && !e.partial)) kept = kept.filter((e) => !(e.kind === 'value' && e.partial));
  if (kept.length === 0) return [];
  return [{ ...h, entries: kept }];
}

// Nouns that make an everyday word before them a word of the office ("finance team", "sales review"), not the data's.
const OFFICE_AFTER = /^(?:team|teams|meeting|meetings|review|reviews|deck|decks|report|reports|department|dept|function|people|folks|lead|leads|director|directors|head|heads|manager|managers|budget|update|sync|call|committee|function|org|group)$/;

/**
 * A measure named right beside the word, as what the word narrows: the word just before it
 * ("finance unemployment") or after it with a word of place ("unemployment in finance",
 * "jobless among construction"). Not when an office noun follows the word ("unemployment for the
 * finance team"), where the word is the office's. Exported for the partial-value rule of the reader.
 */
export function measureBeside(h: Span, hits: readonly CatalogHit[], text: RequestText): boolean {
  const nextWord = text.lower.slice(h.end).match(/^\s*([\p{L}'-]+)/u)?.[1];
  if (nextWord && OFFICE_AFTER.test(nextWord)) return false;
  return hits.some((o) => {
    if (o === h || !o.entries.some((x) => x.kind === 'metric')) return false;
    if (o.start >= h.end) return /^\s+$/.test(text.lower.slice(h.end, o.start));
    if (o.end <= h.start) return /^\s+(?:in|for|among|within|across|at)\s+(?:the\s+)?$/.test(text.lower.slice(o.end, h.start));
    return false;
  });
}

/** A long word of the same family as a one-word name: "satisfied" and "satisfaction", "cancelled" and "cancellations". */
function sameFamily(word: string, bucket: Map<string, Prepared>): Prepared | undefined {
  if (word.length < 8) return undefined;
  for (const p of bucket.values()) {
    if (p.target.length < 8 || p.target.includes(' ')) continue;
    let shared = 0;
    while (shared < word.length && word[shared] === p.target[shared]) shared++;
    if (shared >= 6 && shared >= Math.min(word.length, p.target.length) - 6) return p;
  }
  return undefined;
}

function closestWithin(window: string, bucket: Map<string, Prepared>): Prepared | undefined {
  let best: Prepared | undefined;
  let bestDistance = Infinity;
  for (const p of bucket.values()) {
    if (p.edits === 0 || Math.abs(window.length - p.target.length) > p.edits) continue;
    // Short phrases must keep their first letter: people rarely mistype the first one.
    if (p.target.length < 7 && window[0] !== p.target[0]) continue;
    let d = distance(window, p.target);
    // Levenshtein counts a transposition as two edits; Damerau's measure as one.
    if (d > p.edits && d <= 2 * p.edits) d = damerauLevenshtein(window, p.target).steps;
    if (d <= p.edits && d < bestDistance) {
      best = p;
      bestDistance = d;
    }
  }
  return best;
}

/** The catalog names and values nearest an unknown phrase, for "did you mean". */
export function closestEntries(phrase: string, catalog: PreparedCatalog, kinds: readonly EntryKind[], limit = 3): string[] {
  const target = phraseWords(phrase).map(stem).join(' ');
  const targetWords = target.split(' ');
  const scored = new Map<string, number>();
  for (const e of catalog.entries) {
    if (!kinds.includes(e.kind)) continue;
    const p = phraseWords(e.phrase).map(stem).join(' ');
    const shared = p.split(' ').some((w) => targetWords.includes(w));
    const score = distance(p, target) / Math.max(p.length, target.length, 1) - (shared ? 0.5 : 0);
    const label = e.kind === 'value' ? e.value! : e.name;
    const prior = scored.get(label);
    if (prior === undefined || score < prior) scored.set(label, score);
  }
  return [...scored.entries()].sort((a, b) => a[1] - b[1]).slice(0, limit).map(([name]) => name);
}
