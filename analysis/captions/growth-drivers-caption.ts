// Title and caption for a growth_drivers answer: the total's change between the two spans and the
// segments that moved it most, written only from the finding.
import { changeBasisOf, isAdditive, metricDirection } from '../catalog.js';
import { labelAtStart, listJoin, pluralNoun, verbFor } from './grammar.js';
import { configuredAs, perDayMetric } from './metric-words.js';
import type { DatasetConfig, Metric } from '../../config/schema.js';
import type { ChangedSegment, GrowthDriverSegment, GrowthDriversFinding, GrowthRateRanking, PerDayTotals } from '../findings/growth.js';
import { CLEAR_LEAD } from '../findings/segments.js';
import { SMALL_BASE_SHARE } from '../templates/growth-rate-rank.js';
import { formatChange, formatDayOfYear, formatGrowth, formatPeriod, formatValue } from '../format.js';
import { quantityFormat } from './performance-words.js';
import type { Audience } from '../types.js';
import { verdictDirection, type GrowthWords } from './growth-series-caption.js';
import type { Verdict } from './verdict-words.js';
import { addDays, addMonths, daysBetween } from '../periods.js';
import { capitalise, dimensionLabel, directionOf, formatPoints, lower, segmentText, spanText, unsignedPercent, valueText } from './growth-words.js';

/** What a comparison of two spans states of its total: the spans and the total over each. */
export type SpansTotals = Pick<GrowthDriversFinding, 'current' | 'prior' | 'total' | 'additive' | 'perDay'>;

/** Segments named in a caption, largest change first. */
const NAMED_IN_CAPTION = 3;

export function growthDriversWords(asked: Metric, f: GrowthDriversFinding | undefined, dataset: DatasetConfig, locale: string, audience: Audience): GrowthWords {
  // Asked per day: every figure is a daily average, said as "Flights per day".
  const metric = f?.perDay ? perDayMetric(asked) : asked;
  const label = labelAtStart(metric.label);
  if (!f) {
    return {
      title: `${label}: no data to compare by segment`,
      caption: `There is no ${lower(label)} in either span to compare.`,
    };
  }
  const name = (s: GrowthDriverSegment) => segmentText(s.segment, f.dimension, dataset);
  const money = (v: number | null, signed = false) => valueText(v, metric, locale, signed);
  const spans = `${spanText(f.current, locale)} against ${spanText(f.prior, locale)}`;
  const top = f.segments.find((s) => s.change !== null && s.change !== 0);
  const dim = lower(dimensionLabel(f.dimension, dataset));

  // A rate or share moves in points: "rose 1.2 pts: 4.4% to 5.6%", never "rose 28.5%" of itself.
  const points = metric.unit === 'percent';
  // A segment's own change: its rate for a sum or a ratio, its points for a rate or share.
  const own = (s: GrowthDriverSegment) => (points ? s.change : s.relative);
  // Where no percentage is given (a base at or below zero), the change in the metric's unit.
  const ownText = (s: GrowthDriverSegment) => (points || s.relative === null ? money(s.change, true) : formatGrowth(s.relative, locale));
  // A ratio's segments do not add up to its total, so a segment can only be said to have moved most,
  // not to have driven it; and "most" is its own change (a €70 basket's +€4.20 is +6%, like the others').
  const mover = f.additive ? top : largestOwnChange(f.segments, own);
  const driverTitle = f.byRate
    ? rateTitle(f, f.byRate, (s) => own(s) ?? 0, name, ownText, label, dim)
    : !top || !mover
      ? `No ${dim} changed ${lower(label)}`
      : f.additive
        ? `${capitalise(name(top))} drove the biggest change in ${lower(label)}: ${money(top.change, true)}`
        : `${label} moved most for ${name(mover)}: ${ownText(mover)}${points || mover.relative === null ? '' : ` (${money(mover.change, true)})`}`;
  // When segments came or went, the headline states both growth figures if they differ as printed.
  const lfl = f.likeForLike;
  const bothFigures =
    lfl && lfl.relative !== null && f.total.relative !== null && formatChange(lfl.relative, locale) !== formatChange(f.total.relative, locale)
      ? `${lower(label)} ${formatChange(lfl.relative, locale)} like for like against ${formatChange(f.total.relative, locale)} overall`
      : null;
  const title = bothFigures ? `${driverTitle}; ${bothFigures}` : driverTitle;

  const total = f.total;
  // In units where no percentage applies: a rate (points), a temperature or a value at or below zero
  // (the template leaves the relative change out: catalog.ts metricPercentScale).
  const totalMove =
    (points || total.relative === null) && total.change !== null && total.before !== null && total.after !== null
      ? `${label} ${total.change === 0 ? 'held flat' : `${total.change > 0 ? 'rose' : 'fell'} ${money(Math.abs(total.change), true).replace(/^\+/, '')}`}: ${money(total.before)} to ${money(total.after)}`
      : total.relative !== null && Number.isFinite(total.relative)
        ? `${label} ${totalVerb(total.relative, locale)}: ${money(total.before)} to ${money(total.after)} (${directionOf(total.relative) === 'flat' ? `${formatChange(total.relative, locale)}, ` : ''}${money(total.change, true)})`
        : `${label} went from ${money(total.before)} to ${money(total.after)}`;
  const named = f.segments.filter((s) => s.change !== null).slice(0, NAMED_IN_CAPTION);
  const sentences = [`${totalMove}, ${spans}.`];
  const perDay = perDaySentence(f, label, asked, locale);
  if (perDay) sentences.push(perDay);
  if (lfl) sentences.push(likeForLikeSentence(lfl, label, (s) => segmentText(s.segment, f.dimension, dataset), money, locale));
  if (f.byRate) sentences.push(...rateSentences(f, f.byRate, name, ownText, (v) => money(v, true), locale, dim, label));

  if (f.byRate) {
    // The rate ranking above already names each segment with its change.
  } else if (audience === 'leadership') {
    if (named.length > 0) sentences.push(`Biggest moves: ${named.map((s) => `${name(s)} ${money(s.change, true)}`).join(', ')}.`);
  } else {
    // "55% of the total change" reads as a part of a whole only when the named moves all went the
    // total's way and none exceeds it; where moves offset, the rises and falls are said instead.
    const offsetting = f.additive && named.some((s) => s.shareOfChange === null || s.shareOfChange <= 0 || s.shareOfChange > 1);
    const detail = named.map((s) => {
      const parts = [money(s.change, true)];
      // A segment not there through both spans has no like-for-like rate: its percentage
      // (+1,210% for a channel that opened part-way through the base) would read as growth.
      const changed = lfl?.excluded.find((c) => c.segment === s.segment);
      if (changed) return `${name(s)} ${parts[0]} (${notThroughBoth(changed, f, locale)})`;
      if (s.relative !== null && !points) parts.push(formatGrowth(s.relative, locale));
      if (audience === 'analysts' && s.contribution !== null) parts.push(`${formatPoints(s.contribution, locale)} of the total's ${formatChange(total.relative, locale)}`);
      else if (audience === 'managers' && !offsetting && s.shareOfChange !== null) {
        parts.push(`${unsignedPercent(s.shareOfChange, locale)} of the total change`);
      }
      return `${name(s)} ${parts.join(', ')}`;
    });
    if (detail.length > 0) sentences.push(`Largest changes by ${dim}: ${detail.join('; ')}.`);
    const offset = offsetting ? offsetSentence(f, money) : null;
    if (offset) sentences.push(offset);
  }
  if (!f.byRate && audience !== 'leadership') {
    if (f.others && f.others.change !== null) {
      sentences.push(f.others.count === 1 ? `The one other: ${money(f.others.change, true)}.` : `The other ${f.others.count} together: ${money(f.others.change, true)}.`);
    }
    if (!f.additive) {
      // Said as the config's choice: the same quantity set up as a sum would add up.
      const set = configuredAs(metric, dataset);
      sentences.push(`${label} is set up in the config as ${set.as}, so segment changes do not add up to the total's; each segment's own change is shown${set.change ? ` (${set.change} would add up)` : ''}.`);
    } else if (audience === 'analysts') {
      sentences.push(`Contribution = segment change / total before, in points of the total's growth rate; the segments' contributions sum to the total's.`);
    }
  }
  return { title, caption: sentences.join(' ') };
}

/** "Moves offset each other: the rises add up to +€1.3K and the falls to −€4.21K." */
function offsetSentence(f: GrowthDriversFinding, money: (v: number | null, signed?: boolean) => string): string | null {
  if (!f.offset) return null;
  return `Moves offset each other: the rises add up to ${money(f.offset.rises, true)} and the falls to ${money(f.offset.falls, true)}.`;
}

export function totalVerb(relative: number, locale: string): string {
  switch (directionOf(relative)) {
    case 'up':
      return `rose ${unsignedPercent(relative, locale)}`;
    case 'down':
      return `fell ${unsignedPercent(relative, locale)}`;
    default:
      return 'held flat';
  }
}

/**
 * Why a segment has no like-for-like rate: "opened in September 2022, part-way through 2022, so
 * it has no like-for-like rate", "new in March 2024: not in the base, 2023".
 */
function notThroughBoth(s: ChangedSegment, f: GrowthDriversFinding, locale: string): string {
  const month = (iso: string | null) => (iso === null ? '' : formatPeriod(iso, 'month', locale, 'long'));
  const rate = 'so it has no like-for-like rate';
  if (s.opened && s.firstDay !== null && s.firstDay >= f.current.start) return `new in ${month(s.firstDay)}: not in the base, ${spanText(f.prior, locale)}`;
  if (s.closed && s.lastDay !== null && s.lastDay < f.current.start) return `last there in ${month(s.lastDay)}: gone before ${spanText(f.current, locale)}`;
  if (s.opened && !s.closed) return `opened in ${month(s.firstDay)}, part-way through ${spanText(f.prior, locale)}, ${rate}`;
  if (s.closed && !s.opened) return `last there in ${month(s.lastDay)}, part-way through ${spanText(f.current, locale)}, ${rate}`;
  return `there only from ${month(s.firstDay)} to ${month(s.lastDay)}, ${rate}`;
}

/** "Like for like, leaving out what was not there through both spans (kiosk, opened on 1 June 2023), revenue fell 2.1%: €2.19M to €2.14M." */
function likeForLikeSentence(
  lfl: NonNullable<GrowthDriversFinding['likeForLike']>,
  label: string,
  name: (s: ChangedSegment) => string,
  money: (v: number | null) => string,
  locale: string,
): string {
  const day = (iso: string | null) => (iso === null ? '' : formatPeriod(iso, 'day', locale, 'long'));
  const why = (s: ChangedSegment) =>
    s.opened && s.closed
      ? `${name(s)}, there only from ${day(s.firstDay)} to ${day(s.lastDay)}`
      : s.opened
        ? `${name(s)}, opened on ${day(s.firstDay)}`
        : `${name(s)}, last there on ${day(s.lastDay)}`;
  const shown = lfl.excluded.slice(0, NAMED_IN_CAPTION).map(why);
  const more = lfl.excluded.length - shown.length;
  const left = `${shown.join('; ')}${more > 0 ? `; and ${more} more` : ''}`;
  if (lfl.relative === null || lfl.before === null || lfl.after === null) {
    return `Like-for-like growth leaves out what was not there through both spans (${left}); without it there is no like-for-like figure here.`;
  }
  return `Like for like, leaving out what was not there through both spans (${left}), ${lower(label)} ${totalVerb(lfl.relative, locale)}: ${money(lfl.before)} to ${money(lfl.after)}.`;
}

/**
 * The verdict on a comparison the request named ("2025 against 2023", "this summer against last"):
 * the total's change between the two spans, against the base said as the requester would.
 */
export function spansVerdict(metric: Metric, f: SpansTotals, locale: string): Verdict | null {
  const rel = f.total.relative;
  if (rel === null || !Number.isFinite(rel)) return null;
  const { current, prior } = f;
  const direction = verdictDirection(rel);
  const label = lower(metric.label);
  const days = (s: typeof current) => `${formatDayOfYear(s.start, locale)} to ${formatDayOfYear(addDays(s.end, -1), locale)}`;
  const wholeYears = (s: typeof current) => s.start.slice(5) === '01-01' && s.end.slice(5) === '01-01';
  const shiftedYears = Number(current.start.slice(0, 4)) - Number(prior.start.slice(0, 4));
  const sameDates = shiftedYears > 0 && addMonths(current.start, -12 * shiftedYears) === prior.start && addMonths(current.end, -12 * shiftedYears) === prior.end;
  const values = `${valueText(f.total.after, metric, locale)} against ${valueText(f.total.before, metric, locale)}`;
  let base: string;
  if (sameDates && shiftedYears === 1 && current.start.slice(5) === '01-01' && !wholeYears(current)) {
    // The year so far, said as the year-so-far verdict of growth_series says it.
    base = `last year so far (${formatDayOfYear(current.start, locale, 'month')} to ${formatDayOfYear(addDays(current.end, -1), locale)})`;
  } else if (sameDates && wholeYears(current)) {
    base = `${spanText(prior, locale)} (${values})`;
  } else if (sameDates) {
    base = `${shiftedYears === 1 ? 'the same dates a year earlier' : `the same dates of ${prior.start.slice(0, 4)}`} (${days(current)}; ${values})`;
  } else {
    base = `${spanText(prior, locale)} (${spanText(current, locale)}; ${values})`;
  }
  // A rate or share is above or below by points, not by a percentage of itself.
  const by = metric.unit === 'percent' && f.total.change !== null ? valueText(Math.abs(f.total.change), metric, locale, true).replace(/^\+/, '') : unsignedPercent(rel, locale);
  const where = direction === 'level' ? `level with ${base.replace(/ \(/, ` (${formatChange(rel, locale)}, `)}` : `${by} ${direction === 'up' ? 'above' : 'below'} ${base}`;
  const statement = wholeYears(current) ? `${label} in ${spanText(current, locale)} ${verbFor(label, 'was')} ${where}` : `${label} ${verbFor(label)} ${where}`;
  const other = otherBasisClause(f, metric, locale);
  return { direction, higherIsBetter: metricDirection(metric), statement: other ? `${statement}; ${other}` : statement };
}

/**
 * When the two spans differ in days and the change per day goes the other way from the change in
 * total (or the reverse, for a comparison asked per day), the verdict says so: a bare "No" on
 * June's total against January's would hide that June, a day shorter, was busier per day.
 */
function otherBasisClause(f: SpansTotals, metric: Metric, locale: string): string | null {
  const rel = f.total.relative;
  if (rel === null || !Number.isFinite(rel)) return null;
  if (f.perDay) {
    const { totals, days } = f.perDay;
    if (totals.relative === null || !Number.isFinite(totals.relative) || directionOf(totals.relative) === directionOf(rel)) return null;
    return `in total, though, it ${totalVerb(totals.relative, locale)} (${days.after} days against ${days.before})`;
  }
  const [dc, dp] = [daysBetween(f.current.start, f.current.end), daysBetween(f.prior.start, f.prior.end)];
  const { before, after } = f.total;
  if (dc === dp || dc <= 0 || dp <= 0 || !isAdditive(metric) || !f.additive || before === null || after === null || before <= 0) return null;
  const perDay = after / dc / (before / dp) - 1;
  if (directionOf(perDay) === directionOf(rel)) return null;
  return `per day, though, it ${totalVerb(perDay, locale)} (${dc} days against ${dp})`;
}

/**
 * Totals of two spans that differ in length ("March against February": 31 days against 29; Q1 of a
 * leap year has 91) differ by the days alone, so the days are said, and a total that adds up over
 * days is also said per day, from which each figure can be worked out. Null for spans of one length.
 */
export function perDaySentence(f: SpansTotals, label: string, metric: Metric, locale: string): string | null {
  if (f.perDay) return perDayTotalsSentence(f, f.perDay, metric, locale);
  const [dc, dp] = [daysBetween(f.current.start, f.current.end), daysBetween(f.prior.start, f.prior.end)];
  const { before, after } = f.total;
  // Only a total that adds up over days differs by the days: a level or a ratio is compared as it is.
  if (dc === dp || dc <= 0 || dp <= 0 || !isAdditive(metric)) return null;
  const lengths = `${capitalise(spanText(f.current, locale))} has ${dc} days and ${spanText(f.prior, locale)} ${dp}`;
  // A leap day in a year (0.3%) changes no total worth a per-day figure, but the lengths are still said; a month against another (up to 10%) is given per day.
  if (!f.additive || Math.abs(dc - dp) <= 0.005 * Math.max(dc, dp) || before === null || after === null || before <= 0) return `${lengths}; both are compared whole.`;
  const [a, b] = [after / dc, before / dp];
  const fmt = quantityFormat(metric, 'per_day', locale);
  // The one rule (catalog.ts changeBasisOf): a per-day total that goes below zero moves in its units.
  const move = changeBasisOf(metric, [a, b]) === 'percent' ? totalVerb(a / b - 1, locale) : `changed ${formatValue(a - b, fmt, { rate: true, signed: true })} a day`;
  return `${lengths}, so per day ${lower(label)} ${move} (${formatValue(a, fmt, { rate: true })} against ${formatValue(b, fmt, { rate: true })} a day).`;
}

/**
 * A comparison asked per day (its figures are daily averages): what each figure is, the days of
 * each span, and the totals beside when they tell another story (June's 30 days against January's
 * 31 can turn a rise per day into a fall in total). `metric` is the metric itself, not its per-day view.
 */
function perDayTotalsSentence(f: SpansTotals, perDay: PerDayTotals, metric: Metric, locale: string): string {
  const { days, totals } = perDay;
  const lengths = days.after === days.before
    ? `both have ${days.after} days`
    : `${spanText(f.current, locale)} has ${days.after} days and ${spanText(f.prior, locale)} ${days.before}`;
  const what = `Each figure is the period's total divided by its days (the days the data covers): ${lengths}.`;
  const [perDayRel, totalRel] = [f.total.relative, totals.relative];
  if (perDayRel === null || totalRel === null || !Number.isFinite(perDayRel) || !Number.isFinite(totalRel)) return what;
  if (directionOf(perDayRel) === directionOf(totalRel)) return what;
  const money = (v: number | null) => valueText(v, metric, locale);
  return `${what} In totals the story differs: ${lower(labelAtStart(metric.label))} ${totalVerb(totalRel, locale)} (${money(totals.before)} to ${money(totals.after)}), ${spanText(f.current, locale)} having ${Math.abs(days.after - days.before)} ${Math.abs(days.after - days.before) === 1 ? 'day' : 'days'} ${days.after < days.before ? 'fewer' : 'more'}.`;
}

/** The segment with the largest own change (rate, or points for a rate), ties by the finding's order. */
function largestOwnChange(segments: readonly GrowthDriverSegment[], own: (s: GrowthDriverSegment) => number | null): GrowthDriverSegment | undefined {
  let best: GrowthDriverSegment | undefined;
  for (const s of segments) {
    const v = own(s);
    if (v === null || v === 0 || !Number.isFinite(v)) continue;
    if (!best || Math.abs(v) > Math.abs(own(best)!)) best = s;
  }
  // No own change to compare (no percentage anywhere): the finding's order, by weighted change.
  return best ?? segments.find((s) => s.change !== null && s.change !== 0);
}

/** The ranked segments by name, in the ranking's order. */
function rankedSegments(f: GrowthDriversFinding, r: GrowthRateRanking): GrowthDriverSegment[] {
  return r.segments.map((seg) => f.segments.find((s) => s.segment === seg)).filter((s): s is GrowthDriverSegment => s !== undefined);
}

/**
 * "Catering grew fastest in orders: +17.1%", "Catering and app grew fastest in orders, at about the
 * same rate: +17.1% and +16.1%", "Kiosk fell fastest in revenue: −8.0%", "Take-off run grew fastest
 * in strikes: +15.6% (taxi +500% on a small base)".
 */
function rateTitle(f: GrowthDriversFinding, r: GrowthRateRanking, points: (s: GrowthDriverSegment) => number, name: (s: GrowthDriverSegment) => string, ownText: (s: GrowthDriverSegment) => string, label: string, dim: string): string {
  const ranked = rankedSegments(f, r);
  const leaders = ranked.filter((s) => r.leaders.includes(s.segment));
  const first = leaders[0];
  if (!first) return `No ${dim} has a growth rate of ${lower(label)} to rank`;
  const ahead = ranked.filter((s) => r.aheadOnSmallBase.includes(s.segment));
  const aside = ahead.length > 0 ? ` (${listJoin(ahead.slice(0, 2).map((s) => `${name(s)} ${ownText(s)}`))}${ahead.length > 2 ? ` and ${ahead.length - 2} more` : ''} on a small base)` : '';
  if (leaders.length > 1) {
    // Every segment of some size within the noise of the first: none stands out, the range is said.
    if (!r.standsOut) {
      const [low, high] = r.order === 'fastest' ? [leaders[leaders.length - 1]!, first] : [first, leaders[leaders.length - 1]!];
      return `No ${dim} stands out in ${lower(label)} growth: ${ownText(low)} to ${ownText(high)}, within the noise${aside}`;
    }
    // Some lead together: they are the answer, named as such.
    const fell = leaders.every((s) => points(s) < 0);
    const lead = r.order === 'fastest' ? (fell ? 'fell least' : 'grew fastest') : fell ? 'fell fastest' : 'grew slowest';
    return `${capitalise(listJoin(leaders.map(name)))} ${lead} in ${lower(label)}, at about the same rate: ${listJoin(leaders.map(ownText))}${aside}`;
  }
  const rel = points(first);
  const verb = r.order === 'fastest' ? (rel > 0 ? 'grew fastest' : 'fell least') : rel < 0 ? 'fell fastest' : 'grew slowest';
  return `${capitalise(name(first))} ${verb} in ${lower(label)}: ${ownText(first)}${aside}`;
}

/**
 * "Growth rate by channel, 2025 against 2024: catering +17.1% (+6.84K; a small base, 4.2% of
 * orders in 2024); app +16.1% (+38.4K); counter +15.3% (+103K)." and how "about the same" was judged.
 */
function rateSentences(
  f: GrowthDriversFinding,
  r: GrowthRateRanking,
  name: (s: GrowthDriverSegment) => string,
  ownText: (s: GrowthDriverSegment) => string,
  signed: (v: number | null) => string,
  locale: string,
  dim: string,
  label: string,
): string[] {
  const ranked = rankedSegments(f, r);
  if (ranked.length === 0) return [];
  const small = (s: GrowthDriverSegment) =>
    s.baseShare !== undefined && s.baseShare !== null && s.baseShare < SMALL_BASE_SHARE
      ? `; a small base, ${unsignedPercent(s.baseShare, locale)} of ${f.additive ? lower(label) : 'the rows'} in ${spanText(f.prior, locale)}, so its rate swings on little`
      : '';
  const listed = ranked.slice(0, NAMED_IN_CAPTION + 2).map((s) => `${name(s)} ${ownText(s)} (${signed(s.change)}${small(s)})`);
  const more = r.segments.length - listed.length;
  const out = [`Growth rate by ${dim}, ${spanText(f.current, locale)} against ${spanText(f.prior, locale)}, ${r.order === 'fastest' ? 'fastest' : 'slowest'} first: ${listed.join('; ')}${more > 0 ? `; and ${more} more` : ''}.`];
  if (r.leaders.length > 1) {
    const who = capitalise(listJoin(ranked.filter((s) => r.leaders.includes(s.segment)).map(name)));
    out.push(
      r.noise === 'poisson'
        ? `${who} differ by less than counting noise (two standard errors of a Poisson count), so none of them can be named ${r.order} on this data.`
        : `${who} differ by under ${formatPoints(CLEAR_LEAD, locale).replace(/^\+/, '')} a year (common practice for what a year's noise can move), so none of them can be named ${r.order} on this data.`,
    );
  }
  // Who added most is a different question ("what drove it"), said beside the rates.
  const biggest = f.additive ? [...ranked].sort((a, b) => Math.abs(b.change ?? 0) - Math.abs(a.change ?? 0))[0] : undefined;
  if (biggest && biggest !== ranked[0] && biggest.change !== null) out.push(`By size of change, ${name(biggest)} moved ${lower(label)} most: ${signed(biggest.change)}.`);
  return out;
}
