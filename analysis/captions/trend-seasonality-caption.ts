// Title and caption for the seasonal pattern (monthly indices and weekdays), from findings only.
import type { Metric } from '../../config/schema.js';
import type { CalendarMonthPattern, MonthTotalsPerDay, TrendSeasonalityFinding, TrendWeekdayFinding } from '../findings/segments.js';
import { formatPeriod, formatUnitChange, formatValue, valueFormatOf } from '../format.js';
import type { Audience, Finding } from '../types.js';
import { inSentence, labelAtStart, listJoin, verbFor } from './grammar.js';
import type { Words } from './trend-test-caption.js';
import { formatIndex, formatP, formatRelativeSize, grainNoun, monthName, monthPair, weekdayName } from './trend-words.js';
import { STABLE_SEASONALITY_ALPHA } from '../stats/stable-seasonality.js';
import { metricDirection } from '../catalog.js';

/**
 * "Busiest" and "quietest" are words of volume (bookings, revenue, visits, any count of things): an
 * amount that should be small (a cost, repair bills) is "highest" and "lowest".
 */
function busyWords(metric: Metric, additive: boolean): boolean {
  return additive && (metric.definition.type === 'count' || metricDirection(metric) !== false);
}

/**
 * `perDayAsked`: the request compared months per day ("which months have the most bookings per
 * day"), so the title ranks them so. `weekdaysAsked`: the request asked about the days of the week
 * ("what's the busiest day of the week?"), so the weekdays lead the title and the caption and the
 * months follow.
 */
export function seasonalityWords(metric: Metric, additive: boolean, findings: readonly Finding[], audience: Audience, locale: string, perDayAsked = false, weekdaysAsked = false): Words {
  const w = findings.find((f): f is TrendWeekdayFinding => f.type === 'trend_weekday' && f.metric === metric.name);
  const lead = weekdaysAsked && w ? weekdayTitle(metric, w, additive, locale) : null;
  const months = monthWords(metric, additive, findings, audience, locale, perDayAsked, lead === null);
  if (!lead) return months;
  const weekday = weekdaySentence(metric, w!, additive, audience, locale);
  return { title: lead, caption: `${weekday} ${months.caption}`.trim() };
}

/** The months' title and caption; the weekday sentence closes the caption when `withWeekdays`. */
function monthWords(metric: Metric, additive: boolean, findings: readonly Finding[], audience: Audience, locale: string, perDayAsked: boolean, withWeekdays: boolean): Words {
  const s = findings.find((f): f is TrendSeasonalityFinding => f.type === 'trend_seasonality' && f.metric === metric.name);
  const w = findings.find((f): f is TrendWeekdayFinding => f.type === 'trend_weekday' && f.metric === metric.name);
  const weekday = w && withWeekdays ? weekdaySentence(metric, w, additive, audience, locale) : '';
  if (!s) {
    const series = findings.find((f): f is Extract<Finding, { type: 'series' }> => f.type === 'series' && f.metric === metric.name);
    const complete = series ? series.points.filter((p) => !p.partial && p.value !== null && /^\d{4}-\d{2}/.test(p.period)) : [];
    const months = complete.length;
    // Two years of months and still no pattern: some calendar month has no value in any year (a
    // league's summer break), so it cannot be set against the others. Said as such, never as too
    // little history.
    const valued = new Set(complete.map((p) => Number(p.period.slice(5, 7))));
    const empty = months >= 24 ? [1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12].filter((m) => !valued.has(m)) : [];
    if (empty.length > 0) {
      const names = listJoin(empty.map((m) => monthName(m, locale)));
      return {
        title: `${labelAtStart(metric.label)}: no seasonal pattern measured, as ${names} ${empty.length === 1 ? 'has' : 'have'} no data in any year`,
        caption: `Over ${months} complete months, ${names} ${empty.length === 1 ? 'has' : 'have'} no data in any year, so the months of the year cannot all be set against each other and no seasonal pattern is measured; months with no data are left blank, not counted as zero.${weekday ? ` ${weekday}` : ''}`,
      };
    }
    return {
      title: `${labelAtStart(metric.label)}: too little history to measure seasonality`,
      caption: `Seasonality needs at least two full years of monthly data; this period has ${months} complete ${grainNoun('month', months)}.${weekday ? ` ${weekday}` : ''}`,
    };
  }
  const byMonth = (m: number) => s.months[m - 1]!;
  const [b0, b1] = s.busiest;
  const [q0, q1] = s.quietest;
  const years = s.fullYears.length;
  const together = Math.min(byMonth(b0).topTwoIn, byMonth(b1).topTwoIn);
  const held = years > 0 ? ` (top two in ${together} of ${years} full ${years === 1 ? 'year' : 'years'})` : '';
  const title = perDayAsked && s.perDay
    ? `Per day, ${monthPair(s.perDay.byDay[0]!, s.perDay.byDay[1]!, locale)} are the ${busyWords(metric, additive) ? 'busiest' : 'highest'} months; by total, ${monthPair(b0, b1, locale)}`
    : busyWords(metric, additive)
    ? `${monthPair(b0, b1, locale)} are the busiest months${held}`
    : `${labelAtStart(metric.label)} ${verbFor(metric.label)} highest in ${monthPair(b0, b1, locale)}${held}`;

  // Months that differ by no more than the years' own swings are no season to plan by: the title
  // says so rather than naming the months that happened to come out highest.
  if (s.stable && s.stable.pValue >= STABLE_SEASONALITY_ALPHA) {
    const test = audience === 'analysts'
      ? ` (X-11 F-test for stable seasonality: F = ${formatIndex(s.stable.f, locale)}, df ${s.stable.df1} and ${s.stable.df2}, p ${formatP(s.stable.pValue, locale)}; seasonality is taken as present below p = 0.001)`
      : '';
    const highest = `On average ${monthPair(b0, b1, locale)} came out highest and ${monthPair(q0, q1, locale)} lowest, but by no more than chance would give from year to year${test}.`;
    return {
      title: `${labelAtStart(metric.label)}: no steady seasonal pattern across the months`,
      caption: `${highest}${weekday ? ` ${weekday}` : ''}`,
    };
  }
  if (s.model === 'additive') {
    const caption = levelSeasonCaption(metric, s, audience, locale);
    return { title, caption: weekday ? `${caption} ${weekday}` : caption };
  }
  const name = (m: number) => monthName(m, locale);
  const rel = (m: CalendarMonthPattern) => formatRelativeSize(m.index - 1, locale);
  /** "about 27% above an average month", "about 3% below", "about the same as": the side follows the index. */
  const against = (m: CalendarMonthPattern) => besideAverage(m.index, 'an average month', locale);
  const noun = inSentence(metric.label);
  let caption: string;
  if (audience === 'analysts') {
    const idx = (m: number) => {
      const p = byMonth(m);
      const range = p.min !== null && p.max !== null && s.rangeFromYear !== null ? `, range ${formatIndex(p.min, locale)}–${formatIndex(p.max, locale)}` : '';
      return `${name(m)} ${formatIndex(p.index, locale)}${range}`;
    };
    const rangeYears = s.rangeFromYear !== null && s.rangeToYear !== null ? ` (ranges over ${s.rangeFromYear}–${s.rangeToYear})` : '';
    const counts = years > 0 ? ` Top-two and bottom-two counts are by raw monthly value over the full calendar years ${s.fullYears.join(', ')}: ${name(q0)} and ${name(q1)} were in the bottom two in ${Math.min(byMonth(q0).bottomTwoIn, byMonth(q1).bottomTwoIn)} of ${years}.` : '';
    caption = `Classical multiplicative decomposition (2×12 centred moving average) of ${formatPeriod(s.firstPeriod, 'month', locale, 'long')} to ${formatPeriod(s.lastPeriod, 'month', locale, 'long')}${rangeYears}: ${idx(b0)}; ${idx(b1)}; ${idx(q0)}; ${idx(q1)}.${counts}`;
  } else if (audience === 'managers') {
    // "run about 66% and 61% above an average month"; the quiet pair says "below" alone after it.
    const pair = (a: number, b: number, basis: string) => {
      const [x, y] = [byMonth(a), byMonth(b)];
      if (sideOf(x.index) === 0 && sideOf(y.index) === 0) return 'about the same as an average month';
      return sideOf(x.index) === sideOf(y.index)
        ? `about ${rel(x)} and ${rel(y)} ${sideWord(x.index, basis).trim()}`
        : `${against(x)} and ${against(y)} respectively`;
    };
    caption = `${name(b0)} (index ${formatIndex(byMonth(b0).index, locale)}) and ${name(b1)} (${formatIndex(byMonth(b1).index, locale)}) run ${pair(b0, b1, 'an average month')}; ${name(q0)} (${formatIndex(byMonth(q0).index, locale)}) and ${name(q1)} (${formatIndex(byMonth(q1).index, locale)}) are the ${busyWords(metric, additive) ? 'quietest' : 'lowest'}, ${pair(q0, q1, '')}.`;
  } else {
    const band = (a: number, b: number, basis: string) => {
      const [x, y] = [byMonth(a), byMonth(b)];
      if (sideOf(x.index) !== sideOf(y.index)) return `${against(x)} and ${against(y)} respectively`;
      const [lo, hi] = [Math.abs(x.index - 1), Math.abs(y.index - 1)].sort((u, v) => u - v).map((v) => formatRelativeSize(v, locale));
      const size = lo === hi ? hi! : `${lo!.replace(/\s*%/, '')}–${hi}`;
      return sideOf(x.index) === 0 ? 'about the same as an average month' : `about ${size} ${sideWord(x.index, basis).trim()}`;
    };
    caption = `${monthPair(b0, b1, locale)} are ${band(b0, b1, 'an average month')} for ${noun}; ${monthPair(q0, q1, locale)} ${band(q0, q1, '')}.`;
  }
  const perDay = s.perDay ? ` ${perDaySentence(metric, s.perDay, locale)}${totalsAside(s, s.perDay, locale)}` : '';
  return { title, caption: `${caption}${perDay}${weekday ? ` ${weekday}` : ''}` };
}

/**
 * Month-of-year totals rank months by their length as much as by their pace; per day they can
 * swap. Names the busiest and quietest per day and every month that moves up per day, with the
 * months it passes.
 */
export function perDaySentence(metric: Metric, p: MonthTotalsPerDay, locale: string): string {
  const fmt = valueFormatOf(metric, locale);
  const name = (m: number) => monthName(m, locale);
  const perDay = (m: number) => `${formatValue(p.perDay[m - 1]!, fmt, { rate: true })} a day`;
  const [top, bottom] = [p.byDay[0]!, p.byDay[p.byDay.length - 1]!];
  const [high, low] = busyWords(metric, true) ? ['busiest', 'quietest'] : ['highest', 'lowest'];
  const lead = `Per day (months differ in length), the ${high} month is ${name(top)} (${perDay(top)}) and the ${low} ${name(bottom)} (${perDay(bottom)})`;
  if (p.swaps.length === 0) return `${lead}, the same order as by total.`;
  const passes = new Map<number, number[]>();
  for (const [up, down] of p.swaps) passes.set(up, [...(passes.get(up) ?? []), down]);
  const moves = [...passes].sort((a, b) => b[1].length - a[1].length || p.byDay.indexOf(a[0]) - p.byDay.indexOf(b[0]));
  const shown = moves.slice(0, 3).map(([up, downs], i) => `${name(up)} ${i === 0 ? 'moves ' : ''}above ${listJoin(downs.sort((a, b) => a - b).map(name))}`);
  const more = moves.length > 3 ? `; ${moves.length - 3} more ${moves.length - 3 === 1 ? 'month moves' : 'months move'} up` : '';
  return `${lead}; against the order by total, ${shown.join('; ')}${more}.`;
}

/**
 * The title and the index rank months after taking out the trend; the per-day sentence ranks raw
 * totals over the full years. With a steep trend or a few large months (rare events: fog days)
 * the two orders can differ at the top or the bottom; then the caption says so, so the title and
 * "the same order as by total" do not read as a contradiction.
 */
function totalsAside(s: TrendSeasonalityFinding, p: MonthTotalsPerDay, locale: string): string {
  const same = (a: readonly number[], b: readonly number[]) => new Set([...a, ...b]).size === 2;
  const topTotal = [p.byTotal[0]!, p.byTotal[1]!];
  const bottomTotal = [p.byTotal[p.byTotal.length - 1]!, p.byTotal[p.byTotal.length - 2]!];
  const topDiffers = !same(topTotal, s.busiest);
  const bottomDiffers = !same(bottomTotal, s.quietest);
  if (!topDiffers && !bottomDiffers) return '';
  const years = s.fullYears.length === 1 ? `${s.fullYears[0]}` : `${s.fullYears[0]}–${s.fullYears[s.fullYears.length - 1]}`;
  const parts = [
    ...(topDiffers ? [`${monthPair(topTotal[0]!, topTotal[1]!, locale)} have the largest totals`] : []),
    ...(bottomDiffers ? [`${monthPair(bottomTotal[0]!, bottomTotal[1]!, locale)} the smallest`] : []),
  ];
  return ` By total over the full ${s.fullYears.length === 1 ? 'year' : 'years'} ${years}, ${parts.join(' and ')}; the index takes out the change across the years and weighs each year alike, so it ranks ${[
    ...(topDiffers ? [`${monthPair(s.busiest[0], s.busiest[1], locale)} first`] : []),
    ...(bottomDiffers ? [`${monthPair(s.quietest[0], s.quietest[1], locale)} last`] : []),
  ].join(' and ')}.`;
}

/**
 * A level's seasonal pattern is a swing in its own units around the yearly mean (additive
 * decomposition): "May runs +3.1 ppm above the yearly mean", never a percentage index.
 */
function levelSeasonCaption(metric: Metric, s: TrendSeasonalityFinding, audience: Audience, locale: string): string {
  const fmt = valueFormatOf(metric, locale);
  const signed = (v: number) => formatUnitChange(v, fmt, { compact: true, signed: true });
  const name = (m: number) => monthName(m, locale);
  const byMonth = (m: number) => s.months[m - 1]!;
  const [b0, b1] = s.busiest;
  const [q0, q1] = s.quietest;
  const side = (v: number) => (v >= 0 ? 'above' : 'below');
  const swing = formatUnitChange(s.swing ?? byMonth(b0).index - byMonth(q0).index, fmt, { compact: true });
  if (audience === 'analysts') {
    const idx = (m: number) => {
      const p = byMonth(m);
      const range = p.min !== null && p.max !== null && s.rangeFromYear !== null ? `, range ${signed(p.min)} to ${signed(p.max)}` : '';
      return `${name(m)} ${signed(p.index)}${range}`;
    };
    const rangeYears = s.rangeFromYear !== null && s.rangeToYear !== null ? ` (ranges over ${s.rangeFromYear}–${s.rangeToYear})` : '';
    return `Classical additive decomposition (2×12 centred moving average) of ${formatPeriod(s.firstPeriod, 'month', locale, 'long')} to ${formatPeriod(s.lastPeriod, 'month', locale, 'long')}${rangeYears}, deviations from the trend: ${idx(b0)}; ${idx(b1)}; ${idx(q0)}; ${idx(q1)}; ${swing} from the highest month to the lowest.`;
  }
  const at = (m: number) => `${signed(byMonth(m).index)} ${side(byMonth(m).index)} the yearly mean in ${name(m)}`;
  if (audience === 'managers') {
    return `${labelAtStart(metric.label)} runs ${at(b0)} and ${signed(byMonth(b1).index)} in ${name(b1)}; ${signed(byMonth(q0).index)} in ${name(q0)} and ${signed(byMonth(q1).index)} in ${name(q1)} are the lowest: a swing of ${swing} within the year.`;
  }
  return `${monthPair(b0, b1, locale)} are the highest months for ${inSentence(metric.label)} (${at(b0)}), ${monthPair(q0, q1, locale)} the lowest (${signed(byMonth(q0).index)} in ${name(q0)}).`;
}

/**
 * How far a day sits from the average weekday: its index (1.08 is 8% above) where percentages of
 * the metric apply, else its difference in units or points (TrendWeekdayFinding.inUnits).
 */
interface DayGap {
  isoDay: number;
  /** Index minus one, or the difference in units: above zero is above the average. */
  gap: number;
  /** "about 8.1% above the average weekday", "2.10 min above the average weekday". */
  text: (basis: string) => string;
}

function dayGaps(metric: Metric, w: TrendWeekdayFinding, locale: string): DayGap[] {
  if (!w.inUnits) {
    return w.days.flatMap((d) => (d.index === null ? [] : [{ isoDay: d.isoDay, gap: d.index - 1, text: (basis: string) => besideAverage(d.index!, basis, locale) }]));
  }
  const fmt = valueFormatOf(metric, locale);
  return w.days.flatMap((d) => {
    const v = d.deviation ?? null;
    if (v === null) return [];
    const size = formatUnitChange(Math.abs(v), fmt, { compact: true });
    const zero = formatUnitChange(0, fmt, { compact: true });
    return [{ isoDay: d.isoDay, gap: size === zero ? 0 : v, text: (basis: string) => (size === zero ? `about the same as ${basis}` : `${size} ${v > 0 ? 'above' : 'below'} ${basis}`.trim()) }];
  });
}

/** The days of the week with a distance from the average, and the highest and lowest of them (null when fewer than two differ). */
function weekdayEnds(metric: Metric, w: TrendWeekdayFinding, locale: string) {
  const days = dayGaps(metric, w, locale);
  if (days.length < 2) return null;
  let hi = days[0]!;
  let lo = days[0]!;
  for (const d of days) {
    if (d.gap > hi.gap) hi = d;
    if (d.gap < lo.gap) lo = d;
  }
  return hi.gap === lo.gap ? null : { days, hi, lo };
}

/**
 * The headline of a question about the days of the week: the busiest (or highest) day, with its
 * distance from the average; days that print the same are named together as a tie.
 */
function weekdayTitle(metric: Metric, w: TrendWeekdayFinding, additive: boolean, locale: string): string | null {
  const ends = weekdayEnds(metric, w, locale);
  if (!ends) return null;
  const { days, hi } = ends;
  const printed = (d: DayGap) => d.text(additive ? 'an average day' : 'the average weekday');
  const top = days.filter((d) => printed(d) === printed(hi));
  const names = listJoin(top.map((d) => weekdayName(d.isoDay, locale)));
  if (busyWords(metric, additive)) return top.length > 1 ? `${names} tie as the busiest days of the week (${printed(hi)})` : `${names} is the busiest day of the week (${printed(hi)})`;
  return `${labelAtStart(metric.label)} ${verbFor(metric.label)} highest on ${names} (${printed(hi)})`;
}

function weekdaySentence(metric: Metric, w: TrendWeekdayFinding, additive: boolean, audience: Audience, locale: string): string {
  const ends = weekdayEnds(metric, w, locale);
  if (!ends) return '';
  const { days, hi, lo } = ends;
  const day = (n: number) => weekdayName(n, locale);
  const basis = additive ? 'an average day' : 'the average weekday';
  if (audience === 'analysts') {
    if (w.inUnits) {
      const fmt = valueFormatOf(metric, locale);
      const list = w.days.map((d) => `${day(d.isoDay).slice(0, 3)} ${formatUnitChange(d.deviation ?? null, fmt, { compact: true, signed: true })}`).join(', ');
      return `Weekday differences from the mean of the seven (${additive ? 'per-day level' : 'level'}): ${list}.`;
    }
    const list = w.days.map((d) => `${day(d.isoDay).slice(0, 3)} ${formatIndex(d.index, locale)}`).join(', ');
    return `Weekday indices (${additive ? 'per-day level' : 'level'} against the mean of the seven): ${list}.`;
  }
  // Days whose distances print the same are named together as a tie.
  const printed = (d: DayGap) => d.text(basis);
  const tied = (end: DayGap) => days.filter((d) => printed(d) === printed(end));
  const names = (group: DayGap[]) => listJoin(group.map((d) => day(d.isoDay)));
  if (printed(hi) === printed(lo)) return `By day of week, every day is ${printed(hi)}.`;
  const [top, bottom] = [tied(hi), tied(lo)];
  const highWord = busyWords(metric, additive) ? 'busiest' : 'highest';
  const lowWord = busyWords(metric, additive) ? 'quietest' : 'lowest';
  const high = top.length > 1 ? `${names(top)} tie as the ${highWord} (${printed(hi)})` : `${day(hi.isoDay)} is the ${highWord} (${printed(hi)})`;
  // The basis is said once, after the first figure: "(about 8.1% below)".
  const lowText = lo.gap === 0 ? printed(lo) : lo.text('').trim();
  const low = bottom.length > 1 ? `${names(bottom)} tie as the ${lowWord} (${lowText})` : `${day(lo.isoDay)} the ${lowWord} (${lowText})`;
  return `By day of week, ${high} and ${low}.`;
}

/** Which side of the average an index falls, as printed (within half a tenth of a percent is "the same"). */
function sideOf(index: number): -1 | 0 | 1 {
  return Math.abs(index - 1) < 0.0005 ? 0 : index > 1 ? 1 : -1;
}

function sideWord(index: number, basis: string): string {
  const side = sideOf(index);
  return side === 0 ? `the same as ${basis}` : `${side > 0 ? 'above' : 'below'} ${basis}`;
}

/** A seasonal index against its average: 1.27 is "about 27% above", 0.97 "about 3.0% below". */
function besideAverage(index: number, basis: string, locale: string): string {
  return sideOf(index) === 0 ? `about the same as ${basis}` : `about ${formatRelativeSize(index - 1, locale)} ${sideWord(index, basis)}`;
}
