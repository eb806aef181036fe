// Title and caption of a per-unit frequency comparison (performance_frequency), by audience.
import type { Metric } from '../../config/schema.js';
import type { PerformanceFrequencyGroupFinding } from '../findings/performance.js';
import { formatValue, significant, type ValueFormat, valueFormatOf } from '../format.js';
import type { Finding } from '../types.js';
import { capitalise, type PerformanceWords } from './performance-compare.js';
import {
  chancePhrase,
  countText,
  findOne,
  formatDifference,
  formatP,
  groupLabel,
  inText,
  intervalText,
  noTestWords,
  perUnitFormat,
  periodInText,
  periodLead,
  statisticText,
  testName,
  unitNoun,
  type WordsContext, isAre } from './performance-words.js';

export function frequencyFormat(metric: Metric, locale: string): ValueFormat {
  return metric.definition.type === 'count' || metric.unit === 'count' ? perUnitFormat(locale) : valueFormatOf(metric, locale);
}

/** "Bookings per customer". */
export function perUnitLabel(metric: Metric, ctx: Pick<WordsContext, 'dataset' | 'group'>): string {
  return `${metric.label} per ${unitNoun(ctx.dataset, ctx.group).singular}`;
}

export function frequencyWords(findings: readonly Finding[], ctx: WordsContext): PerformanceWords {
  const { metric, group, locale, audience } = ctx;
  const members = findOne(findings, 'performance_frequency_group', (f) => f.group === 'members');
  const others = findOne(findings, 'performance_frequency_group', (f) => f.group === 'others');
  const diff = findOne(findings, 'performance_difference', (f) => f.comparison === 'members_vs_others');
  const none = findOne(findings, 'performance_no_test', (f) => f.comparison === 'members_vs_others');
  const verdict = findOne(findings, 'performance_verdict', (f) => f.comparison === 'members_vs_others');
  const ratio = findOne(findings, 'performance_frequency_ratio');
  const win = findOne(findings, 'performance_window');
  const units = unitNoun(ctx.dataset, group);
  const label = perUnitLabel(metric, ctx);
  const fmt = frequencyFormat(metric, locale);
  const m = groupLabel(group, 'members');
  const o = groupLabel(group, 'others');
  const lead = win ? periodLead(win, ctx) : 'In the period asked for';
  const value = (v: number | null | undefined) => formatValue(v ?? null, fmt);
  const isCount = metric.definition.type === 'count';
  // Order statistics of counts are whole (or half) numbers: no padded decimals.
  // A median or tenth of counts is whole, or a half between two: "4", "2.5", never "4.00".
  const spot = (v: number | null) => (isCount ? formatValue(v, { unit: 'number', decimals: v !== null && Number.isInteger(v) ? 0 : 1, locale }) : value(v));
  const noun = inText(metric.label);

  if (!members || !others || none?.reason === 'suppressed') {
    const text = none ? noTestWords(none, ctx, units) : `There is no data to compare ${periodInText(win, ctx)}.`;
    if (none?.reason === 'suppressed') {
      const hidden = [none.suppressedFirst ? m : null, none.suppressedSecond ? o : null].filter((x): x is string => x !== null);
      return { title: `${label}: too few to show for ${hidden.map(inText).join(' and ') || 'one group'}`, caption: text, notes: [], takeaway: null, clear: false };
    }
    return { title: `${label}: nothing to compare for ${inText(m)} and ${inText(o)}`, caption: text, notes: [], takeaway: null, clear: false };
  }

  const r = ratio?.ratio ?? (others.mean !== 0 ? members.mean / others.mean : null);
  const times = (x: number) => formatValue(significant(x, 2), { unit: 'number', decimals: x >= 10 ? 0 : 1, locale });
  let statement: string;
  const pct = (x: number) => formatValue(x, { unit: 'percent', decimals: 0, locale });
  if (r === null) statement = `${label}: ${value(members.mean)} for ${inText(m)} against ${value(others.mean)} for ${inText(o)}`;
  else if (isCount) {
    const size =
      r >= 1.1 ? `${times(r)} times as many` : r <= 0.9 ? `${pct(1 - r)} fewer` : 'about as many';
    statement = `${m} have ${size} ${noun} per ${units.singular} ${r <= 0.9 ? 'than' : 'as'} ${inText(o)}`;
  } else {
    const size = r >= 1.1 ? `${times(r)} times as high` : r <= 0.9 ? `${pct(1 - r)} lower` : 'about the same';
    statement = `${label} ${isAre(label)} ${size} for ${inText(m)} ${r <= 0.9 ? 'than' : 'as'} for ${inText(o)}`;
  }
  const title = statement;
  const both = `${value(members.mean)} against ${value(others.mean)}`;
  const top = topBucketLine(members, others, locale, noun);
  const membership = `A ${units.singular} counts among ${inText(m)} when any of their ${inText(ctx.dataset.metrics.find((x) => x.definition.type === 'count' && !x.definition.where)?.label ?? 'rows')} in the period is flagged ${group.label}.`;

  if (none || !diff || !verdict) {
    const why = none ? ` ${noTestWords(none, ctx, units)}` : '';
    const caption = `${lead}, ${inText(label)} was ${value(members.mean)} for ${inText(m)} and ${value(others.mean)} for ${inText(o)}.${why}`;
    return { title, caption, notes: [membership], takeaway: caption, clear: verdict?.basis === 'exact' };
  }
  const chance = chancePhrase(diff.pValue, verdict.alpha);
  let caption: string;
  if (audience === 'leadership') {
    caption = `${lead}, ${lowerFirst(statement)} (${both}); ${chance}.${top ? ` ${top}` : ''} This is an observational comparison, not proof of cause.`;
  } else if (audience === 'managers') {
    const medians =
      members.median !== null && others.median !== null
        ? ` The median ${units.singular} had ${spot(members.median)} among ${inText(m)} against ${spot(others.median)} among ${inText(o)}${
            members.p90 !== null && others.p90 !== null ? `; the top tenth had ${spot(members.p90)} or more against ${spot(others.p90)} or more` : ''
          }.`
        : '';
    const buckets = bucketLine(members, others, m, o, locale, units.plural, noun);
    caption = `${lead}, ${inText(label)} ${isAre(label)} ${both} for ${inText(m)} and ${inText(o)}, over ${countText(members.units, locale)} and ${countText(others.units, locale)} ${units.plural}. ${capitalise(chance)}.${medians}${buckets ? ` ${buckets}` : ''}`;
  } else {
    const ratioText =
      ratio && ratio.low !== null && ratio.high !== null
        ? `; ratio of means ${formatValue(ratio.ratio, { unit: 'number', decimals: 2, locale })} (${formatValue(ratio.confidence, { unit: 'percent', decimals: 0, locale })} CI ${formatValue(ratio.low, { unit: 'number', decimals: 2, locale })} to ${formatValue(ratio.high, { unit: 'number', decimals: 2, locale })}, delta method on the log scale)`
        : '';
    const effect = diff.effectSize === null ? '' : `, Hedges' g = ${formatValue(diff.effectSize, { unit: 'number', decimals: 2, locale })}`;
    const spread =
      members.median !== null && others.median !== null && members.p90 !== null && others.p90 !== null
        ? ` Medians ${spot(members.median)} vs ${spot(others.median)}, 90th percentiles ${spot(members.p90)} vs ${spot(others.p90)}.`
        : '';
    caption = `${capitalise(testName(diff.test))} on ${inText(label)}, ${inText(m)} − ${inText(o)}, ${periodInText(win, ctx)}: ${formatDifference(diff.difference, fmt, { signed: true })} (${intervalText(diff.ci, diff.confidence, fmt, locale)}); ${statisticText(diff, locale)}, ${formatP(diff.pValue, locale)}${effect}${ratioText}; n = ${countText(members.units, locale)} vs ${countText(others.units, locale)} ${units.plural}.${spread}`;
  }
  return { title, caption, notes: [membership], takeaway: `${statement} (${both}); ${chance}.`, clear: verdict.verdict !== 'no_clear_difference' };
}

/** "26% of pass holders had 6 or more bookings, against 0.2% of other customers." */
function topBucketLine(members: PerformanceFrequencyGroupFinding, others: PerformanceFrequencyGroupFinding, locale: string, noun: string): string | null {
  const mTop = members.buckets[members.buckets.length - 1];
  const oTop = others.buckets[others.buckets.length - 1];
  if (!mTop || !oTop || mTop.max !== null) return null;
  return `${share(mTop.share, locale)} of them had ${mTop.min} or more ${noun}, against ${share(oTop.share, locale)} of the others.`;
}

function bucketLine(
  members: PerformanceFrequencyGroupFinding,
  others: PerformanceFrequencyGroupFinding,
  m: string,
  o: string,
  locale: string,
  unitsPlural: string,
  noun: string,
): string | null {
  if (members.buckets.length === 0 || members.buckets.length !== others.buckets.length) return null;
  const names = members.buckets.map((b) => (b.max === null ? `${b.min} or more` : b.min === b.max ? `${b.min}` : `${b.min}–${b.max}`));
  const list = (f: PerformanceFrequencyGroupFinding) => f.buckets.map((b) => share(b.share, locale)).join(', ');
  return `Shares of ${unitsPlural} with ${joinAnd(names)} ${noun}: ${inText(m)} ${list(members)}; ${inText(o)} ${list(others)}.`;
}

function share(x: number, locale: string): string {
  return formatValue(x, { unit: 'percent', decimals: x > 0 && x < 0.01 ? 1 : 0, locale });
}

function joinAnd(items: string[]): string {
  return items.length <= 1 ? (items[0] ?? '') : `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}

function lowerFirst(text: string): string {
  return inText(text);
}
