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

export function findTerms(text: string, terms: CatalogTerm[]): TermHit[] {
  const words = normaliseWords(text);
  const prepared = terms
    .map((t) => ({ term: t, words: normaliseWords(t.phrase) }))
    .filter((t) => t.words.length > 0)
    .sort((a, b) => b.words.join(' ').length - a.words.join(' ').length);
  const taken = new Array<boolean>(words.length).fill(false);
  const hits: TermHit[] = [];
  for (const exactPass of [true, false]) {
    for (const { term, words: pw } of prepared) {
      const target = pw.join(' ');
      for (let i = 0; i + pw.length <= words.length; i++) {
        if (taken.slice(i, i + pw.length).some(Boolean)) continue;
        const window = words.slice(i, i + pw.length).join(' ');
        const ok = exactPass ? window === target || window === `${target}s` : distance(window, target) <= allowedEdits(target.length);
        if (!ok) continue;
        for (let k = i; k < i + pw.length; k++) taken[k] = true;
        hits.push({ term, start: i, end: i + pw.length, exact: exactPass });
      }
    }
  }
  return hits.sort((a, b) => a.start - b.start);
}

/** The catalog names closest to an unmatched phrase, for "did you mean" prompts. */
export function closestTerms(phrase: string, terms: CatalogTerm[], kind: CatalogTerm['kind'], limit = 3): string[] {
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
