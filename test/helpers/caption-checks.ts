// Checks that a presented answer's words agree with its own tables: every money or percentage
// figure in the caption and title is one of the answer's numbers (its CSV cells, or a figure its
// findings computed from them) within the rounding it is printed at; every direction word next to
// a signed figure agrees with its sign; every filter is named; and no placeholder or broken
// grammar ("n/a", "NaN", "Bookings's", "1 routes"), nor a caveat's code, reaches the reader: in the
// caption, title, notes, takeaway or a chart's title, subtitle and footer.
import type { Presented } from '../../analysis/present/presenter.js';
import type { Answer } from '../../analysis/types.js';

const UP = /\b(rose|grew|higher|above|increased|gained)\b/i;
const DOWN = /\b(fell|shrank|lower|below|decreased|dropped|lost)\b/i;

/** A figure as printed: its value and the half-width of the rounding it shows. */
interface Figure {
  text: string;
  value: number;
  tolerance: number;
  signed: boolean;
}

const SCALE: Record<string, number> = { K: 1e3, M: 1e6, B: 1e9, bn: 1e9 };

/** Money and percentage figures ("€93.8K", "+11.4%", "−4.0 pts", "$1,204.50"). */
export function figuresIn(text: string): Figure[] {
  const out: Figure[] = [];
  const re = /([+\u2212-]?)([€$£¥])?(\d{1,3}(?:,\d{3})+|\d+)(\.\d+)?\s?(K|M|B|bn)?(\s?%|\s?pts?\b)?/g;
  for (const m of text.matchAll(re)) {
    const [, sign, currency, whole, frac, suffix, unit] = m;
    if (!currency && !unit) continue;
    const decimals = frac ? frac.length - 1 : 0;
    const scale = (suffix ? SCALE[suffix]! : 1) * (unit ? 0.01 : 1);
    const magnitude = Number(`${whole!.replace(/,/g, '')}${frac ?? ''}`) * scale;
    const value = sign === '-' || sign === '\u2212' ? -magnitude : magnitude;
    out.push({ text: m[0], value, tolerance: 0.5 * 10 ** -decimals * scale * 1.0001 + 1e-12, signed: sign !== '' });
  }
  return out;
}

/** Every number the answer holds: its result tables' cells and the figures its findings carry. */
export function answerNumbers(answer: Answer): number[] {
  const out: number[] = [];
  const walk = (v: unknown): void => {
    if (typeof v === 'number' && Number.isFinite(v)) out.push(v);
    else if (Array.isArray(v)) v.forEach(walk);
    else if (v && typeof v === 'object') Object.values(v).forEach(walk);
  };
  for (const t of Object.values(answer.tables)) for (const r of t.rows) walk(Object.values(r));
  walk(answer.findings);
  // An index (1.65) is said as a percentage above or below 1 ("65% above an average month").
  return [...out, ...out.map((n) => n - 1)];
}

/** The words a post shows: title, caption, notes, takeaway, and each chart's title, subtitle and footer. */
export function wordsOf(p: Presented): string[] {
  const charts = [...(p.chart ? [p.chart] : []), ...(p.moreCharts ?? [])];
  return [p.title, p.caption, ...p.notes, ...(p.takeaway ? [p.takeaway.text] : []), ...charts.flatMap((c) => [c.title, c.subtitle, ...c.footer])];
}

/**
 * Placeholders and codes that must never reach a reader: "n/a", "NaN", "undefined", "null",
 * "Infinity", an unfilled template, or a caveat's code ("base_zero") said as if it were words.
 */
export function placeholderIn(text: string): string | null {
  const m = /\bn\/a\b|\bNaN\b|\bundefined\b|\bnull\b|Infinity|\$\{|\b(?:partial_period|series_gap|empty_period|no_data|all_null|single_period|null_share|duplicate_keys|negative_amounts|stale_data|small_sample|too_few_cycles|segments_folded|segment_gap|late_segment|base_zero|suppressed_small_groups)\b/.exec(text);
  return m ? m[0] : null;
}

export function captionProblems(answer: Answer, p: Presented): string[] {
  const problems: string[] = [];
  for (const text of wordsOf(p)) {
    if (placeholderIn(text)) problems.push(`placeholder "${placeholderIn(text)}" in "${text}"`);
    if (/\w+s's\b/.test(text)) problems.push(`possessive of a plural in "${text}"`);
    const one = /(?<![\d.,])\b1 (?!of\b|in\b|to\b|a\b|vs\b)([a-z]+s)\b/.exec(text);
    if (one && !/^(pts|others|segments?s)$/.test(one[1]!) && !/ss$|us$/.test(one[1]!)) problems.push(`"1 ${one[1]}" in "${text}"`);
  }
  const numbers = answerNumbers(answer);
  for (const text of [p.title, p.caption]) {
    for (const f of figuresIn(text)) {
      const traced = numbers.some((n) => Math.abs(n - f.value) <= f.tolerance || Math.abs(Math.abs(n) - Math.abs(f.value)) <= f.tolerance);
      if (!traced) problems.push(`${f.text} in "${text}" is none of the answer's numbers`);
    }
    // A direction word beside a signed figure agrees with its sign (one clause at a time).
    for (const clause of text.split(/[;.:](?:\s|$)|,\s(?=[a-z])/)) {
      const signed = figuresIn(clause).filter((f) => f.signed && f.value !== 0);
      if (signed.length !== 1) continue;
      const up = UP.test(clause);
      const down = DOWN.test(clause);
      if (up === down) continue;
      if ((up && signed[0]!.value < 0) || (down && signed[0]!.value > 0)) problems.push(`direction word disagrees with ${signed[0]!.text} in "${clause}"`);
    }
  }
  for (const f of answer.subQuestion.filters) {
    for (const v of f.values) {
      for (const [where, text] of [['title', p.title], ['caption', p.caption]] as const) {
        if (!text.includes(String(v))) problems.push(`filter value "${String(v)}" missing from the ${where}`);
      }
    }
  }
  return problems;
}

// A percentage said as a move or a comparison of the metric itself: a signed percentage ("+4.5%"),
// one beside a comparing word ("8% warmer", "12% above an average month", "1.5% below"), one after a
// moving word ("rose 8.1%", "down 2.5%") or one per period ("4.5% a year"). A percentage that is no
// such thing passes: a confidence level ("95% interval"), a share of rows ("under 1% of a day's").
const SIGNED_PERCENT = /(?:^|[\s(])[+\u2212-]\d[\d,]*(?:\.\d+)?\s?%/;
const PERCENT_BESIDE = /\d(?:\.\d+)?\s?%\s+(?:above|below|higher|lower|warmer|colder|cooler|hotter|more|less|longer|shorter|up|down|on|over|under|a (?:year|month|week|day|quarter))\b/i;
const PERCENT_AFTER = /\b(?:rose|fell|grew|shrank|increased|decreased|dropped|gained|lost|up|down|changed|moved)\s+(?:by\s+)?(?:about\s+)?\d[\d,]*(?:\.\d+)?\s?%/i;

/** The first percentage in `text` said as a change or comparison of a value, or null. */
export function percentMoveIn(text: string): string | null {
  for (const re of [SIGNED_PERCENT, PERCENT_BESIDE, PERCENT_AFTER]) {
    const m = re.exec(text);
    if (m) return m[0].trim();
  }
  return null;
}

/**
 * A move of a rate or share in anything but its one form, "pts" (analysis/format.ts
 * formatPointChange): "pp", "points" or "percentage points" after a figure.
 */
export function pointsFormIn(text: string): string | null {
  const m = /\d(?:\.\d+)?\s?(?:pp\b|points\b|percentage points\b)/i.exec(text);
  return m ? m[0] : null;
}
