// Title and caption of a before/after comparison across a launch (performance_before_after):
// difference in differences when members existed before the launch; otherwise others before vs
// after and members vs others after, said plainly.
import type { PerformanceDifferenceFinding, PerformanceDidFinding, PerformancePeriodsFinding } from '../findings/performance.js';
import { formatPeriod, formatValue } from '../format.js';
import { addMonths } from '../periods.js';
import type { Finding } from '../types.js';
import { capitalise, type PerformanceWords } from './performance-compare.js';
import {
  aboutPercent,
  chancePhrase,
  countText,
  day,
  findOne,
  formatDifference,
  formatP,
  groupLabel,
  inText,
  intervalText,
  noTestWords,
  quantityFormat,
  quantityLabel,
  rowNoun,
  sampleNoun,
  unitColumnNoun,
  seriesQuantity,
  seriesUnit,
  statisticText,
  testName,
  windowText,
  type WordsContext,
} from './performance-words.js';
import { labelAtStart } from './grammar.js';
import { isSelfSelected } from '../catalog.js';

export function beforeAfterWords(findings: readonly Finding[], ctx: WordsContext): PerformanceWords {
  const { metric, group, locale, audience, dataset } = ctx;
  const quantity = seriesQuantity(findings, metric);
  const label = quantityLabel(metric, quantity, dataset, seriesUnit(findings));
  const fmt = quantityFormat(metric, quantity, locale);
  // Per unit or not, a before/after's cells are days (a group's daily total, put per unit).
  const rows = sampleNoun(dataset, quantity === 'per_unit_day' ? 'per_day' : quantity);
  const m = groupLabel(group, 'members');
  const o = groupLabel(group, 'others');
  const value = (v: number) => formatValue(v, fmt);
  const periods = findOne(findings, 'performance_periods');
  const did = findOne(findings, 'performance_did');
  const notApplicable = findOne(findings, 'performance_did_not_applicable');
  const between = findOne(findings, 'performance_difference', (f) => f.comparison === 'members_vs_others');
  const othersShift = findOne(findings, 'performance_difference', (f) => f.comparison === 'others_after_vs_before');
  const verdict = findOne(findings, 'performance_verdict', (f) => f.comparison === 'members_vs_others');
  const none = findOne(findings, 'performance_no_test', (f) => f.comparison === 'members_vs_others');
  const notes: string[] = [];
  if (periods) notes.push(windowsNote(periods, locale));
  const win = findOne(findings, 'performance_window');
  const span = win ? windowText(win, locale) : '';

  if (did && periods) {
    notes.push(
      `Difference in differences assumes both groups would have moved in parallel without the launch; compare their lines before ${day(periods.launchDate, locale)} to judge that.`,
    );
    return didWords(did, periods, { label, fmt, m, o, locale, audience, value, notes });
  }

  if (notApplicable?.reason === 'members_empty_before' && periods) {
    const sides = `${months(periods.months)} after the launch (${monthSpan(periods.after, locale)})`;
    const title = between
      ? `${label}: ${size(between, locale)} for ${inText(m)} than for ${inText(o)} in the ${sides.replace(/ \(.*\)$/, '')}`
      : `${label} before and after the ${group.label} launch`;
    const intro = `${group.label} had no ${inText(m)} before ${day(periods.launchDate, locale)}, so the same group cannot be compared before and after (no difference in differences).`;
    if (!between || !verdict) {
      const why = none ? ` ${noTestWords(none, ctx, rows)}` : '';
      return { title, caption: `${intro}${why}`, notes, takeaway: null, clear: false };
    }
    // A count per day is each group's volume: with no members before the launch it says how many
    // customers joined, not whether anyone changed, so it is stated as volumes and not as a finding.
    if (quantity === 'per_day') {
      const volumes = `In the ${sides}, ${inText(m)} accounted for ${value(between.first)} ${inText(label)} against ${value(between.second)} for ${inText(o)}: totals a day follow how many each group holds, not how each behaves, so they are not compared as a result.`;
      return { title: `${label} before and after the ${group.label} launch: no like-for-like comparison`, caption: `${intro} ${volumes}`, notes, takeaway: null, clear: false };
    }
    const chance = chancePhrase(between.pValue, verdict.alpha);
    const shift = othersShift
      ? `${inText(o)}' own ${inText(label)} ${othersShift.difference > 0 ? 'rose' : othersShift.difference < 0 ? 'fell' : 'held'} ${
          othersShift.relative !== null && Math.abs(othersShift.relative) >= 0.005 ? aboutPercent(othersShift.relative, locale) : ''
        } on the ${months(periods.months)} before`.replace(/\s+on the/, ' on the')
      : null;
    let caption: string;
    if (audience === 'leadership') {
      caption = `${intro} In the ${sides}, ${inText(label)} was ${size(between, locale)} for ${inText(m)} than for ${inText(o)}; ${chance}.${
        shift ? ` Over the same months, ${shift}; ${chancePhrase(othersShift!.pValue, verdict.alpha).replace('the difference', 'the change')}.` : ''
      } This is an observational comparison, not proof of cause.`;
    } else if (audience === 'managers') {
      caption = `${intro} In the ${sides}, ${inText(label)} was ${value(between.first)} for ${inText(m)} against ${value(between.second)} for ${inText(o)} (${countText(between.nFirst, locale)} and ${countText(between.nSecond, locale)} ${rows.plural}); ${chance}.${
        shift && othersShift ? ` ${capitalise(shift)} (${value(othersShift.first)} against ${value(othersShift.second)}); ${chancePhrase(othersShift.pValue, verdict.alpha).replace('the difference', 'the change')}.` : ''
      }`;
    } else {
      caption = `${intro} ${testLine(between, `${inText(m)} − ${inText(o)}, ${monthSpan(periods.after, locale)}`, fmt, locale, rows.plural)}${
        othersShift ? ` ${testLine(othersShift, `${inText(o)}, ${monthSpan(periods.after, locale)} − ${monthSpan(periods.before, locale)}`, fmt, locale, rows.plural)}` : ''
      }`;
    }
    return { title, caption, notes, takeaway: `${title}; ${chance}.`, clear: verdict.verdict !== 'no_clear_difference' };
  }

  // No launch date, or too little data either side of it: members vs others over the whole window.
  const reason =
    notApplicable?.reason === 'no_launch_date'
      ? `${group.label} has no launch date in the catalog, so there is no before and after to compare.`
      : notApplicable?.reason === 'window_too_short'
        ? `There is not a full month of data on both sides of the launch, so there is no before and after to compare.`
        : notApplicable?.reason === 'not_poolable'
          ? `${labelAtStart(metric.label)} cannot be added up across months, so there is no before and after to compare.`
          : notApplicable?.reason === 'group_empty'
            ? `One group has no ${rows.plural} on one side of the launch, so there is no before and after to compare.`
            : notApplicable?.reason === 'suppressed'
              ? `Some months of a group have fewer ${rows.plural} than the minimum group size: they are too few to show, so there is no before and after to compare.`
              : '';
  const title = between ? `${label}: ${size(between, locale)} for ${inText(m)} than for ${inText(o)}` : `${label}: ${inText(m)} and ${inText(o)} per period`;
  if (!between || !verdict) {
    return { title, caption: `${reason}${none ? ` ${noTestWords(none, ctx, rows)}` : ''}`.trim(), notes, takeaway: null, clear: false };
  }
  const chance = chancePhrase(between.pValue, verdict.alpha);
  const body =
    audience === 'analysts'
      ? testLine(between, `${inText(m)} − ${inText(o)}`, fmt, locale, rows.plural)
      : `Over the whole period${span ? ` (${span})` : ''}, ${inText(label)} was ${value(between.first)} for ${inText(m)} against ${value(between.second)} for ${inText(o)}; ${chance}.`;
  const tail = audience === 'leadership' ? ' This is an observational comparison, not proof of cause.' : '';
  return { title, caption: `${reason} ${body}${tail}`.trim(), notes, takeaway: `${title}; ${chance}.`, clear: verdict.verdict !== 'no_clear_difference' };
}

function didWords(
  did: PerformanceDidFinding,
  periods: PerformancePeriodsFinding,
  w: {
    label: string;
    fmt: ReturnType<typeof quantityFormat>;
    m: string;
    o: string;
    locale: string;
    audience: WordsContext['audience'];
    value: (v: number) => string;
    notes: string[];
  },
): PerformanceWords {
  const { label, fmt, m, o, locale, audience, value, notes } = w;
  const ratio = did.ratio ?? null;
  const amount = formatDifference(did.estimate, fmt);
  // The verdict follows the interval stated: the relative one (log-linear) when there is one.
  const clear = ratio ? ratio.ci[0] > 0 || ratio.ci[1] < 0 : did.pValue !== null && did.pValue < 0.05;
  const chance = chancePhrase(ratio ? ratio.pValue : did.pValue, 0.05);
  const percent = (v: number) => formatValue(v, { unit: 'percent', decimals: Math.abs(v) < 0.1 ? 1 : 0, locale }, { signed: true });
  const relRange = ratio ? `${formatValue(did.confidence, { unit: 'percent', decimals: 0, locale })} interval ${percent(ratio.ci[0])} to ${percent(ratio.ci[1])}` : '';
  const up = (ratio ? ratio.estimate : did.estimate) > 0;
  const title = clear
    ? ratio
      ? `${label}: ${aboutPercent(ratio.estimate, locale)} ${up ? 'higher' : 'lower'} for ${inText(m)} after the launch, relative to ${inText(o)}`
      : `${label}: ${inText(m)} moved ${amount} ${up ? 'up' : 'down'} relative to ${inText(o)} after the launch`
    : `${label}: no clear change for ${inText(m)} relative to ${inText(o)} after the launch`;
  const sides = `the ${months(periods.months)} either side of the launch on ${day(periods.launchDate, locale)}`;
  const paths = `${inText(m)} went from ${value(did.membersBefore)} to ${value(did.membersAfter)} and for ${inText(o)} from ${value(did.othersBefore)} to ${value(did.othersAfter)}`;
  const relative = ratio
    ? ` Set against ${inText(o)}' own change, ${inText(m)} ended ${aboutPercent(ratio.estimate, locale)} ${ratio.estimate >= 0 ? 'higher' : 'lower'} (${relRange}); ${chance}.`
    : '';
  let caption: string;
  if (audience === 'leadership') {
    caption = ratio
      ? `Comparing ${sides}, ${inText(label)} for ${paths}.${relative} This is an observational comparison, not proof of cause.`
      : `Comparing ${sides}, ${inText(label)} for ${paths}: ${inText(m)} moved ${amount} ${up ? 'more' : 'less'} than ${inText(o)}; ${chance}. This is an observational comparison, not proof of cause.`;
  } else if (audience === 'managers') {
    const between = did.ci ? `between ${formatDifference(did.ci[0], fmt, { signed: true })} and ${formatDifference(did.ci[1], fmt, { signed: true })}` : '';
    const absolute = formatDifference(did.estimate, fmt, { signed: true });
    caption = ratio
      ? `Comparing ${sides}, ${inText(label)} for ${paths}.${relative} In ${inText(label)}, the difference in differences is ${absolute}${between ? ` (${between})` : ''}.`
      : `Comparing ${sides}, ${inText(label)} for ${paths}. The difference in differences is ${absolute}${did.relative !== null ? ` (${aboutPercent(did.relative, locale)} of what ${inText(m)} would otherwise have had)` : ''}; ${chance}.${between ? ` The true effect is probably ${between}.` : ''}`;
  } else {
    const stats =
      did.test && did.statistic !== null && did.pValue !== null && did.ci
        ? `${testName(did.test)}: ${formatDifference(did.estimate, fmt, { signed: true })} (${intervalText(did.ci, did.confidence, fmt, locale)}); ${statisticText({ test: did.test, statistic: did.statistic, df: did.df }, locale)}, ${formatP(did.pValue, locale)}`
        : `Difference in differences ${formatDifference(did.estimate, fmt, { signed: true })} (no interval: a cell has no spread)`;
    const logLinear = ratio
      ? ` Log-linear (ratio of ratios, delta method): ${percent(ratio.estimate)} (${relRange}), ${formatP(ratio.pValue, locale)}; the verdict follows this interval.`
      : '';
    caption = `${capitalise(stats)}.${logLinear} Cells (${monthSpan(periods.before, locale)} → ${monthSpan(periods.after, locale)}): ${inText(m)} ${value(did.membersBefore)} → ${value(did.membersAfter)}, ${inText(o)} ${value(did.othersBefore)} → ${value(did.othersAfter)}; cells treated as independent samples.`;
  }
  return { title, caption, notes, takeaway: `${title}; ${chance}.`, clear };
}

function testLine(d: PerformanceDifferenceFinding, what: string, fmt: ReturnType<typeof quantityFormat>, locale: string, rowsPlural: string): string {
  const rel = d.relative === null ? '' : `, ${formatValue(d.relative, { unit: 'percent', decimals: 1, locale }, { signed: true })} relative`;
  return `${capitalise(testName(d.test))}, ${what}: ${formatDifference(d.difference, fmt, { signed: true })} (${intervalText(d.ci, d.confidence, fmt, locale)})${rel}; ${statisticText(d, locale)}, ${formatP(d.pValue, locale)}; n = ${countText(d.nFirst, locale)} vs ${countText(d.nSecond, locale)} ${rowsPlural}.`;
}

function size(d: PerformanceDifferenceFinding, locale: string): string {
  if (d.relative === null) return d.difference > 0 ? 'higher' : d.difference < 0 ? 'lower' : 'the same';
  if (Math.abs(d.relative) < 0.005) return 'about the same';
  return `${aboutPercent(d.relative, locale)} ${d.relative > 0 ? 'higher' : 'lower'}`;
}

function months(k: number): string {
  return k === 1 ? 'month' : `${k} months`;
}

/** "April 2023 to March 2024" for a window of whole months. */
export function monthSpan(w: { start: string; end: string }, locale: string): string {
  const first = formatPeriod(w.start, 'month', locale, 'long');
  const last = formatPeriod(addMonths(w.end, -1), 'month', locale, 'long');
  return first === last ? first : `${first} to ${last}`;
}

function windowsNote(p: PerformancePeriodsFinding, locale: string): string {
  return `Equal windows of ${months(p.months)} either side of the launch: ${monthSpan(p.before, locale)} before, ${monthSpan(p.after, locale)} after.`;
}

/**
 * Words of a per-customer before/after (performance_unit_did): the same customers' metric per
 * month before and after the launch, members against others, who was compared and who left out,
 * and the caution that members chose to join.
 */
export function unitDidWords(findings: readonly Finding[], ctx: WordsContext): PerformanceWords | null {
  const did = findOne(findings, 'performance_unit_did');
  const periods = findOne(findings, 'performance_periods');
  if (!did || !periods) return null;
  const { metric, group, locale, dataset } = ctx;
  const noun = unitColumnNoun(dataset, did.unit);
  const rowsNoun = rowNoun(dataset);
  const label = quantityLabel(metric, 'per_unit_month', dataset, did.unit);
  const fmt = quantityFormat(metric, 'per_unit_month', locale);
  const value = (v: number) => formatValue(v, fmt);
  const pct = (x: number) => formatValue(x, { unit: 'percent', decimals: 1, locale }, { signed: true });
  const m = groupLabel(group, 'members');
  const o = groupLabel(group, 'others');
  const [mg, og] = [did.groups.members, did.groups.others];
  const before = monthSpan(periods.before, locale);
  const after = monthSpan(periods.after, locale);
  const span = `the ${months(periods.months)} before the launch (${before}) and the ${months(periods.months)} after it (${after})`;
  const notes = [
    windowsNote(periods, locale),
    `Compared: ${noun.plural} with at least one ${rowsNoun.singular} both before and after the launch. They were ${noun.plural} throughout, so their months without a ${rowsNoun.singular} count as 0; ${noun.plural} seen on one side only may not have existed on the other, so they are left out rather than counted as 0.`,
    isSelfSelected(group)
      ? `${capitalise(inText(m))} chose to join: ${noun.plural} who did may differ from those who did not in ways that also move the figures, so this is not an experiment and the gap is not the effect of ${group.label} alone.`
      : `${capitalise(inText(m))} were not picked at random: they may differ from ${inText(o)} in ways that also move the figures, so this is not an experiment and the gap is not the effect of ${group.label} alone.`,
  ];
  const count = (n: number) => countText(n, locale);
  const who = (n: number, label: string) => `${count(n)} ${inText(label)}`;
  const leftParts: string[] = [];
  const entered = [mg.enteredAfter > 0 ? who(mg.enteredAfter, m) : null, og.enteredAfter > 0 ? who(og.enteredAfter, o) : null].filter(Boolean);
  const left = [mg.leftBefore > 0 ? who(mg.leftBefore, m) : null, og.leftBefore > 0 ? who(og.leftBefore, o) : null].filter(Boolean);
  if (entered.length) leftParts.push(`${entered.join(' and ')} first seen after the launch`);
  if (left.length) leftParts.push(`${left.join(' and ')} seen only before it`);
  const leftOut = leftParts.length ? ` Left out as having joined or left within the windows: ${leftParts.join('; ')}.` : '';
  const move = (g: typeof mg, label: string) =>
    g.before !== null && g.after !== null ? `${count(g.panel)} ${inText(label)} went from ${value(g.before)} to ${value(g.after)} ${inText(metric.label)} a month each` : null;

  if (mg.suppressed || og.suppressed) {
    const title = `${label}: too few ${noun.plural} to compare before and after the launch`;
    const caption = `Over ${span}, too few ${noun.plural} of ${mg.suppressed ? inText(m) : inText(o)} booked on both sides to show (below the minimum group size).${leftOut}`;
    return { title, caption, notes, takeaway: null, clear: false };
  }
  if (mg.panel === 0 || og.panel === 0) {
    const none = mg.panel === 0 ? m : o;
    const seen = mg.panel === 0 ? mg.enteredAfter : og.enteredAfter;
    const title = `${label}: no ${inText(none)} to follow across the launch`;
    const other = mg.panel === 0 ? move(og, o) : move(mg, m);
    const caption =
      `None of the ${count(seen + (mg.panel === 0 ? mg.leftBefore : og.leftBefore))} ${inText(none)} had a ${rowsNoun.singular} both in ${before} and in ${after}${seen > 0 ? `: ${count(seen)} first appear after the launch` : ''}, so the same ${noun.plural} cannot be followed from before to after (no difference in differences).` +
      (other ? ` For comparison, ${other} (${before} against ${after}).` : '') +
      leftOut;
    return { title, caption, notes, takeaway: `${title}.`, clear: false };
  }
  if (did.estimate === null) {
    return { title: `${label} before and after the launch`, caption: `There is no difference in differences to state over ${span}.${leftOut}`, notes, takeaway: null, clear: false };
  }
  const ci = did.relativeCi;
  const clear = ci !== null ? ci[0] > 0 || ci[1] < 0 : did.ci !== null && (did.ci[0] > 0 || did.ci[1] < 0);
  const chance = clear ? 'the difference is unlikely to be chance' : 'a difference this size could be chance';
  const dir = did.estimate > 0 ? 'more' : did.estimate < 0 ? 'less' : 'the same';
  const rel = did.relative !== null ? pct(did.relative) : null;
  const title =
    rel !== null
      ? `${label}: ${inText(m)} ${rel} against the change among ${inText(o)} since the launch`
      : `${label}: ${inText(m)} ${dir} against the change among ${inText(o)} since the launch`;
  const interval = ci ? `; ${Math.round(did.confidence * 100)}% interval ${pct(ci[0])} to ${pct(ci[1])}` : did.ci ? `; ${Math.round(did.confidence * 100)}% interval ${formatValue(did.ci[0], fmt, { signed: true })} to ${formatValue(did.ci[1], fmt, { signed: true })} a month` : '';
  const caption =
    `The same ${noun.plural} over ${span}: ${move(mg, m)}, and ${move(og, o)}. ` +
    `Set against the change among ${inText(o)}, ${inText(m)} ${dir === 'the same' ? 'moved the same' : `moved ${formatValue(Math.abs(did.estimate), fmt)} ${inText(metric.label)} a month ${did.estimate > 0 ? 'higher' : 'lower'}`}` +
    `${rel !== null ? `: ${rel} on what their own before plus the others' change would give` : ''} (difference in differences${interval}, bootstrap over ${noun.plural}); ${chance}.` +
    leftOut;
  return { title, caption, notes, takeaway: `${title}; ${chance}.`, clear };
}
