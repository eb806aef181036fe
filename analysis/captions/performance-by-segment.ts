// Title and caption of a members-vs-others comparison within each segment (performance_by_segment).
import type { Dimension } from '../../config/schema.js';
import type { PerformanceSegmentFinding, SegmentPick } from '../findings/performance.js';
import { formatValue } from '../format.js';
import type { Finding } from '../types.js';
import { pluralNoun } from './grammar.js';
import { capitalise, type PerformanceWords } from './performance-compare.js';
import { sampleNoun, chancePhrase, countText, findAll, findOne, groupLabel, inText, periodLead, quantityLabel, type WordsContext, isAre } from './performance-words.js';

/** "Route" → "routes", "Fare class" → "fare classes", "Category" → "categories". */
export function pluralLabel(label: string): string {
  return pluralNoun(inText(label));
}

export function segmentName(f: PerformanceSegmentFinding): string {
  if (f.folded) return `All others (${f.segmentCount})`;
  return f.segment ?? 'Not recorded';
}

export function bySegmentWords(findings: readonly Finding[], ctx: WordsContext, dim: Dimension): PerformanceWords {
  const { metric, group, locale, audience, dataset } = ctx;
  const members = findOne(findings, 'performance_group', (f) => f.group === 'members');
  const quantity = members?.quantity ?? 'metric';
  const label = quantityLabel(metric, quantity, dataset, members?.unit);
  // What a segment's n counts: sites for a count per site, days for one per day, else rows.
  const sampled = quantity === 'metric' || quantity === 'per_row' ? 'rows' : sampleNoun(dataset, quantity, members?.unit).plural;
  const m = groupLabel(group, 'members');
  const o = groupLabel(group, 'others');
  const plural = pluralLabel(dim.label);
  const segments = findAll(findings, 'performance_segment');
  const consistency = findOne(findings, 'performance_consistency');
  const overall = findOne(findings, 'performance_difference', (f) => f.comparison === 'members_vs_others');
  const verdict = findOne(findings, 'performance_verdict', (f) => f.comparison === 'members_vs_others');
  const win = findOne(findings, 'performance_window');
  const lead = win ? periodLead(win, ctx) : 'In the period asked for';
  const pct = (x: number) => formatValue(Math.abs(x), { unit: 'percent', decimals: Math.abs(x) < 0.1 ? 1 : 0, locale });
  const signed = (x: number) => formatValue(x, { unit: 'percent', decimals: 1, locale }, { signed: true });
  const compared = segments.filter((s) => s.relative !== null);

  if (!consistency || consistency.segments === 0 || consistency.overallDirection === 'equal' || compared.length === 0) {
    const title = `${label}: no ${inText(dim.label)} has both ${inText(m)} and ${inText(o)} to compare`;
    const text =
      segments.length === 0
        ? `There is no data to compare by ${inText(dim.label)} in this period.`
        : `No ${inText(dim.label)} has ${inText(m)} and ${inText(o)} with a difference to compare in this period.`;
    return { title, caption: text, notes: [], takeaway: null, clear: false };
  }

  const dir = consistency.overallDirection;
  const total = consistency.segments;
  const same = consistency.sameDirection;
  const where = same === total ? (total === 1 ? `the only ${inText(dim.label)} compared, ${segmentName(compared[0]!)}` : total === 2 ? `both ${plural}` : `all ${total} ${plural}`) : `${same} of ${total} ${plural}`;
  const title =
    same === total || same / total >= 0.75
      ? `${label} ${isAre(label)} ${dir} for ${inText(m)} on ${where}`
      : `${label}: ${inText(m)} ${dir} on ${same} of ${total} ${plural}, ${consistency.oppositeDirection} the other way`;
  const rels = compared.map((s) => s.relative!).filter((r) => Math.sign(r) === (dir === 'higher' ? 1 : -1));
  const range = rels.length >= 2 ? `, by ${pct(Math.min(...rels.map(Math.abs)))} to ${pct(Math.max(...rels.map(Math.abs)))}` : '';
  const chance = overall && verdict ? chancePhrase(overall.pValue, verdict.alpha) : 'there is no test of the overall gap';
  const evidence = total === 1
    ? `with one ${inText(dim.label)} there is no mix of ${plural} to judge`
    : same === total && total >= 2
      ? `the same direction in every ${inText(dim.label)} suggests the gap is not just a different mix of ${plural}`
      : consistency.oppositeDirection > 0
        ? `${consistency.oppositeDirection} ${consistency.oppositeDirection === 1 ? inText(dim.label) : plural} ${consistency.oppositeDirection === 1 ? 'goes' : 'go'} the other way, so the overall gap may partly reflect the mix of ${plural}`
        : `some ${plural} show no difference`;
  const small = segments.filter((s) => s.small);
  const smallText = small.length > 0 ? ` ${small.length === 1 ? `${segmentName(small[0]!)} is` : `${small.length} ${plural} are`} small (fewer than 30 ${sampled} in a group${small.length === 1 ? '' : ' each'}), so read ${small.length === 1 ? 'it' : 'them'} with care.` : '';
  let caption: string;
  if (audience === 'leadership') {
    caption = `${lead}, ${inText(label)} ${isAre(label)} ${dir} for ${inText(m)} than for ${inText(o)} on ${where}${range}. Overall ${chance}, and ${evidence}. This is an observational comparison, not proof of cause.`;
  } else if (audience === 'managers') {
    const list = compared
      .slice(0, 8)
      .map((s) => `${segmentName(s)} ${signed(s.relative!)}`)
      .join('; ');
    caption = `${lead}, ${inText(label)} for ${inText(m)} against ${inText(o)} by ${inText(dim.label)}: ${list}. ${capitalise(chance)} overall, and ${evidence}.${smallText}`;
  } else {
    const sig = `${consistency.significantSame} of ${total} ${plural} differ in the overall direction at the 5% level and ${consistency.significantOpposite} in the opposite direction (one test per ${inText(dim.label)}, no adjustment for multiple comparisons)`;
    const list = compared
      .slice(0, 8)
      .map((s) => `${segmentName(s)} ${signed(s.relative!)}${s.pValue !== null && s.pValue < 0.05 ? '' : ' (n.s.)'} (n = ${countText(s.nMembers, locale)} vs ${countText(s.nOthers, locale)})`)
      .join('; ');
    caption = `Relative difference of ${inText(label)}, ${inText(m)} vs ${inText(o)}, by ${inText(dim.label)}: ${list}. ${capitalise(sig)}.${smallText}`;
  }
  const rule = pickSentence(consistency.pick, metric.label, dim.label, locale);
  return { title, caption: rule ? `${caption} ${rule}` : caption, notes: [], takeaway: `${title}${range}.`, clear: same === total && verdict?.verdict !== 'no_clear_difference' };
}

/**
 * Which segments are shown and why, when that is not simply all of them: "Routes shown: the 3
 * with the most revenue over both groups; the other 2 are combined as "All others"."
 */
export function pickSentence(pick: SegmentPick | undefined, metricLabel: string, dimLabel: string, locale: string): string | null {
  if (!pick) return null;
  const plural = capitalise(pluralLabel(dimLabel));
  const rest = pick.folded > 0 ? `; the other ${countText(pick.folded, locale)} ${pick.folded === 1 ? 'is' : 'are'} combined as "All others"` : '';
  if (pick.rule === 'named') return `${plural} shown: the ${pick.shown === 1 ? 'one' : countText(pick.shown, locale)} named in the request${rest}.`;
  if (pick.folded === 0) return null;
  const what = inText(metricLabel);
  const by = pick.order === 'largest' ? `the most ${what}` : `the ${pick.order} ${what}`;
  const floor = pick.floorRows !== null ? ` (among ${pluralLabel(dimLabel)} with at least ${countText(pick.floorRows, locale)} rows)` : '';
  return `${plural} shown: the ${countText(pick.shown, locale)} with ${by} over both groups${floor}${rest}.`;
}
