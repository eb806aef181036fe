// A request's text prepared once for every recogniser: a lower-case copy of the same length (so a
// match's offsets point into the original words, which the brief quotes as evidence), its words
// with their offsets, and a record of which characters a recogniser has already claimed.

export interface Span {
  start: number;
  end: number;
}

export interface Word extends Span {
  /** Lower case, accents and apostrophes folded: "April's" -> "april", "Café" -> "cafe". */
  norm: string;
  /** As written. */
  raw: string;
  index: number;
  /** Written with a capital and not at the start of a sentence: a name, perhaps a value. */
  named: boolean;
}

export class RequestText {
  readonly lower: string;
  readonly words: Word[];
  private readonly claimed: Uint8Array;

  constructor(readonly original: string) {
    this.lower = foldCase(original);
    this.words = splitWords(original, this.lower);
    this.claimed = new Uint8Array(original.length);
  }

  /** The original words of a span, for evidence. */
  quote(span: Span): string {
    return this.original.slice(span.start, span.end).replace(/\s+/g, ' ').trim();
  }

  claim(span: Span): void {
    this.claimed.fill(1, span.start, span.end);
  }

  isClaimed(span: Span): boolean {
    for (let i = span.start; i < span.end; i++) if (this.claimed[i]) return true;
    return false;
  }

  /** Words not inside any claimed span. */
  freeWords(): Word[] {
    return this.words.filter((w) => !this.isClaimed(w));
  }

  /** The words that lie inside a span. */
  wordsIn(span: Span): Word[] {
    return this.words.filter((w) => w.start >= span.start && w.end <= span.end);
  }

  /** The word that starts at or after an offset. */
  wordAt(offset: number): Word | undefined {
    return this.words.find((w) => w.start >= offset);
  }

  /** Every match of a global regular expression over the lower-case text, with its span. */
  *matches(re: RegExp): Generator<RegExpExecArray & { span: Span }> {
    if (!re.global) throw new Error('matches() needs a global regular expression');
    re.lastIndex = 0;
    for (let m = re.exec(this.lower); m; m = re.exec(this.lower)) {
      if (m[0].length === 0) {
        re.lastIndex++;
        continue;
      }
      yield Object.assign(m, { span: { start: m.index, end: m.index + m[0].length } });
    }
  }
}

/**
 * Lower case with the same length as the input: letters whose lower case is longer (a rare few)
 * are kept as they are, dashes and quotes are unified, accents dropped where the base letter
 * keeps the length.
 */
export function foldCase(text: string): string {
  let out = '';
  for (const ch of text) {
    let c = ch.toLowerCase();
    if (c.length !== ch.length) c = ch;
    const bare = c.normalize('NFD').replace(/\p{M}/gu, '');
    if (bare.length === c.length) c = bare;
    if (/[\u2010-\u2015\u2212]/.test(c)) c = '-';
    else if (/[\u2018\u2019\u02bc`´]/.test(c)) c = "'";
    else if (/[\u201c\u201d]/.test(c)) c = '"';
    else if (/[\u00a0\u2000-\u200a\u202f]/.test(c)) c = ' ';
    out += c;
  }
  return out;
}

const WORD = /[\p{L}\p{N}]+(?:['.][\p{L}\p{N}]+)*/gu;

function splitWords(original: string, lower: string): Word[] {
  const words: Word[] = [];
  let last = 0;
  for (const m of lower.matchAll(WORD)) {
    const start = m.index;
    const end = start + m[0].length;
    const sentenceStart = words.length === 0 || /[.!?:;\n]/.test(original.slice(last, start));
    const raw = original.slice(start, end);
    const norm = m[0]
      .replace(/'s$/, '')
      .replace(/'/g, '')
      // A full stop inside a word is an abbreviation ("e.g.", "u.s."), not part of its letters.
      .replace(/\.(?=\p{L})/gu, '');
    words.push({ start, end, raw, norm, index: words.length, named: !sentenceStart && /^\p{Lu}/u.test(raw) && !/^\p{Lu}+$/u.test(raw) });
    last = end;
  }
  return words;
}

/** Normalised words of a phrase, as the recognisers compare them ("Mainland–Saltreach" -> mainland, saltreach). */
export function phraseWords(phrase: string): string[] {
  return new RequestText(phrase).words.map((w) => w.norm);
}

export function overlaps(a: Span, b: Span): boolean {
  return a.start < b.end && b.start < a.end;
}
