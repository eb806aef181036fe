// Where one question ends and the next begins: sentence ends, and the joins people use to list
// questions in one breath ("…, whether …", "…, and where …"). A full stop inside "vs.", "e.g."
// or a number does not end a sentence.
import { QUESTION_JOINS } from './lexicon.js';
import type { RequestText, Span } from './text.js';

export interface Clause extends Span {
  text: string;
  /** The clause ended a sentence with a question mark. */
  asked: boolean;
}

const ABBREVIATION = /\b(?:vs|v|e\.g|i\.e|etc|approx|incl|excl|no|nos|dept|avg|est|mr|mrs|ms|dr|st|jan|feb|mar|apr|jun|jul|aug|sep|sept|oct|nov|dec|q[1-4]|fig|cf)\.$/i;

export function splitClauses(text: RequestText): Clause[] {
  const s = text.original;
  const sentences: Span[] = [];
  let start = 0;
  for (let i = 0; i < s.length; i++) {
    const ch = s[i]!;
    const end = ch === '?' || ch === '!' || ch === ';' || ch === '\n' || (ch === '.' && !ABBREVIATION.test(s.slice(Math.max(0, i - 8), i + 1)) && !/\d/.test(s[i + 1] ?? '') && /\s|$/.test(s[i + 1] ?? ''));
    if (end) {
      sentences.push({ start, end: i + 1 });
      start = i + 1;
    }
  }
  if (start < s.length) sentences.push({ start, end: s.length });
  const clauses: Clause[] = [];
  for (const sentence of sentences) {
    const body = s.slice(sentence.start, sentence.end);
    const asked = /\?\s*$/.test(body);
    let offset = 0;
    // Enumerated asks ("(1) …, (2) …", "(a) …") are questions of their own too.
    const joins = new RegExp(`${QUESTION_JOINS.source}|,?\\s*(?:and\\s+)?\\((?:\\d|[a-e]|i{1,3}|iv)\\)\\s*|,?\\s+(?:first(?:ly)?|second(?:ly)?|third(?:ly)?),\\s+`, 'gi');
    for (const m of body.matchAll(joins)) {
      push(clauses, s, sentence.start + offset, sentence.start + m.index, asked);
      offset = m.index + m[0].length;
    }
    push(clauses, s, sentence.start + offset, sentence.end, asked);
  }
  return clauses;
}

function push(out: Clause[], s: string, start: number, end: number, asked: boolean): void {
  const raw = s.slice(start, end);
  const lead = raw.length - raw.trimStart().length;
  const trimmed = raw.trim().replace(/[.?!;,]+$/, '').trim();
  if (trimmed.length === 0) return;
  out.push({ start: start + lead, end: start + lead + trimmed.length, text: trimmed, asked });
}
