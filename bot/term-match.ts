// Finds catalog entries (metrics, dimensions, comparison groups) named in free text, by name,
// label or synonym, tolerating small typos. Matching is on whole words, longest phrase first.
import { distance } from 'fastest-levenshtein';

export interface CatalogTerm {
  /** The catalog name this phrase stands for. */
  name: string;
  /** `personal`: a personal-data dimension, matched only so the request can be told it is refused. */
  kind: 'metric' | 'dimension' | 'group' | 'personal';
  phrase: string;
}

export interface TermHit {
  term: CatalogTerm;
  /** Word positions [start, end) in the normalised text. */
  start: number;
  end: number;
  exact: boolean;
}

export function normaliseWords(text: string): string[] {
  return text
    .normalize('NFKC')
    .toLowerCase()
    .replace(/[\u2010-\u2015]/g, '-')
    .replace(/[^\p{L}\p{N}\s-]/gu, ' ')
    .split(/[\s-]+/)
    .filter((w) => w.length > 0);
}

/** Typos allowed for a phrase of this many letters (none for short words: "fare" is not "care"). */
function allowedEdits(length: number): number {
  return length >= 9 ? 2 : length >= 5 ? 1 : 0;
}

interface PreparedTerm {
  term: CatalogTerm;
  /** The phrase's words joined by single spaces: what a window of the text is compared with. */
  target: string;
  length: number;
  edits: number;
}

// A catalog is matched against every request and every clause of it; its phrases are normalised
// and ordered once per term list (intake passes the same list for all clauses of one request).
const preparedLists = new WeakMap<readonly CatalogTerm[], PreparedTerm[]>();

function prepare(terms: readonly CatalogTerm[]): PreparedTerm[] {
  const known = preparedLists.get(terms);
  if (known) return known;
  const prepared = terms
    .map((t) => ({ term: t, words: normaliseWords(t.phrase) }))
    .filter((t) => t.words.length > 0)
    .map(({ term, words }) => {
      const target = words.join(' ');
      return { term, target, length: words.length, edits: allowedEdits(target.length) };
    })
    .sort((a, b) => b.target.length - a.target.length);
  preparedLists.set(terms, prepared);
  return prepared;
}

export function findTerms(text: string, terms: readonly CatalogTerm[]): TermHit[] {
  const words = normaliseWords(text);
  const prepared = prepare(terms);
  const taken = new Array<boolean>(words.length).fill(false);
  // The text's windows of n words, joined once per n rather than once per term.
  const windowsOf = new Map<number, string[]>();
  const windows = (n: number): string[] => {
    let w = windowsOf.get(n);
    if (!w) {
      w = [];
      for (let i = 0; i + n <= words.length; i++) w.push(words.slice(i, i + n).join(' '));
      windowsOf.set(n, w);
    }
    return w;
  };
  const free = (i: number, n: number): boolean => {
    for (let k = i; k < i + n; k++) if (taken[k]) return false;
    return true;
  };
  const hits: TermHit[] = [];
  for (const exactPass of [true, false]) {
    for (const { term, target, length, edits } of prepared) {
      // With no typo allowed, the typo pass could only find an exact match the first pass already took.
      if (!exactPass && edits === 0) continue;
      const ws = windows(length);
      for (let i = 0; i < ws.length; i++) {
        const window = ws[i]!;
        const ok = exactPass
          ? window === target || window === `${target}s`
          : // The edit distance is at least the difference in length: most windows stop here.
            Math.abs(window.length - target.length) <= edits && distance(window, target) <= edits;
        if (!ok || !free(i, length)) continue;
        for (let k = i; k < i + length; k++) taken[k] = true;
        hits.push({ term, start: i, end: i + length, exact: exactPass });
      }
    }
  }
  return hits.sort((a, b) => a.start - b.start);
}

/** The catalog names closest to an unmatched phrase, for "did you mean" prompts. */
export function closestTerms(phrase: string, terms: readonly CatalogTerm[], kind: CatalogTerm['kind'], limit = 3): string[] {
  const target = normaliseWords(phrase).join(' ');
  const best = new Map<string, number>();
  for (const t of terms) {
    if (t.kind !== kind) continue;
    const p = normaliseWords(t.phrase).join(' ');
    const shared = p.split(' ').some((w) => target.split(' ').includes(w));
    const score = distance(p, target) / Math.max(p.length, target.length, 1) - (shared ? 0.5 : 0);
    const prior = best.get(t.name);
    if (prior === undefined || score < prior) best.set(t.name, score);
  }
  return [...best.entries()].sort((a, b) => a[1] - b[1]).slice(0, limit).map(([name]) => name);
}
