// Whether a drawn chart agrees with its own title and its data (issue 17 item 9): the marked high
// and low are the complete periods they claim to be, every point and mark lies inside the plot, bars
// start at zero, the subtitle's period does not run past the data, a title about growth rates
// draws growth rates, and "fastest" is not claimed on a margin the rounding hides. Pure: a spec,
// where it landed, and the data's last date in; problems as sentences out.
import { formatValue } from '../format.js';
import type { ChartGeometry } from './geometry.js';
import type { BarsSpec, ChartSpec, LineSpec } from './spec.js';

/** A lead smaller than this (in yearly growth, as a fraction) is a tie: common practice, one point. */
export const FASTEST_MARGIN = 0.01;

export interface ChartData {
  /** The last date with data (ISO); the subtitle may not name a day after it. */
  lastDate: string;
}

export function chartProblems(spec: ChartSpec, geometry: ChartGeometry, data: ChartData): string[] {
  const out = subtitleProblems(spec.subtitle, data.lastDate);
  if (spec.kind === 'line') out.push(...lineProblems(spec, geometry));
  if (spec.kind === 'bars' || spec.kind === 'pareto') out.push(...zeroBaseProblems(spec.bars.map((b) => b.value), geometry));
  if (spec.kind === 'bars') out.push(...barTitleProblems(spec));
  return out;
}

// ---- lines ------------------------------------------------------------------------------

function lineProblems(spec: LineSpec, g: ChartGeometry): string[] {
  const out: string[] = [];
  const valued = spec.points.map((p, i) => ({ p, i })).filter(({ p }) => p.value !== null);
  const complete = valued.filter(({ p }) => !p.partial);
  for (const mark of spec.marks) {
    const point = spec.points[mark.index];
    if (!point || point.value === null) {
      out.push(`${mark.role} mark on no value (index ${mark.index})`);
      continue;
    }
    if (point.partial) out.push(`${mark.role} mark "${mark.text}" on a partial period (${point.label})`);
    const extreme = mark.role === 'high' ? Math.max(...complete.map(({ p }) => p.value!)) : Math.min(...complete.map(({ p }) => p.value!));
    if (point.value !== extreme) out.push(`${mark.role} mark "${mark.text}" is not the ${mark.role}est complete period`);
    const shown = formatValue(point.value, spec.format, { compact: true });
    if (!mark.text.includes(shown)) out.push(`${mark.role} mark "${mark.text}" does not show its point's value ${shown}`);
  }
  // The title's peak or low, when it states a figure, is the marked one.
  for (const [role, words] of [
    ['high', /\b(?:peak(?:ed|s)?|highest|high of)\b[^.;:]*?\bat\s+(\S+?)(?=[\s,;.)]|$)/i],
    ['low', /\b(?:lowest|low of|bottomed out)\b[^.;:]*?\bat\s+(\S+?)(?=[\s,;.)]|$)/i],
  ] as const) {
    const claim = words.exec(spec.title)?.[1];
    const mark = spec.marks.find((m) => m.role === role);
    if (!claim || !mark) continue;
    if (!mark.text.includes(claim)) out.push(`title names ${claim} as the ${role}, the chart marks "${mark.text}"`);
  }
  if (/\bpeak(?:ed|s)?\b/i.test(spec.title) && !spec.marks.some((m) => m.role === 'high')) out.push(`title "${spec.title}" names a peak the chart does not mark`);
  // Every drawn point and mark inside the plot: an axis that clips them hides what the title says.
  const inside = (y: number) => y >= g.plot.top - 1 && y <= g.plot.bottom + 1;
  g.points.forEach((pt, i) => {
    if (Number.isFinite(pt.y) && !inside(pt.y)) out.push(`point ${spec.points[i]?.label ?? i} lies outside the plot`);
  });
  for (const m of g.marks) {
    if ((m.role === 'high' || m.role === 'low') && !inside(m.y)) out.push(`${m.role} mark lies outside the plot`);
  }
  if (g.valueAxis) {
    const values = valued.map(({ p }) => p.value!);
    const lo = Math.min(...values);
    const hi = Math.max(...values);
    if (values.length > 0 && (lo < g.valueAxis.min - 1e-9 * Math.abs(lo) || hi > g.valueAxis.max + 1e-9 * Math.abs(hi))) {
      out.push(`the value axis (${g.valueAxis.min} to ${g.valueAxis.max}) does not cover the data (${lo} to ${hi})`);
    }
  }
  return out;
}

// ---- bars -------------------------------------------------------------------------------

/** Bars are read by their length: the axis starts at zero (ends there, for bars all below it). */
function zeroBaseProblems(values: number[], g: ChartGeometry): string[] {
  if (!g.valueAxis || values.length === 0) return [];
  const { min, max } = g.valueAxis;
  if (values.every((v) => v >= 0) && min > 0) return [`bars start at ${min}, not zero`];
  if (values.every((v) => v <= 0) && max < 0) return [`bars end at ${max}, not zero`];
  return [];
}

function barTitleProblems(spec: BarsSpec): string[] {
  const out: string[] = [];
  const aboutGrowth = /\b(?:grew|grow(?:ing|th)|fastest|slowest|shrank|held up best)\b/i.test(spec.title);
  // Growth told in the metric's own units per period ("+0.3 min a week (trend)") is drawn in those units.
  const inUnits = !spec.title.includes('%') && /\ba (?:day|week|month|quarter|year)\b/.test(spec.title);
  if (aboutGrowth && !inUnits && spec.format.unit !== 'percent') out.push(`title "${spec.title}" is about growth rates, the bars draw ${spec.format.unit} values`);
  if (/\bfastest\b|\bheld up best\b/i.test(spec.title)) {
    const named = spec.bars.filter((b) => !b.other);
    const [first, second] = named;
    if (first && !spec.title.toLowerCase().includes(first.label.split(' · ')[0]!.toLowerCase())) out.push(`title "${spec.title}" does not name the longest bar, ${first.label}`);
    if (first && second && (first.text === second.text || first.value - second.value < FASTEST_MARGIN)) {
      out.push(`"fastest" claimed on a margin of ${formatValue(first.value - second.value, { unit: 'percent', locale: spec.format.locale })} (${first.text} against ${second.text})`);
    }
  }
  return out;
}

// ---- subtitle ---------------------------------------------------------------------------

const MONTHS = ['jan', 'feb', 'mar', 'apr', 'may', 'jun', 'jul', 'aug', 'sep', 'oct', 'nov', 'dec'];
const MONTH = '(Jan|Feb|Mar|Apr|May|Jun|Jul|Aug|Sep|Oct|Nov|Dec)[a-z]*\\.?';

/** The first day each date, month, quarter or year in a subtitle names, as ISO dates. */
export function datesNamed(text: string): { text: string; start: string }[] {
  const out: { text: string; start: string }[] = [];
  const iso = (y: string, m: number, d: number) => `${y}-${String(m).padStart(2, '0')}-${String(d).padStart(2, '0')}`;
  const month = (name: string) => MONTHS.indexOf(name.slice(0, 3).toLowerCase()) + 1;
  let rest = text;
  const take = (re: RegExp, toIso: (m: RegExpExecArray) => string) => {
    rest = rest.replace(re, (...args: unknown[]) => {
      const m = args.slice(0, -2) as unknown as RegExpExecArray;
      out.push({ text: m[0], start: toIso(m) });
      return ' ';
    });
  };
  take(new RegExp(`\\b(\\d{1,2}) ${MONTH},? (\\d{4})\\b`, 'g'), (m) => iso(m[3]!, month(m[2]!), Number(m[1])));
  take(new RegExp(`\\b${MONTH} (\\d{1,2}), (\\d{4})\\b`, 'g'), (m) => iso(m[3]!, month(m[1]!), Number(m[2])));
  take(new RegExp(`\\b${MONTH},? (\\d{4})\\b`, 'g'), (m) => iso(m[2]!, month(m[1]!), 1));
  take(/\bQ([1-4]) (\d{4})\b/g, (m) => iso(m[2]!, (Number(m[1]) - 1) * 3 + 1, 1));
  take(/\b(\d{4})-(\d{2})-(\d{2})\b/g, (m) => iso(m[1]!, Number(m[2]), Number(m[3])));
  take(/\b((?:19|20)\d{2})\b/g, (m) => iso(m[1]!, 1, 1));
  return out;
}

function subtitleProblems(subtitle: string, lastDate: string): string[] {
  return datesNamed(subtitle)
    .filter((d) => d.start > lastDate.slice(0, 10))
    .map((d) => `subtitle names ${d.text}, after the data ends (${lastDate.slice(0, 10)})`);
}
