// Text fitting on a 2D context: wrapping and ellipsis, measured with the real font.
import type { SKRSContext2D } from '@napi-rs/canvas';

const ELLIPSIS = '…';

/** Word-wraps `text` to `maxWidth`, at most `maxLines` lines; the last line ends in "…" if cut. */
export function wrapText(ctx: SKRSContext2D, text: string, maxWidth: number, maxLines: number): string[] {
  const words = splitWords(text);
  const lines: string[] = [];
  let current = '';
  for (let i = 0; i < words.length; i++) {
    const word = words[i]!;
    const candidate = current + word;
    if (current === '' || ctx.measureText(candidate.trimEnd()).width <= maxWidth) {
      current = candidate;
      continue;
    }
    lines.push(current.trimEnd());
    current = word.trimStart();
    if (lines.length === maxLines) {
      lines[maxLines - 1] = ellipsize(ctx, `${lines[maxLines - 1]} ${words.slice(i).join('')}`, maxWidth);
      return lines;
    }
  }
  if (current.trim() !== '') lines.push(current.trimEnd());
  if (lines.length > maxLines) lines.length = maxLines;
  return lines.map((line) => (ctx.measureText(line).width > maxWidth ? ellipsize(ctx, line, maxWidth) : line));
}

export function ellipsize(ctx: SKRSContext2D, text: string, maxWidth: number): string {
  if (ctx.measureText(text).width <= maxWidth) return text;
  let lo = 0;
  let hi = text.length;
  while (lo < hi) {
    const mid = Math.ceil((lo + hi) / 2);
    if (ctx.measureText(text.slice(0, mid).trimEnd() + ELLIPSIS).width <= maxWidth) lo = mid;
    else hi = mid - 1;
  }
  // Cut between words, not inside one, unless that would drop most of the line.
  const space = text.lastIndexOf(' ', lo);
  const cut = lo < text.length && text[lo] !== ' ' && space > lo * 0.6 ? space : lo;
  return text.slice(0, cut).trimEnd().replace(/[,;:]$/, '') + ELLIPSIS;
}

// No-break spaces (U+00A0, U+2007 figure space, U+202F narrow no-break space) join what they
// separate: "+1.0\u00A0pts" and "€1\u202F000" never split across lines.
const BREAKING_SPACE_RUN = /[^\S\u00A0\u2007\u202F]+/g;
// After the replace above, the only breaking whitespace left is the plain space.
const WORD = /[^ \u2013\u2014/-]*(?:[ \u2013\u2014/-]+|$)/g;

/** Splits after spaces and after dashes and slashes, keeping the separators with the word before. */
export function splitWords(text: string): string[] {
  return text.replace(BREAKING_SPACE_RUN, ' ').trim().match(WORD)?.filter((w) => w !== '') ?? [];
}

/** Fits a font size so `text` is at most `maxWidth` wide; never below `minSize`. */
export function fitFontSize(
  ctx: SKRSContext2D,
  text: string,
  maxWidth: number,
  size: number,
  minSize: number,
  fontOf: (size: number) => string,
): number {
  let s = size;
  ctx.font = fontOf(s);
  const width = ctx.measureText(text).width;
  if (width > maxWidth && width > 0) {
    s = Math.max(minSize, Math.floor(((s * maxWidth) / width) * 10) / 10);
    ctx.font = fontOf(s);
  }
  return s;
}
