// Title and caption of a members-vs-others comparison (performance_compare), by audience.
import { formatValue } from '../format.js';
import type { Finding } from '../types.js';
import {
  aboutPercent,
  chancePhrase,
  countText,
  findOne,
  formatDifference,
  formatP,
  groupLabel,
  inText,
  intervalText,
  periodInText,
  periodLead,
  rangeText,
  noTestWords,
  quantityFormat,
  quantityLabel,
  sampleNoun,
  volumeNote,
  perUnitNote,
  statisticText,
  testName,
  type WordsContext, isAre } from './performance-words.js';

export interface PerformanceWords {
  title: string;
  caption: string;
  /** Extra notes beyond the caveats (method statements, cautions). */
  notes: string[];
  /** One sentence for the thread summary; null when there is nothing to say. */
  takeaway: string | null;
  /** The comparison is significant (or exact): ranks the takeaway higher. */
  clear: boolean;
}

export function compareWords(findings: readonly Finding[], ctx: WordsContext): PerformanceWords {
  const { metric, group, locale, audience, dataset } = ctx;
  const members = findOne(findings, 'performance_group', (f) => f.group === 'members' && f.metric === metric.name);
  const others = findOne(findings, 'performance_group', (f) => f.group === 'others' && f.metric === metric.name);
  const diff = findOne(findings, 'performance_difference', (f) => f.comparison === 'members_vs_others');
  const none = findOne(findings, 'performance_no_test', (f) => f.comparison === 'members_vs_others');
  const verdict = findOne(findings, 'performance_verdict', (f) => f.comparison === 'members_vs_others');
  const median = findOne(findings, 'performance_median_difference');
  const win = findOne(findings, 'performance_window');
  const quantity = members?.quantity ?? others?.quantity ?? 'metric';
  const unit = members?.unit ?? others?.unit;
  const label = quantityLabel(metric, quantity, dataset, unit);
  const fmt = quantityFormat(metric, quantity, locale);
  const rows = sampleNoun(dataset, quantity, unit);
  const m = groupLabel(group, 'members');
  const o = groupLabel(group, 'others');
  const lead = win ? periodLead(win, ctx) : 'In the period asked for';
  const period = periodInText(win, ctx);
  const value = (v: number | null | undefined) => formatValue(v ?? null, fmt);

  if (!members || !others || members.estimate === null || others.estimate === null || members.n === 0 || others.n === 0) {
    const text = none ? noTestWords(none, ctx, rows) : `There is no data to compare ${period}.`;
    if (none?.reason === 'suppressed') {
      const hidden = [none.suppressedFirst ? m : null, none.suppressedSecond ? o : null].filter((x): x is string => x !== null);
      return { title: `${label}: too few to show for ${hidden.map(inText).join(' and ') || 'one group'}`, caption: text, notes: [], takeaway: null, clear: false };
    }
    return { title: `${label}: nothing to compare for ${inText(m)} and ${inText(o)}`, caption: text, notes: [], takeaway: null, clear: false };
  }

  const both = `${value(members.estimate)} against ${value(others.estimate)}`;
  const rel = verdict?.relative ?? diff?.relative ?? relative(members.estimate, others.estimate);
  const same = rel === null ? members.estimate === others.estimate : Math.abs(rel) < 0.005;
  const direction = members.estimate > others.estimate ? 'higher' : 'lower';
  const size = same ? 'about the same' : rel !== null ? `${aboutPercent(rel, locale)} ${direction}` : direction;
  const compareTo = same ? 'as' : 'than';

  if (members.measure === 'total' || none?.reason === 'not_testable') {
    const title = `${label}: ${value(members.estimate)} for ${inText(m)} against ${value(others.estimate)} for ${inText(o)}`;
    const caption = `${lead}: ${inText(label)} ${value(members.estimate)} for ${inText(m)} and ${value(others.estimate)} for ${inText(o)}. ${none ? noTestWords(none, ctx, rows) : ''}`.trim();
    return { title, caption, notes: [], takeaway: `${title}.`, clear: false };
  }

  const title = same
    ? `${label}: about the same for ${inText(m)} and ${inText(o)}`
    : `${label} ${isAre(label)} ${size} for ${inText(m)} than for ${inText(o)}`;

  if (none || !diff || !verdict) {
    // A single row or no spread at all: state the values and why there is no verdict.
    const exact = verdict?.basis === 'exact';
    const why = none ? ` ${noTestWords(none, ctx, rows)}` : '';
    const caption = `${lead}, ${inText(label)} was ${value(members.estimate)} for ${inText(m)} and ${value(others.estimate)} for ${inText(o)}.${why}${
      exact && !same ? ' Because nothing varies within either group, the difference is exact rather than estimated.' : ''
    }`;
    return { title, caption, notes: [], takeaway: caption, clear: exact && !same };
  }

  const clear = verdict.verdict !== 'no_clear_difference';
  const chance = chancePhrase(diff.pValue, verdict.alpha);
  const goodness =
    volumeNote(quantity, inText(m)) ??
    (verdict.verdict === 'better' ? ` On this measure that is better for ${inText(m)}.` : verdict.verdict === 'worse' ? ` On this measure that is worse for ${inText(m)}.` : '');
  let caption: string;
  if (audience === 'leadership') {
    caption = `${lead}, ${inText(label)} ${isAre(label)} ${size} for ${inText(m)} ${compareTo} for ${inText(o)} (${both}); ${chance}. This is an observational comparison, not proof of cause.`;
  } else if (audience === 'managers') {
    const gap = same ? 'practically no gap' : `${formatDifference(diff.difference, fmt)} ${direction}`;
    const crosses = diff.ci[0] <= 0 && diff.ci[1] >= 0;
    const [lo, hi] = [Math.abs(diff.ci[0]), Math.abs(diff.ci[1])].sort((a, b) => a - b) as [number, number];
    const range = crosses ? ' (the range of likely gaps includes no gap at all)' : `; the true gap is probably ${rangeText(lo, hi, fmt)}`;
    const medianText = median
      ? ` The median is ${value(median.medianMembers)} against ${value(median.medianOthers)}, a gap of ${formatDifference(median.difference, fmt)} for the typical ${rows.singular}.`
      : '';
    caption = `${lead}, ${inText(label)} ${isAre(label)} ${both} for ${inText(m)} and ${inText(o)}: ${gap}, over ${countText(diff.nFirst, locale)} and ${countText(diff.nSecond, locale)} ${rows.plural}. ${capitalise(chance)}${range}.${goodness}${medianText}`;
  } else {
    const medianText = median
      ? ` Median difference ${formatDifference(median.difference, fmt, { signed: true })} (seeded percentile bootstrap, ${intervalText(median.ci, median.confidence, fmt, locale)}; ${countText(median.resamples, locale)} resamples of up to ${countText(Math.max(median.sampleMembers, median.sampleOthers), locale)} sampled ${rows.plural} per group, seed ${median.seed}).`
      : '';
    const effect = diff.effectSize === null ? '' : `, Hedges' g = ${formatValue(diff.effectSize, { unit: 'number', decimals: 2, locale })}`;
    const relText = diff.relative === null ? '' : `, ${formatValue(diff.relative, { unit: 'percent', decimals: 1, locale }, { signed: true })} relative`;
    caption = `${capitalise(testName(diff.test))}, ${inText(m)} − ${inText(o)} on ${inText(label)}, ${period}: ${formatDifference(diff.difference, fmt, { signed: true })} (${intervalText(diff.ci, diff.confidence, fmt, locale)})${relText}; ${statisticText(diff, locale)}, ${formatP(diff.pValue, locale)}${effect}; n = ${countText(diff.nFirst, locale)} vs ${countText(diff.nSecond, locale)} ${rows.plural}.${medianText}`;
  }
  const takeaway = `${capitalise(label)} ${isAre(label)} ${size} for ${inText(m)} ${compareTo} for ${inText(o)} (${both}); ${chance}.`;
  const unitNote = perUnitNote(quantity, metric, rows);
  return { title, caption, notes: unitNote ? [unitNote] : [], takeaway, clear };
}

function relative(a: number, b: number): number | null {
  return b === 0 ? null : (a - b) / b;
}

import { capitalise } from './grammar.js';
export { capitalise };
