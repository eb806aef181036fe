// Text fitting: word wrap measured with the real font. No-break spaces join what they separate
// (Unicode UAX #14 puts U+00A0, U+2007 and U+202F in class GL, "glue": never a break opportunity;
// recalled from memory).
import { createCanvas } from '@napi-rs/canvas';
import { describe, expect, it } from 'vitest';
import { ensureFonts } from '../../../analysis/charts/fonts.js';
import { splitWords, wrapText } from '../../../analysis/charts/text.js';
import { font } from '../../../analysis/charts/theme.js';

function context() {
  ensureFonts();
  const ctx = createCanvas(10, 10).getContext('2d');
  ctx.font = font(14);
  return ctx;
}

describe('wrapText', () => {
  it('never breaks at a no-break space', () => {
    const ctx = context();
    const label = 'Mainland–Tern Holm (+1.0\u00A0pts)';
    // Narrow enough that "(+1.0" would still fit after "Holm" on the first line.
    const width = ctx.measureText('Mainland–Tern Holm (+1.0').width + 1;
    const lines = wrapText(ctx, label, width, 3);
    expect(lines).toEqual(['Mainland–Tern Holm', '(+1.0\u00A0pts)']);
    // The same label with a plain space breaks inside the bracket: the reviewers' complaint.
    expect(wrapText(ctx, 'Mainland–Tern Holm (+1.0 pts)', width, 3)).toEqual(['Mainland–Tern Holm (+1.0', 'pts)']);
  });

  it('treats the figure space and the narrow no-break space as glue too, and other whitespace as breaks', () => {
    expect(splitWords('€1\u202F234 and 5\u2007%')).toEqual(['€1\u202F234 ', 'and ', '5\u2007%']);
    expect(splitWords('a\tb\n c\u2003d')).toEqual(['a ', 'b ', 'c ', 'd']);
    expect(splitWords('Mainland–Saltreach/ferry')).toEqual(['Mainland–', 'Saltreach/', 'ferry']);
  });

  it('ellipsizes a glued run that is wider than the line on its own', () => {
    const ctx = context();
    const lines = wrapText(ctx, 'x\u00A0'.repeat(40).trim(), 60, 2);
    expect(lines).toHaveLength(1);
    expect(lines[0]!.endsWith('…')).toBe(true);
    expect(ctx.measureText(lines[0]!).width).toBeLessThanOrEqual(60);
  });

  it('cuts a too-long last line between words, not inside one', () => {
    const ctx = context();
    const text = 'Flights peaked in the week commencing 5 February 2001 at 6 and its lowest week was the week commencing 5 March 2001';
    const lines = wrapText(ctx, text, 300, 2);
    expect(lines).toHaveLength(2);
    const last = lines[1]!;
    expect(last.endsWith('…')).toBe(true);
    // What is kept before the ellipsis ends a word of the text.
    const kept = last.slice(0, -1).trim().split(' ').pop()!;
    expect(text.split(' ')).toContain(kept);
    expect(ctx.measureText(last).width).toBeLessThanOrEqual(300);
  });
});
