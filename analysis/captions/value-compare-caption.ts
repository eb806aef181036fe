// Title and caption of a value-against-value comparison, written only from its finding: each
// value's figure in both spans and its growth, the gap, and whether the gap in growth is clear.
import type { DatasetConfig, Metric } from '../../config/schema.js';
import type { ContrastSide, PerDaySide, ValueCompareFinding } from '../findings/contrast.js';
import type { ChangeBasis } from '../findings/table.js';
import { formatChange, formatGrowth, formatValue } from '../format.js';
import { growthMultiple } from '../stats/growth.js';
import type { Audience } from '../types.js';
import { capitalise, inSentence, labelAtStart, possessive } from './grammar.js';
import { formatPoints, segmentText, spanText, valueText } from './growth-words.js';
import { formatP, quantityFormat } from './performance-words.js';

export interface ValueCompareWords {
  title: string;
  caption: string;
  /** The gap in growth is clear (its interval leaves out zero). */
  clear: boolean;
}

/**
 * How the finding states changes (catalog.ts changeBasisOf, read by the template): a rate or share
 * in points, a temperature or a metric whose values reach or cross zero in its units, else percent.
 */
function basisOf(f: ValueCompareFinding, metric: Metric): ChangeBasis {
  return f.basis ?? (metric.unit === 'percent' ? 'points' : 'percent');
}

/** A change (or a gap between changes) in the finding's basis. */
function moveText(v: number | null, basis: ChangeBasis, metric: Metric, locale: string): string {
  if (basis === 'points') return formatPoints(v, locale);
  if (basis === 'units') return valueText(v, metric, locale, true);
  return formatGrowth(v, locale);
}

function growthText(s: ContrastSide, basis: ChangeBasis, metric: Metric, locale: string): string {
  const v = basis === 'percent' ? s.growth : s.change;
  return v === null ? 'no comparable base' : moveText(v, basis, metric, locale);
}

/** Which two spans are compared, in words. */
function spansText(f: ValueCompareFinding, locale: string): string {
  const pair = `${spanText(f.current, locale)} against ${spanText(f.prior, locale)}`;
  if (f.priorBasis === 'asked') return pair;
  if (f.priorBasis === 'span_ends') return `${pair} (the last whole ${f.spanUnit ?? 'period'} of the data against the first whole one from the start asked about)`;
  return `${spanText(f.current, locale)} against the same dates a year earlier`;
}

const PERIOD_NOUN = { day: 'daily', week: 'weekly', month: 'monthly', quarter: 'quarterly', year: 'yearly' } as const;

/**
 * Two spans of different lengths ("February against January": 29 days against 31): the days are
 * said, and a total that adds up over days is also given per day, since the totals differ by the
 * days alone. A leap day in a year (0.3%) is said but given no per-day figures, as growth drivers do.
 */
function lengthsSentence(f: ValueCompareFinding, metric: Metric, label: string, name: (s: ContrastSide) => string, locale: string): string | null {
  const l = f.lengths;
  if (!l) return null;
  const said = `${capitalise(spanText(f.current, locale))} has ${l.current} days and ${spanText(f.prior, locale)} ${l.prior}`;
  if (!l.perDay) return `${said}; ${label} is not a total, so the days do not change it.`;
  if (Math.abs(l.current - l.prior) <= 0.005 * Math.max(l.current, l.prior)) return `${said}; both are compared whole.`;
  const fmt = quantityFormat(metric, 'per_day', locale);
  const side = (s: ContrastSide, d: PerDaySide) =>
    `${name(s)} ${formatValue(d.current, fmt, { rate: true })} against ${formatValue(d.prior, fmt, { rate: true })}${d.growth === null ? '' : ` (${formatGrowth(d.growth, locale)})`}`;
  return `${said}, so per day: ${side(f.first, l.perDay.first)}; ${side(f.second, l.perDay.second)}.`;
}

export function valueCompareWords(f: ValueCompareFinding | undefined, metric: Metric, dataset: DatasetConfig, locale: string, audience: Audience): ValueCompareWords {
  if (!f) return { title: `${labelAtStart(metric.label)}: nothing to compare`, caption: 'There is no data for either value in the spans compared.', clear: false };
  const name = (s: ContrastSide) => segmentText(s.value, f.dimension, dataset);
  const basis = basisOf(f, metric);
  const inPercent = basis === 'percent';
  // A percentage is growth; a difference in units or points is a change.
  const noun = inPercent ? 'growth' : 'change';
  const label = inSentence(metric.label);
  const [a, b] = [f.first, f.second];
  const spans = spansText(f, locale);
  const hidden = [a, b].filter((s) => s.suppressed);
  if (hidden.length > 0) {
    return {
      title: `${capitalise(name(hidden[0]!))} is too small to show on its own`,
      caption: `${hidden.map(name).join(' and ')} ${hidden.length === 1 ? 'has' : 'have'} fewer rows than the minimum group size in ${spans}, so the figures are withheld.`,
      clear: false,
    };
  }
  const money = (v: number | null) => valueText(v, metric, locale);
  const sideText = (s: ContrastSide) =>
    s.prior === null || s.rowsPrior === 0
      ? `${name(s)} ${money(s.current)} (no data in the earlier span)`
      : `${name(s)} ${money(s.current)} (from ${money(s.prior)}, ${growthText(s, basis, metric, locale)})`;
  const sentences = [`${capitalise(label)}, ${spans}: ${sideText(a)}; ${sideText(b)}.`];
  const days = lengthsSentence(f, metric, label, name, locale);
  if (days) sentences.push(days);

  const missing = [a, b].filter((s) => s.rowsPrior === 0 || s.prior === null);
  const rel = f.relativeGrowth;
  const shift = f.gapShift ?? null;
  const tested = rel ?? shift;
  const clear = tested !== null && (tested.ci[0] > 0 || tested.ci[1] < 0);
  const comparable = missing.length === 0 && (!inPercent ? a.change !== null && b.change !== null : a.growth !== null && b.growth !== null);
  let title: string;
  if (!comparable) {
    const gone = missing[0];
    title = gone
      ? `${capitalise(name(gone))} has no ${label} in the earlier span, so its ${noun} cannot be set against ${name(gone === a ? b : a)}'s`
      : `${capitalise(label)}: ${name(a)} against ${name(b)}, ${noun} not comparable`;
  } else {
    const key = (s: ContrastSide) => (!inPercent ? s.change! : s.growth!);
    const [fast, slow] = key(a) >= key(b) ? [a, b] : [b, a];
    // A change in units or points is larger or smaller, not faster: "rose more than".
    const verb = key(fast) > 0 ? (inPercent ? 'grew faster than' : 'rose more than') : 'fell less than';
    const figures = `${growthText(fast, basis, metric, locale)} against ${growthText(slow, basis, metric, locale)}`;
    title = clear || tested === null
      ? `${capitalise(name(fast))} ${verb} ${name(slow)}: ${figures}`
      : `${capitalise(name(a))} and ${name(b)}: no clear gap in ${noun} (${growthText(a, basis, metric, locale)} against ${growthText(b, basis, metric, locale)})`;
    // A gap between a multiple and a percentage ("+1,443 pts") tells nobody anything.
    const multiples = inPercent && (growthMultiple(a.growth) !== null || growthMultiple(b.growth) !== null);
    const gapValue = inPercent ? f.growthGap : (f.changeGap ?? null);
    if (gapValue !== null && audience !== 'leadership' && !multiples) {
      // A gap between two percentages is in points; between two changes in units or points, in those.
      const gap = inPercent ? formatPoints(gapValue, locale) : moveText(gapValue, basis, metric, locale);
      sentences.push(`The gap in ${inPercent ? 'growth' : 'change'} is ${gap} (${name(a)} minus ${name(b)}).`);
    }
  }
  if (rel) {
    const interval = `${formatChange(rel.ci[0], locale)} to ${formatChange(rel.ci[1], locale)}`;
    const against = `Relative to ${name(b)}, ${possessive(name(a))} ${label} changed ${formatChange(rel.relative, locale)}`;
    const verdict = clear ? 'a clear difference' : 'within what the period-to-period variation allows, so no clear difference';
    if (audience === 'analysts') {
      sentences.push(`${against} (${formatValue(rel.confidence, { unit: 'percent', decimals: 0, locale })} interval ${interval}; Welch's t-test on ${rel.nBefore} and ${rel.nAfter} ${PERIOD_NOUN[rel.periods]} log ratios, t = ${formatValue(rel.t, { unit: 'number', decimals: 2, locale })}, df = ${formatValue(rel.df, { unit: 'number', decimals: 1, locale })}, ${formatP(rel.pValue, locale)}): ${verdict}.`);
    } else if (audience === 'managers') {
      sentences.push(`${against} (${formatValue(rel.confidence, { unit: 'percent', decimals: 0, locale })} interval ${interval}): ${verdict}.`);
    } else sentences.push(clear ? 'The gap in growth is clear.' : 'The gap in growth is within normal variation.');
  } else if (shift) {
    const interval = `${moveText(shift.ci[0], basis, metric, locale)} to ${moveText(shift.ci[1], basis, metric, locale)}`;
    const against = `Against ${name(b)}, ${possessive(name(a))} ${label} moved ${moveText(shift.estimate, basis, metric, locale)}`;
    const verdict = clear ? 'a clear difference' : 'within what the period-to-period variation allows, so no clear difference';
    if (audience === 'analysts') {
      sentences.push(`${against} (${formatValue(shift.confidence, { unit: 'percent', decimals: 0, locale })} interval ${interval}; Welch's t-test on ${shift.nBefore} and ${shift.nAfter} ${PERIOD_NOUN[shift.periods]} differences, t = ${formatValue(shift.t, { unit: 'number', decimals: 2, locale })}, df = ${formatValue(shift.df, { unit: 'number', decimals: 1, locale })}, ${formatP(shift.pValue, locale)}): ${verdict}.`);
    } else if (audience === 'managers') {
      sentences.push(`${against} (${formatValue(shift.confidence, { unit: 'percent', decimals: 0, locale })} interval ${interval}): ${verdict}.`);
    } else sentences.push(clear ? 'The gap in change is clear.' : 'The gap in change is within normal variation.');
  } else if (comparable && f.noGrowthTest === 'too_few_periods') {
    sentences.push(`Too few periods to test the gap in ${noun}.`);
  }
  if (f.level && audience !== 'leadership') {
    const lv = f.level;
    const diff = basis === 'points' || metric.unit === 'percent' ? formatPoints(lv.difference, locale) : valueText(lv.difference, metric, locale, true);
    const p = audience === 'analysts' ? `, ${formatP(lv.pValue, locale)}` : '';
    sentences.push(`In ${spanText(f.current, locale)}, ${name(a)} minus ${name(b)}: ${diff} (${lv.pValue < 0.05 ? 'unlikely to be chance' : 'could be chance'}${p}).`);
  }
  return { title, caption: sentences.join(' '), clear };
}

