// Titles and captions for segment trends and segment shares, written only from findings.
import type { DatasetConfig, Dimension, Metric } from '../../config/schema.js';
import { addsAcrossSegments } from '../catalog.js';
import { CLEAR_LEAD, type SegmentGrowthMeasure, type SegmentRanking, type SegmentSharesFinding, type SegmentShareRow, type SegmentTrendFinding, type SegmentTrendOverviewFinding, type ShareFocusFinding } from '../findings/segments.js';
import { formatChange, formatPeriod, formatPointChange, formatValue, valueFormatOf, type ValueFormat } from '../format.js';
import type { Audience, Finding } from '../types.js';
import { countOf, inSentence, isPluralLabel, labelAtStart, pluralNoun, withArticle } from './grammar.js';
import { configuredAs } from './metric-words.js';
import type { Words } from './trend-test-caption.js';
import { capitalise, countWord, dimensionPlural, formatRelativeSize, formatShare, segmentLabel } from './trend-words.js';

type Dim = Pick<Dimension, 'label'>;

/**
 * "+4.1% a year from 2022 to 2024", without two full years the trend slope's yearly rate, and where
 * a percentage has no base or the span is under a year, the slope in units ("+0.3 min a week (trend)").
 */
export function segmentGrowthText(t: SegmentTrendFinding, locale: string, withYears = true, measure?: SegmentGrowthMeasure, fmt?: ValueFormat): string | null {
  if (measure === 'units') {
    if (t.slopePerPeriod === null || !fmt) return null;
    // A rate's slope is a move in points ("+0.12 pts a month"), never a percentage of itself.
    const slope = fmt.unit === 'percent' ? formatPointChange(t.slopePerPeriod, locale, { signed: true, slope: true }) : formatValue(t.slopePerPeriod, fmt, { signed: true });
    return `${slope} a ${t.grain}${withYears ? ' (trend)' : ''}`;
  }
  if (t.growth?.cagr !== null && t.growth?.cagr !== undefined) {
    return `${formatChange(t.growth.cagr, locale)} a year${withYears ? ` from ${t.growth.fromYear} to ${t.growth.toYear}` : ''}`;
  }
  if (t.slopePerYearRelative !== null) return `${formatChange(t.slopePerYearRelative, locale)} a year (trend)`;
  return null;
}

/**
 * Which named segment stands out by the value shown. A sum or count ranks its segments by that
 * value, so the first is the largest; an average or a ratio ranks them by their rows (the busiest
 * are worth naming), so the words follow the value itself: highest and lowest, never "largest".
 */
/** Whether two segments' growth spans the same full years (so the second need not repeat them). */
function sameYears(a: SegmentTrendFinding, b: SegmentTrendFinding): boolean {
  return a.growth?.fromYear === b.growth?.fromYear && a.growth?.toYear === b.growth?.toYear;
}

function sizeLine(metric: Metric, named: readonly SegmentTrendFinding[], fmt: ReturnType<typeof valueFormatOf>, span: string): string {
  const valued = named.filter((t) => t.total !== null);
  if (valued.length === 0) return '';
  // The largest by value, whichever order the segments were ranked in ("lowest first" lists the smallest first).
  const largest = valued.reduce((a, b) => (b.total! > a.total! ? b : a));
  // Asked per day: the largest by its figure per day, not a total.
  if (largest.perDay) return `${segmentLabel(largest)} is the largest, at ${formatValue(largest.total, fmt, { rate: true })} a day${span}.`;
  if (addsAcrossSegments(metric)) return `${segmentLabel(largest)} is the largest, at ${formatValue(largest.total, fmt, { compact: true })}${span}.`;
  const byValue = [...valued].sort((a, b) => b.total! - a.total!);
  const top = byValue[0]!;
  const bottom = byValue[byValue.length - 1]!;
  const noun = inSentence(metric.label);
  if (byValue.length === 1) return `${segmentLabel(top)} has ${noun} of ${formatValue(top.total, fmt)}${span}.`;
  return `Of the ${byValue.length} shown, ${segmentLabel(top)} has the highest ${noun}, ${formatValue(top.total, fmt)}${span}, and ${segmentLabel(bottom)} the lowest, ${formatValue(bottom.total, fmt)}.`;
}

export function segmentTrendWords(asked: Metric, dim: Dim, findings: readonly Finding[], audience: Audience, locale: string): Words {
  const overview = findings.find((f): f is SegmentTrendOverviewFinding => f.type === 'segment_trend_overview' && f.metric === asked.name);
  const trends = findings.filter((f): f is SegmentTrendFinding => f.type === 'segment_trend' && f.metric === asked.name);
  // Asked per day: every figure is one per day, and the words name it so.
  const metric = trends.some((t) => t.perDay) ? { ...asked, label: `${asked.label} per day` } : asked;
  const plural = dimensionPlural(dim);
  const fmt = valueFormatOf(metric, locale);
  const noun = inSentence(metric.label);
  if (!overview || trends.length === 0) {
    return { title: `${labelAtStart(metric.label)} by ${inSentence(dim.label)}: no data in this period`, caption: `There are no ${noun} to break down by ${inSentence(dim.label)} in this period.` };
  }
  const named = trends.filter((t) => !t.other);
  const fastest = overview.fastest === null ? undefined : named.find((t) => t.segment === overview.fastest!.segment);
  if (!fastest || !overview.fastest) {
    const largestText = sizeLine(metric, named, fmt, '');
    return {
      title: `${labelAtStart(metric.label)} by ${inSentence(dim.label)}: too few complete periods to compare growth`,
      caption: `No ${inSentence(dim.label)} has enough complete periods for a growth rate. ${capitalise(largestText)}`.trim(),
    };
  }
  if (overview.seasonUnresolved) {
    // Over under two years a segment's slope is its seasonal swing (a shop "rising" through autumn
    // into December): no segment is named as growing, as trend_test says for the total.
    const largestLine = sizeLine(metric, named, fmt, ' over the period');
    return {
      title: `${labelAtStart(metric.label)} by ${inSentence(dim.label)}: too short a span to tell each one's trend from the season`,
      caption: `${capitalise(largestLine)} With less than two years of ${pluralNoun(fastest.grain)}, ${withArticle(inSentence(dim.label))}'s rise or fall cannot be told apart from the usual seasonal pattern, so none is named as growing fastest; growth on the same ${pluralNoun(fastest.grain)} of the year before compares them without the season.`.trim(),
    };
  }
  const measure = overview.fastest.measure;
  const rate = (t: SegmentTrendFinding) => (measure === 'cagr' ? t.growth?.cagr ?? null : measure === 'slope' ? t.slopePerYearRelative : t.slopePerPeriod);
  const growthText = (t: SegmentTrendFinding, withYears = true) => segmentGrowthText(t, locale, withYears, measure, fmt);
  const slowest = named.reduce<SegmentTrendFinding | null>((lo, t) => (rate(t) !== null && (lo === null || rate(t)! < rate(lo)!) ? t : lo), null);
  const growth = growthText(fastest)!;
  // A lead under CLEAR_LEAD (or one the rounding hides) names no single winner: both are said.
  const runner = overview.runnerUp ? named.find((t) => t.segment === overview.runnerUp!.segment) : undefined;
  const tied =
    runner && overview.runnerUp && ((measure !== 'units' && overview.fastest.value - overview.runnerUp.value < CLEAR_LEAD) || growthText(runner, false) === growthText(fastest, false))
      ? runner
      : undefined;
  // A change in units is a rise or a fall of the value, not growth of a size.
  const units = measure === 'units';
  const fastestVerb = overview.fastest.value > 0 ? (units ? 'rose most' : 'grew fastest') : units ? 'fell least' : 'held up best';
  const both = tied ? `${segmentLabel(fastest)} and ${segmentLabel(tied)}` : '';
  const bothRates = tied ? `${growthText(fastest, false)!.replace(/ a (?:year|quarter|month|week|day).*$/, '')} and ${growthText(tied)!}` : '';
  const title = capitalise(
    tied
      ? `${both} ${overview.fastest.value > 0 ? 'grew at about the same pace' : 'held up about equally'}: ${bothRates}`
      : overview.fastest.value > 0
        ? `${segmentLabel(fastest)} ${fastestVerb}: ${growth}`
        : `${segmentLabel(fastest)} ${fastestVerb}: ${growth}`,
  );
  const largestLine = sizeLine(metric, named, fmt, ' over the period');
  const slowestLine =
    slowest && slowest !== fastest && slowest !== tied ? `${segmentLabel(slowest)} ${rate(slowest)! < 0 ? (units ? 'fell the most' : 'shrank the most') : units ? 'rose the least' : 'grew the least'} (${growthText(slowest, sameYears(slowest, fastest) ? false : true)}).` : '';
  let caption: string;
  if (audience === 'analysts') {
    const list = named
      .map((t) => {
        const g = t.growth?.cagr != null ? `CAGR ${formatChange(t.growth.cagr, locale)} ${t.growth.fromYear}–${t.growth.toYear}` : 'no two full years';
        const sen = t.slopePerPeriod === null ? '' : `, Sen's slope ${formatValue(t.slopePerPeriod, fmt, { compact: true, signed: true })} per ${t.grain}`;
        return `${segmentLabel(t)}: ${formatValue(t.total, fmt, { compact: true })}, ${g}${sen}`;
      })
      .join('; ');
    caption = `By ${inSentence(dim.label)} (growth between the first and last calendar years with rows in all twelve months): ${list}.`;
  } else if (audience === 'managers') {
    const lead = tied
      ? `${both} ${overview.fastest.value > 0 ? 'grew at about the same pace' : 'held up about equally'}, ${bothRates}, too close to name one`
      : `${segmentLabel(fastest)} ${fastestVerb}, ${growth}`;
    caption = `Among ${plural}, ${lead}. ${capitalise(slowestLine)} ${capitalise(largestLine)}`.replace(/ {2,}/g, ' ').trim();
  } else {
    const pace = units
      ? `${overview.fastest.value > 0 ? 'rising most' : 'falling least'}, ${growth}`
      : overview.fastest.value > 0 ? `growing fastest, about ${formatRelativeSize(overview.fastest.value, locale)} a year` : `holding up best, though shrinking about ${formatRelativeSize(overview.fastest.value, locale)} a year`;
    const lead = tied
      ? `${capitalise(both)} are ${overview.fastest.value > 0 ? 'growing' : 'changing'} at about the same pace, about ${units ? bothRates : `${formatRelativeSize(overview.fastest.value, locale)} a year`}`
      : `${capitalise(segmentLabel(fastest))} is ${pace}`;
    caption = `${lead}. ${capitalise(largestLine)}`.trim();
  }
  return { title, caption };
}

/**
 * "Worst 10 destination airports by late share": the named segments in the order asked, the
 * rule the ranking followed (higher_is_better for best and worst) and, for an average or a rate,
 * the row floor a segment needed and how many fell short of it.
 */
function rankingWords(metric: Metric, dim: Dim, f: SegmentSharesFinding, ranking: SegmentRanking, locale: string, rows: { plural: string; singular: string }): Words {
  const fmt = valueFormatOf(metric, locale);
  const noun = inSentence(metric.label);
  const plural = dimensionPlural(dim);
  const ranked = f.rows.filter((r) => !r.other && r.value !== null);
  const fold = f.rows.find((r) => r.other && r.value !== null);
  const floor = ranking.minRows === null ? '' : ` with at least ${countOf(ranking.minRows, rows.singular, locale, rows.plural)}`;
  if (ranked.length === 0) {
    return {
      title: `${labelAtStart(metric.label)} by ${inSentence(dim.label)}: no ${inSentence(dim.label)} to rank`,
      caption: `No ${inSentence(dim.label)}${floor} has a value of ${noun} in this period${fold ? `; all of them together come to ${formatValue(fold.value, fmt)}` : ''}.`,
    };
  }
  const first = ranked[0]!;
  const countText = ranked.length === 1 ? inSentence(dim.label) : `${ranked.length} ${plural}`;
  const title = `${capitalise(ranking.order)} ${countText} by ${noun}: ${segmentLabel(first)}, ${formatValue(first.value, fmt)}`;
  const why =
    ranking.order === 'best' || ranking.order === 'worst'
      ? ` (${ranking.descending === (ranking.order === 'worst') ? 'a high value is worse' : 'a high value is better'} for ${noun})`
      : '';
  const list = ranked.map((r) => `${segmentLabel(r)} ${formatValue(r.value, fmt)}`).join(', ');
  const rule =
    ranking.minRows === null
      ? ''
      : ` Only ${plural}${floor} are ranked (a figure over fewer swings too far to rank; the floor is ${formatShare(ranking.floorRule.share, locale)} of the ${rows.plural}, kept between ${ranking.floorRule.least} and ${ranking.floorRule.most} and at most ${formatShare(ranking.floorRule.ofLargest, locale)} of the largest ${inSentence(dim.label)}'s ${rows.plural})${ranking.thin > 0 ? `; ${countOf(ranking.thin, inSentence(dim.label), locale, plural)} with fewer ${ranking.thin === 1 ? 'is' : 'are'} left out` : ''}.`;
  const asked = f.topNAsked ?? null;
  const fewer = asked !== null && ranked.length < asked ? ` Only ${countOf(ranked.length, inSentence(dim.label), locale, plural)}${floor} ${ranked.length === 1 ? 'has' : 'have'} a value.` : '';
  // A sum's fold adds its members up; an average's or a rate's fold is its value over all their rows.
  const rest = fold ? ` The rest ${f.additive ? 'together come to' : 'taken together are at'} ${formatValue(fold.value, fmt)} ("All others").` : '';
  return { title, caption: `Ranked ${ranking.descending ? 'highest' : 'lowest'} first${why}: ${list}.${rule}${fewer}${rest}` };
}

export function segmentSharesWords(metric: Metric, dim: Dim, findings: readonly Finding[], audience: Audience, locale: string, rows: { plural: string; singular: string } = { plural: 'rows', singular: 'row' }, request: { ranking?: boolean; contrast?: readonly [string, string]; dataset?: DatasetConfig } = {}): Words {
  const f = findings.find((x): x is SegmentSharesFinding => x.type === 'segment_shares' && x.metric === metric.name);
  const noun = inSentence(metric.label);
  const plural = dimensionPlural(dim);
  const fmt = valueFormatOf(metric, locale);
  if (!f || f.rows.length === 0) {
    return { title: `${labelAtStart(metric.label)} by ${inSentence(dim.label)}: no data in this period`, caption: `There are no ${noun} to break down by ${inSentence(dim.label)} in this period.` };
  }
  const named = f.rows.filter((r) => !r.other);
  if (f.rows.every((r) => r.value === null)) {
    return { title: `${labelAtStart(metric.label)} by ${inSentence(dim.label)}: no values in this period`, caption: `${capitalise(noun)} ${isPluralLabel(metric.label) ? 'have' : 'has'} no values for any ${inSentence(dim.label)} in this period.` };
  }
  if (f.perDay) return perDayRankingWords(metric, dim, f, locale);
  if (f.ranking && (!f.additive || !f.ranking.descending || f.total === null || named.every((r) => r.share === null))) return rankingWords(metric, dim, f, f.ranking, locale, rows);
  // "What share of flights does ATL have": the named segment leads.
  if (f.focus && f.additive) return focusShareWords(metric, dim, f.focus, locale);
  // Two values set against each other ("night vs day"): the two side by side, in the order asked.
  const pair = request.contrast?.map((v) => named.find((r) => segmentLabel(r).toLowerCase() === String(v).toLowerCase()));
  if (pair && pair[0] && pair[1] && pair[0].value !== null && pair[1].value !== null) {
    const [a, b] = pair as [SegmentShareRow, SegmentShareRow];
    if (f.perRow) return perRowPairWords(metric, f.perRow, a, b, fmt, locale);
    const side = (r: SegmentShareRow) => `${segmentLabel(r)} ${formatValue(r.value, fmt, { compact: true })}`;
    const shares = a.share !== null && b.share !== null && f.additive ? ` (${segmentLabel(a)} ${formatShare(a.value! / (a.value! + b.value!), locale, true)} of the two)` : '';
    return { title: `${labelAtStart(metric.label)}: ${side(a)} against ${side(b)}`, caption: `${capitalise(noun)} over the period: ${side(a)} against ${side(b)}${shares}.` };
  }
  if (!f.additive || f.total === null || named.every((r) => r.share === null)) {
    const ranked = [...named].filter((r) => r.value !== null).sort((a, b) => b.value! - a.value!);
    const top = ranked[0];
    // Said as the config's choice, not as a fact about the quantity (the same data set up as a sum would split).
    const set = configuredAs(metric, request.dataset);
    const why = f.additive
      ? `the total is not positive or some ${plural} are negative`
      : `${noun} ${isPluralLabel(metric.label) ? 'are' : 'is'} set up in the config as ${set.as}, not as a total that splits across ${plural}${set.change ? ` (${set.change} would)` : ''}`;
    const list = ranked.slice(0, 5).map((r) => `${segmentLabel(r)} ${formatValue(r.value, fmt)}`).join(', ');
    return {
      title: top ? `${labelAtStart(metric.label)} ${isPluralLabel(metric.label) ? 'are' : 'is'} highest for ${segmentLabel(top)} (${formatValue(top.value, fmt)})` : `${labelAtStart(metric.label)} by ${inSentence(dim.label)}: no values`,
      caption: `Shares do not apply here: ${why}. ${list ? `By ${inSentence(dim.label)}: ${list}.` : ''}`.trim(),
    };
  }
  // The headline names the fewest segments that carry at least half of the total.
  const half = named.find((r) => r.cumulativeShare! >= 0.5 - 1e-12);
  const k = half ? named.indexOf(half) + 1 : null;
  const verbFor = (n: number) => (n === 1 ? 'carries' : 'carry');
  let title: string;
  // A ranking asked ("which species cause the most cost", "top 5 airports and their share"): the title answers it.
  if (request.ranking && f.topNAsked && f.topNShare !== null) title = `The top ${f.topN} ${plural} carry ${formatShare(f.topNShare, locale)} of ${noun}; ${segmentLabel(named[0]!)} the most (${formatShare(named[0]!.share, locale, true)})`;
  else if (request.ranking) title = `${capitalise(segmentLabel(named[0]!))} has the most ${noun}: ${formatValue(named[0]!.value, fmt, { compact: true })} (${formatShare(named[0]!.share, locale, true)})`;
  else if (k === 1) title = `${capitalise(segmentLabel(named[0]!))} carries ${formatShare(named[0]!.share, locale)} of ${noun}`;
  else if (k !== null) title = `${capitalise(countWord(k, locale))} ${plural} carry ${formatShare(half!.cumulativeShare, locale)} of ${noun}`;
  else if (f.countToThreshold !== null && f.countToThreshold > 1) title = `${capitalise(paretoCount(f, locale, plural))} carry ${formatShare(f.threshold, locale)} of ${noun}`;
  else title = `${capitalise(plural)} are spread out: the largest carries ${formatShare(named[0]!.share, locale)} of ${noun}`;

  const namesOf = (rows: readonly SegmentShareRow[]) => rows.map((r) => `${segmentLabel(r)} (${formatShare(r.share, locale, true)})`);
  const joinNames = (xs: string[]) => (xs.length <= 1 ? xs.join('') : `${xs.slice(0, -1).join(', ')} and ${xs[xs.length - 1]}`);
  // Half the total held by more segments than are named: the largest few are named instead.
  const largest = named.filter((r) => r.share !== null).slice(0, Math.min(3, named.length));
  const lead =
    k !== null && k > 1
      ? `${joinNames(namesOf(named.slice(0, k)))} together ${verbFor(k)} ${formatShare(half!.cumulativeShare, locale, true)} of ${noun}`
      : k === null && largest.length > 1
        ? `the largest are ${joinNames(namesOf(largest))}`
        : `${joinNames(namesOf(named.slice(0, 1)))} ${verbFor(1)} the most`;
  const c = f.countToThreshold;
  const reached = f.reachShare ?? (c !== null ? named[c - 1]?.cumulativeShare ?? null : null);
  // The 80% mark is a convention ("80/20", common practice), said so once.
  const convention = ` (the ${formatShare(f.threshold, locale)} mark is a common rule of thumb, not a law)`;
  const reach =
    c === null
      ? `the ${named.length} largest ${plural} shown carry ${formatShare(named[named.length - 1]!.cumulativeShare, locale, true)}, short of ${formatShare(f.threshold, locale)}`
      : `${c === 1 ? `${paretoCount(f, locale, inSentence(dim.label))} reaches` : `${paretoCount(f, locale, plural)} reach`} ${formatShare(f.threshold, locale)} of ${noun}${reached !== null ? `, together ${formatShare(reached, locale, true)}` : ''}${convention}`;
  // "top 10": the share of as many as were asked, and why fewer are named when they are.
  const asked = f.topNAsked ?? null;
  const askedTop = asked !== null && f.topNShare !== null ? `the top ${f.topN} ${plural} carry ${formatShare(f.topNShare, locale, true)}` : null;
  const fewerLine =
    asked === null || named.length >= asked
      ? ''
      : f.segmentCount < asked
        ? ` Only ${f.segmentCount} ${plural} have ${noun} in this period.`
        : asked > f.topN
          ? ` The ${f.topN} largest are named; more would not read in one chart.`
          : '';
  const fold = f.rows.find((r) => r.other);
  const foldLine = fold ? ` The ${f.folded} smaller ${plural} are combined as "All others" (${formatShare(fold.share, locale, true)}).` : '';
  let caption: string;
  if (audience === 'analysts') {
    const hhi = f.hhi === null ? '' : ` HHI ${formatValue(f.hhi, { unit: 'number', decimals: 0, locale })} (${bandWords(f.hhiBand)} by the 2010 US Horizontal Merger Guidelines bands)${f.topNShare !== null ? `; top ${f.topN} share ${formatShare(f.topNShare, locale, true)}` : ''}.`;
    caption = `${capitalise(lead)}; ${reach}, of ${f.segmentCount} ${plural} in all.${hhi}${foldLine}`;
  } else if (audience === 'managers') {
    caption = `${capitalise(lead)}; ${askedTop ? `${askedTop}${c === null ? '' : `; ${reach}`}` : reach}.${fewerLine}${foldLine}`;
  } else {
    const top = k !== null ? `${capitalise(countWord(k, locale))} ${k === 1 ? inSentence(dim.label) : plural} ${verbFor(k)} about ${formatShare(half!.cumulativeShare, locale)} of ${noun}` : `No single ${inSentence(dim.label)} dominates ${noun}`;
    const more = c !== null && (k === null || c > k) ? `; ${paretoCount(f, locale, plural)} carry over ${formatShare(f.threshold, locale)}` : '';
    caption = `${top}${more}.`;
  }
  return { title, caption };
}

/**
 * Asked per day ("which routes have the most bookings per day"): each segment's total over its
 * days, ranked; the days are said, and a segment that opened or closed inside the period is named
 * with the days its figure is over.
 */
function perDayRankingWords(metric: Metric, dim: Dim, f: SegmentSharesFinding, locale: string): Words {
  const fmt = valueFormatOf(metric, locale);
  const noun = inSentence(metric.label);
  const plural = dimensionPlural(dim);
  const a = (v: number | null) => `${formatValue(v, fmt, { rate: true })} a day`;
  const named = f.rows.filter((r) => !r.other && r.value !== null);
  const fold = f.rows.find((r) => r.other && r.value !== null);
  const descending = f.ranking ? f.ranking.descending : true;
  const top = named[0];
  if (!top) return { title: `${labelAtStart(metric.label)} per day by ${inSentence(dim.label)}: no data in this period`, caption: `There are no ${noun} to break down by ${inSentence(dim.label)} in this period.` };
  const day = (iso: string | null) => (iso === null ? '' : formatPeriod(iso, 'day', locale, 'long'));
  const days = (n: number) => countOf(n, 'day', locale);
  const mark = (r: SegmentShareRow) => (r.days?.opened ? ' (opened)' : r.days?.closed ? ' (closed)' : '');
  const title = `${capitalise(segmentLabel(top))} has the ${descending ? 'highest' : 'lowest'} ${noun} per day: ${a(top.value)}${mark(top)}`;
  const list = named.map((r) => `${segmentLabel(r)} ${formatValue(r.value, fmt, { rate: true })}${mark(r)}`).join(', ');
  // The period's days: those of any segment there throughout.
  const whole = f.rows.find((r) => r.days && !r.days.opened && !r.days.closed)?.days ?? null;
  const basis = whole
    ? ` Each ${inSentence(dim.label)}'s total is divided by the ${days(whole.days)} of the period the data covers (${day(whole.from)} to ${day(whole.last)}), days without a record counting as zero.`
    : '';
  const changed = named.filter((r) => r.days?.opened || r.days?.closed);
  const lives = changed.map((r) => {
    const d = r.days!;
    const what = d.opened && d.closed ? `was there only from ${day(d.from)} to ${day(d.last)}` : d.opened ? `opened on ${day(d.from)} (its first record)` : `closed after ${day(d.last)} (its last record)`;
    return `${segmentLabel(r)} ${what}, so its figure is per day ${d.opened && !d.closed ? 'since it opened' : d.closed && !d.opened ? 'while it was open' : 'over those days'} (${days(d.days)}).`;
  });
  const otherChanged = Math.max(0, (f.perDay?.changed ?? 0) - changed.length);
  const foldLine = fold ? ` The other ${f.folded} ${plural} together come to ${a(fold.value)} ("All others").` : '';
  const share = f.total !== null && top.share !== null ? ` ${capitalise(segmentLabel(top))} carries ${formatShare(top.share, locale, true)} of ${noun}.` : '';
  const others = otherChanged > 0 ? ` Of those not shown, ${countOf(otherChanged, inSentence(dim.label), locale, plural)} opened or closed inside the period; each is counted over its own days.` : '';
  return { title, caption: `Ranked ${descending ? 'highest' : 'lowest'} first, ${noun} per day: ${list}.${basis}${lives.length ? ` ${lives.join(' ')}` : ''}${others}${share}${foldLine}` };
}

/**
 * The Pareto count with what it is out of, "47 of 229 airports (21%)", when the tail is folded;
 * the bare count ("three airports") when every segment is named anyway.
 */
function paretoCount(f: SegmentSharesFinding, locale: string, noun: string): string {
  const c = f.countToThreshold!;
  if (f.folded === 0 || f.segmentCount <= 0) return `${countWord(c, locale)} ${noun}`;
  return `${formatValue(c, { unit: 'count', locale })} of ${formatValue(f.segmentCount, { unit: 'count', locale })} ${noun} (${formatShare(c / f.segmentCount, locale)})`;
}

function bandWords(band: SegmentSharesFinding['hhiBand']): string {
  switch (band) {
    case 'highly_concentrated':
      return 'highly concentrated';
    case 'moderately_concentrated':
      return 'moderately concentrated';
    case 'unconcentrated':
      return 'unconcentrated';
    default:
      return 'n/a';
  }
}

/**
 * Two values' mean per row of a summed metric ("gross per film"), with the median beside it: the
 * title says which is higher on the mean, the caption says how each figure is formed and whether
 * the medians agree (money per item is usually skewed, so a few large rows can carry a mean).
 */
function perRowPairWords(metric: Metric, noun: string, a: SegmentShareRow, b: SegmentShareRow, fmt: ReturnType<typeof valueFormatOf>, locale: string): Words {
  const label = `${metric.label} per ${noun}`;
  const v = (x: number | null | undefined) => formatValue(x ?? null, fmt, { compact: true });
  const nouns = pluralNoun(noun);
  const [hi, lo] = a.value! >= b.value! ? [a, b] : [b, a];
  const title = a.value === b.value ? `${label}: ${segmentLabel(a)} and ${segmentLabel(b)} are level at ${v(a.value)} (mean)` : `${label} is higher for ${segmentLabel(hi)}: ${v(hi.value)} against ${v(lo.value)} for ${segmentLabel(lo)} (mean)`;
  const count = (r: SegmentShareRow) => countOf(r.perRowN ?? 0, noun, locale, nouns);
  const means = `Mean ${inSentence(metric.label)} per ${noun} (the total over the ${nouns} with a value, divided by their number) over the period: ${segmentLabel(a)} ${v(a.value)} (${count(a)}) against ${segmentLabel(b)} ${v(b.value)} (${count(b)}).`;
  const ma = a.perRowMedian ?? null;
  const mb = b.perRowMedian ?? null;
  let medians = '';
  if (ma !== null && mb !== null) {
    const agree = Math.sign(ma - mb) === Math.sign(a.value! - b.value!);
    medians = ` The medians (half the ${nouns} have less) are ${segmentLabel(a)} ${v(ma)} and ${segmentLabel(b)} ${v(mb)}${agree ? ', the same way round' : ', the other way round: a few large ones carry the mean'}.`;
  }
  return { title, caption: `${means}${medians}` };
}

/**
 * One named segment's share ("What share of flights does ATL have?"): its share of the whole over
 * the period with the whole beside it, its rank among every segment, and how its share moved from
 * the first complete period to the last, in points (a difference of two shares, never a percent of one).
 */
export function focusShareWords(metric: Metric, dim: Dim, focus: ShareFocusFinding, locale: string): Words {
  const fmt = valueFormatOf(metric, locale);
  const noun = inSentence(metric.label);
  const plural = dimensionPlural(dim);
  const name = focus.segment;
  const share = formatShare(focus.share, locale, true);
  const periods = focus.series.map((p) => p.period);
  const grain = focus.grain;
  const span = periods.length > 0 ? ` ${formatPeriod(periods[0]!, grain, locale)}${periods.length > 1 ? `–${formatPeriod(periods[periods.length - 1]!, grain, locale)}` : ''}` : '';
  const whole = `all ${formatValue(focus.total, fmt, { compact: true })} ${noun}`;
  if (focus.rank === null || focus.value === 0) {
    return { title: `${name} has no ${noun} in this period`, caption: `${name} has no ${noun} in this period (0% of ${whole},${span}); ${countOf(focus.of, inSentence(dim.label), locale, plural)} have some.` };
  }
  const rank = `rank ${focus.rank} of ${formatValue(focus.of, { unit: 'count', locale })} ${plural}`;
  const title = `${name} carries ${share} of ${noun} (${rank})`;
  const c = focus.change;
  const moved =
    c
      ? `; its share ${Math.abs(c.points) < 5e-4 ? 'held at about' : c.points > 0 ? 'rose' : 'fell'} ${Math.abs(c.points) < 5e-4 ? formatShare(c.toShare, locale, true) : formatPointChange(c.points, locale)} from ${formatPeriod(c.from, grain, locale, 'long')} to ${formatPeriod(c.to, grain, locale, 'long')}${Math.abs(c.points) < 5e-4 ? '' : ` (${formatShare(c.fromShare, locale, true)} to ${formatShare(c.toShare, locale, true)})`}`
      : '';
  const lowHigh = focus.series.filter((p) => !p.partial && p.share !== null);
  const range = lowHigh.length > 2 ? ` By ${GRAIN_WORD[grain]}, its share ran from ${formatShare(Math.min(...lowHigh.map((p) => p.share!)), locale, true)} to ${formatShare(Math.max(...lowHigh.map((p) => p.share!)), locale, true)}.` : '';
  return {
    title,
    caption: `${name} carried ${share} of ${whole} (${formatValue(focus.value, fmt, { compact: true })}),${span}, ${rank}${moved}.${range}`,
  };
}

const GRAIN_WORD = { day: 'day', week: 'week', month: 'month', quarter: 'quarter', year: 'year' } as const;

