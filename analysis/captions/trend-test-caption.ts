// Title and caption for a trend test (Mann–Kendall and Sen's slope), written only from findings.
import type { Metric } from '../../config/schema.js';
import type { TrendTestFinding } from '../findings/segments.js';
import { changesInUnits, metricDirection, onIntervalScale } from '../catalog.js';
import { formatChange, formatPeriod, formatUnitChange, formatValue, valueFormatOf } from '../format.js';
import { yearFraction } from '../periods.js';
import type { Audience, Finding, Grain } from '../types.js';
import { inSentence, isPluralLabel, labelAtStart } from './grammar.js';
import type { Verdict } from './verdict-words.js';
import { formatSmallPoints } from './growth-words.js';
import { formatIndex, formatP, formatRelativeSize, grainNoun } from './trend-words.js';

export interface Words {
  title: string;
  caption: string;
}


export function trendTestWords(metric: Metric, grain: Grain, findings: readonly Finding[], audience: Audience, locale: string): Words {
  const test = findings.find((f): f is TrendTestFinding => f.type === 'trend_test' && f.metric === metric.name);
  const fmt = valueFormatOf(metric, locale);
  const when = (p: string) => formatPeriod(p, grain, locale, 'long');
  const plural = isPluralLabel(metric.label);
  const peakLine = peakSentence(metric, grain, findings, locale);
  if (!test) {
    const series = findings.find((f): f is Extract<Finding, { type: 'series' }> => f.type === 'series' && f.metric === metric.name);
    const complete = series ? series.points.filter((p) => !p.partial && p.value !== null).length : 0;
    return {
      title: `${labelAtStart(metric.label)}: too few complete ${grainNoun(grain, 2)} to test for a trend`,
      caption: `A trend test needs at least three complete ${grainNoun(grain, 2)} with a value; ${complete === 0 ? 'this period has none' : `this period has ${complete}`}.${peakLine ? ` ${peakLine}` : ''}`,
    };
  }

  const span = `${when(test.firstPeriod)} to ${when(test.lastPeriod)}`;
  if (changesInUnits(metric)) {
    const words = levelTrendWords(metric, grain, test, audience, locale, span);
    return { title: words.title, caption: peakLine ? `${words.caption} ${peakLine}` : words.caption };
  }
  // A rate or share moves in points: its slope is "0.042 pts a month", never a percentage of itself.
  const inPoints = metric.unit === 'percent';
  const perPeriod = inPoints ? formatSmallPoints(test.slopePerPeriod, locale) : formatValue(Math.abs(test.slopePerPeriod), fmt, { compact: true });
  // A slope from under a year of periods is said per period only: a quarter's slope times four is no year's change.
  const yearly = test.underAYear !== true;
  const perYearRel = !yearly
    ? null
    : inPoints
    ? `${test.slopePerYear < 0 ? '\u2212' : '+'}${formatSmallPoints(test.slopePerYear, locale)}`
    : test.slopePerYearRelative === null ? null : formatChange(test.slopePerYearRelative, locale);
  const moving = test.direction === 'up' ? 'rising' : 'falling';
  const show = plural ? 'show' : 'shows';
  // Under two years a move is not declared a trend: it may be the season (issue 17 item 8).
  const unresolved = test.seasonUnresolved === true;
  const went = test.direction === 'up' ? 'rose' : test.direction === 'down' ? 'fell' : 'moved';
  const title = unresolved
    ? `${labelAtStart(metric.label)} ${went} from ${span}: too short a span to tell a trend from the season`
    : test.direction === 'none'
      ? `${labelAtStart(metric.label)}: no clear trend from ${span}`
      : `${labelAtStart(metric.label)} ${show} a ${moving} trend of about ${perPeriod} per ${grainNoun(grain)}`;
  const seasonCaveat = `With less than two years of ${grainNoun(grain, 2)}, a rise or fall cannot be told apart from the usual seasonal pattern; over two years or more the season can be allowed for.`;

  let caption: string;
  if (audience === 'analysts') {
    const method = `Mann–Kendall${test.seasonallyAdjusted ? ' on seasonally adjusted values' : ''}, p ${formatP(test.pValue, locale)}, τ = ${formatIndex(test.tau, locale)}, n = ${test.n} ${grainNoun(grain, test.n)}, ${span}`;
    const signedPoints = (v: number) => `${v < 0 ? '\u2212' : '+'}${formatSmallPoints(v, locale)}`;
    const slope = inPoints
      ? `Sen's slope ${signedPoints(test.slopePerPeriod)} per ${grainNoun(grain)}${yearly ? `, ${signedPoints(test.slopePerYear)} a year` : ''}`
      : `Sen's slope ${formatValue(test.slopePerPeriod, fmt, { compact: true, signed: true })} per ${grainNoun(grain)}${yearly ? `, ${formatValue(test.slopePerYear, fmt, { compact: true, signed: true })} a year${perYearRel ? ` (${perYearRel} of the mean level)` : ''}` : ''}`;
    const raw = test.seasonallyAdjusted ? ` On the unadjusted values the test gives p ${formatP(test.rawPValue, locale)}.` : '';
    const lead = test.direction === 'none' ? `No significant monotonic trend at the ${formatValue(test.alpha, { unit: 'percent', decimals: 0, locale })} level` : `${unresolved ? `${labelAtStart(metric.label)}: monotonic movement` : title}`;
    const short = unresolved ? ` Fewer than two years tested: no yearly season could be removed, so the test does not separate trend from season.` : '';
    caption = `${lead} (${method}); ${slope}.${raw}${short}`;
  } else if (unresolved) {
    const size = audience === 'managers' && test.direction !== 'none' ? ` by about ${perPeriod} a ${grainNoun(grain)}` : '';
    caption = `${labelAtStart(metric.label)} ${went}${size} from ${span}. ${seasonCaveat}`;
  } else if (audience === 'managers') {
    const seasonal = test.seasonallyAdjusted ? ', after allowing for the usual seasonal pattern' : '';
    caption =
      test.direction === 'none'
        ? `${labelAtStart(metric.label)} moved up and down from ${span} without a clear direction${seasonal}; the changes could be chance.`
        : `${labelAtStart(metric.label)} ${test.direction === 'up' ? 'rose' : 'fell'} by about ${perPeriod} a ${grainNoun(grain)}${perYearRel ? ` (${perYearRel} a year)` : ''} from ${span}${seasonal}; a trend this steady is unlikely to be chance.`;
  } else {
    const be = plural ? 'are' : 'is';
    const size = !yearly
      ? `, by about ${perPeriod} a ${grainNoun(grain)}`
      : inPoints
      ? `, by about ${formatSmallPoints(test.slopePerYear, locale)} a year`
      : test.slopePerYearRelative === null ? '' : `, by about ${formatRelativeSize(test.slopePerYearRelative, locale)} a year`;
    caption =
      test.direction === 'none'
        ? `${labelAtStart(metric.label)} ${show} no clear rise or fall from ${span}; the ups and downs could be chance.`
        : `${labelAtStart(metric.label)} ${be} ${moving}${size}; this is unlikely to be chance.`;
  }
  return { title, caption: peakLine ? `${caption} ${peakLine}` : caption };
}

/**
 * A level (a reading such as a concentration) changes in its own units: "rose by about 1.56 ppm a
 * year (15.6 ppm a decade)", with the rate decade by decade when the values reach into several.
 */
function levelTrendWords(metric: Metric, grain: Grain, test: TrendTestFinding, audience: Audience, locale: string, span: string): Words {
  const fmt = valueFormatOf(metric, locale);
  const size = (v: number) => formatValue(Math.abs(v), fmt, { compact: true });
  const signed = (v: number) => formatValue(v, fmt, { compact: true, signed: true });
  const yearsSpanned = yearFraction(test.lastPeriod) - yearFraction(test.firstPeriod);
  // Under a year of periods the slope is said per period ("0.4 kt a week"), never annualised.
  const yearly = test.underAYear !== true;
  const rate = yearly ? test.slopePerYear : test.slopePerPeriod;
  const per = yearly ? 'a year' : `a ${grainNoun(grain)}`;
  // A rate per decade from a shorter span would be an extrapolation.
  const decade = yearsSpanned >= 10 ? ` (${size(test.slopePerYear * 10)} a decade)` : '';
  const byDecade =
    test.byDecade.length >= 2
      ? ` Decade by decade, the change a year was ${test.byDecade.map((d) => `${signed(d.perYear)} in the ${d.decade}s`).join(', ')}.`
      : '';
  const moving = test.direction === 'up' ? 'rising' : 'falling';
  const plural = isPluralLabel(metric.label);
  // Under two years a level's move is not declared a trend either: a winter high and a summer low
  // inside one year read as a steady fall (the same rule as for flows and rates above).
  if (test.seasonUnresolved === true) return unresolvedLevelWords(metric, grain, test, audience, locale, span, size(rate), signed(rate), per);
  const title =
    test.direction === 'none'
      ? `${labelAtStart(metric.label)}: no clear trend from ${span}`
      : `${labelAtStart(metric.label)} ${plural ? 'show' : 'shows'} a ${moving} trend of about ${size(rate)} ${per}`;
  const seasonal = test.seasonallyAdjusted ? ', after taking out the usual seasonal swing' : '';
  if (audience === 'analysts') {
    const method = `Mann–Kendall${test.seasonallyAdjusted ? ' on seasonally adjusted values (additive)' : ''}, p ${formatP(test.pValue, locale)}, τ = ${formatIndex(test.tau, locale)}, n = ${test.n} ${grainNoun(grain, test.n)}, ${span}`;
    const lead = test.direction === 'none' ? `No significant monotonic trend at the ${formatValue(test.alpha, { unit: 'percent', decimals: 0, locale })} level` : title;
    const perDecade = yearsSpanned >= 10 ? `, ${signed(test.slopePerYear * 10)} a decade` : '';
    const raw = test.seasonallyAdjusted ? ` On the unadjusted values the test gives p ${formatP(test.rawPValue, locale)}.` : '';
    return { title, caption: `${lead} (${method}); Sen's slope ${signed(test.slopePerPeriod)} per ${grainNoun(grain)}${yearly ? `, ${signed(test.slopePerYear)} a year` : ''}${perDecade}.${raw}${byDecade}` };
  }
  if (test.direction === 'none') {
    return { title, caption: `${labelAtStart(metric.label)} moved up and down from ${span} without a clear direction${seasonal}; the changes could be chance.` };
  }
  const verb = test.direction === 'up' ? 'rose' : 'fell';
  if (audience === 'managers') {
    return { title, caption: `${labelAtStart(metric.label)} ${verb} by about ${size(rate)} ${per}${decade} from ${span}${seasonal}; a trend this steady is unlikely to be chance.${byDecade}` };
  }
  return { title, caption: `${labelAtStart(metric.label)} ${plural ? 'are' : 'is'} ${moving}, by about ${size(rate)} ${per}${decade}; this is unlikely to be chance.${byDecade}` };
}

/**
 * A level over less than two years of sub-yearly periods: what it did, in its units, and why that
 * is not called a trend (no yearly season can be estimated, so none was taken out).
 */
function unresolvedLevelWords(metric: Metric, grain: Grain, test: TrendTestFinding, audience: Audience, locale: string, span: string, size: string, signedSize: string, per: string): Words {
  const went = test.direction === 'up' ? 'rose' : test.direction === 'down' ? 'fell' : 'moved';
  const title = `${labelAtStart(metric.label)} ${went} from ${span}: too short a span to tell a trend from the season`;
  const seasonCaveat = `With less than two years of ${grainNoun(grain, 2)}, a rise or fall cannot be told apart from the usual seasonal pattern; over two years or more the season can be allowed for.`;
  if (audience === 'analysts') {
    const method = `Mann–Kendall, p ${formatP(test.pValue, locale)}, τ = ${formatIndex(test.tau, locale)}, n = ${test.n} ${grainNoun(grain, test.n)}, ${span}`;
    return { title, caption: `${labelAtStart(metric.label)}: monotonic movement (${method}); Sen's slope ${signedSize} ${per}. Fewer than two years tested: no yearly season could be removed, so the test does not separate trend from season.` };
  }
  const by = audience === 'managers' && test.direction !== 'none' ? ` by about ${size} ${per}` : '';
  return { title, caption: `${labelAtStart(metric.label)} ${went}${by} from ${span}. ${seasonCaveat}` };
}

/** The peak and how far the latest complete period sits from it. */
function peakSentence(metric: Metric, grain: Grain, findings: readonly Finding[], locale: string): string {
  const change = findings.find((f): f is Extract<Finding, { type: 'change' }> => f.type === 'change' && f.metric === metric.name);
  if (!change) return '';
  const fmt = valueFormatOf(metric, locale);
  const value = (v: number) => formatValue(v, fmt, { compact: true });
  const when = (p: string) => formatPeriod(p, grain, locale, 'long');
  if (change.from.period === change.to.period) {
    return `The latest complete ${grainNoun(grain)}, ${when(change.to.period)}, is the peak at ${value(change.to.value)}.`;
  }
  // A rate or share sits points below its peak ("79.6%, 9.3 pts below it"), and a temperature
  // degrees ("11.9 °C, 13.4 °C below it"): a percentage of either means nothing. So does one of a
  // metric whose values reach or cross zero: the template gives no relative change then (catalog.ts
  // metricPercentScale), and the gap is in its units ("9.76 min, 4.04 min below it").
  const diff = change.to.value - change.from.value;
  const gap =
    fmt.unit === 'percent' || onIntervalScale(metric) || change.relative === null
      ? `${value(change.to.value)}, ${formatUnitChange(Math.abs(diff), fmt, { compact: true })} ${diff < 0 ? 'below' : 'above'} it`
      : `${value(change.to.value)}, ${formatRelativeSize(change.relative, locale)} ${change.relative < 0 ? 'below' : 'above'} it`;
  return `The peak was ${when(change.from.period)} at ${value(change.from.value)}; the latest complete ${grainNoun(grain)}, ${when(change.to.period)}, was ${gap}.`;
}

/**
 * The trend test as the answer to a yes-or-no question about the trend ("Is generation trending
 * up?"): up or down only where the test finds a trend, level where the moves could be chance. None
 * where the span is too short to tell a trend from the season.
 */
export function trendVerdict(metric: Metric, grain: Grain, test: TrendTestFinding, title: string, locale: string): Verdict | null {
  if (test.seasonUnresolved) return null;
  const when = (p: string) => formatPeriod(p, grain, locale, 'long');
  const span = `${when(test.firstPeriod)} to ${when(test.lastPeriod)}`;
  const tested = `Mann–Kendall test, p ${formatP(test.pValue, locale)}`;
  const label = inSentence(metric.label);
  const base = { higherIsBetter: metricDirection(metric), about: 'trend' as const };
  if (test.direction === 'none') {
    return { ...base, direction: 'level', statement: `${label} ${isPluralLabel(metric.label) ? 'show' : 'shows'} no clear trend from ${span} (${tested}: the ups and downs could be chance)` };
  }
  const clause = inSentence(title.replace(/[.\s]+$/, ''));
  return { ...base, direction: test.direction, statement: `${clause}${clause.includes(span) ? '' : `, ${span}`} (${tested}: a trend this steady is unlikely to be chance)` };
}
