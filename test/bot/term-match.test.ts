// Term matching keeps its prepared catalog between calls and skips windows that cannot match; it
// must find exactly what the plain definition finds: for each pass (exact, then within the allowed
// Levenshtein distance), each phrase longest first, every untaken window, left to right.
import fc from 'fast-check';
import { distance } from 'fastest-levenshtein';
import { describe, expect, it } from 'vitest';
import { catalogTerms } from '../../bot/intake.js';
import { type CatalogTerm, findTerms, normaliseWords, type TermHit } from '../../bot/term-match.js';
import { exampleDataset } from '../helpers/example-config.js';

/** The plain definition, written out as directly as it reads. */
function plainFindTerms(text: string, terms: readonly CatalogTerm[]): TermHit[] {
  const words = normaliseWords(text);
  const allowed = (n: number) => (n >= 9 ? 2 : n >= 5 ? 1 : 0);
  const prepared = terms
    .map((t) => ({ term: t, words: normaliseWords(t.phrase) }))
    .filter((t) => t.words.length > 0)
    .sort((a, b) => b.words.join(' ').length - a.words.join(' ').length);
  const taken = new Array<boolean>(words.length).fill(false);
  const hits: TermHit[] = [];
  for (const exact of [true, false]) {
    for (const { term, words: pw } of prepared) {
      const target = pw.join(' ');
      for (let i = 0; i + pw.length <= words.length; i++) {
        if (taken.slice(i, i + pw.length).some(Boolean)) continue;
        const window = words.slice(i, i + pw.length).join(' ');
        const ok = exact ? window === target || window === `${target}s` : distance(window, target) <= allowed(target.length);
        if (!ok) continue;
        for (let k = i; k < i + pw.length; k++) taken[k] = true;
        hits.push({ term, start: i, end: i + pw.length, exact });
      }
    }
  }
  return hits.sort((a, b) => a.start - b.start);
}

const terms = catalogTerms(exampleDataset);
const catalogWords = [...new Set(terms.flatMap((t) => normaliseWords(t.phrase)))];
const fillers = ['the', 'and', 'how', 'did', 'by', 'per', 'this', 'summer', 'month', 'beat', 'last', 'year', 'which', 'more', 'often'];

/** A word from the catalog, perhaps with one letter dropped, doubled or changed, or a filler word. */
const word = fc.oneof(
  fc.constantFrom(...fillers),
  fc.constantFrom(...catalogWords),
  fc.tuple(fc.constantFrom(...catalogWords), fc.nat(), fc.constantFrom('drop', 'double', 'change')).map(([w, at, how]) => {
    const i = at % w.length;
    return how === 'drop' ? w.slice(0, i) + w.slice(i + 1) : how === 'double' ? w.slice(0, i) + w[i] + w.slice(i) : `${w.slice(0, i)}x${w.slice(i + 1)}`;
  }),
);

describe('term matching', () => {
  it('finds what the plain definition finds, on requests made of catalog words with typos (fast-check, 2,000 cases)', () => {
    fc.assert(
      fc.property(fc.array(word, { maxLength: 30 }), fc.constantFrom(' ', ', ', ' - ', '? '), (ws, sep) => {
        const text = ws.join(sep);
        expect(findTerms(text, terms)).toEqual(plainFindTerms(text, terms));
      }),
      { numRuns: 2000 },
    );
  });

  it('gives the same answer when the same list is matched again (its prepared form is kept)', () => {
    const text = 'how did revnue and pasengers do by route this summer';
    const first = findTerms(text, terms);
    expect(first.map((h) => h.term.name)).toEqual(expect.arrayContaining(['revenue', 'passengers']));
    expect(findTerms(text, terms)).toEqual(first);
    // A different list with the same phrases is prepared on its own and agrees.
    expect(findTerms(text, [...terms])).toEqual(first);
  });

  it('keeps one catalog list per dataset and does not let it be changed', () => {
    expect(catalogTerms(exampleDataset)).toBe(terms);
    expect(Object.isFrozen(terms)).toBe(true);
  });
});
