// Title and caption for a level's growth_series answer (a reading such as a concentration): its
// change is told in the metric's own units (a year on the year before, a year's rate by Sen's
// slope, decade by decade), never as a compound percentage. Written only from findings.
import { metricDirection } from '../catalog.js';
import type { Metric } from '../../config/schema.js';
import { formatPeriod, formatUnitChange, formatValue, valueFormatOf } from '../format.js';
import type { Audience, Grain } from '../types.js';
import type { GrowthSeriesFindings, GrowthWords } from './growth-series-caption.js';
import type { Verdict } from './verdict-words.js';
import { latestComplete } from './growth-series-caption.js';
import { labelAtStart } from './grammar.js';
import { lower, periodText, yearText } from './growth-words.js';

export function levelGrowthWords(metric: Metric, grain: Grain, f: GrowthSeriesFindings, locale: string, audience: Audience): GrowthWords {
  const fmt = valueFormatOf(metric, locale);
  const v = (x: number) => formatValue(x, fmt, { compact: true });
  const d = (x: number) => formatUnitChange(x, fmt, { compact: true, signed: true });
  const label = labelAtStart(metric.label);
  const complete = (f.years?.years ?? []).filter((y) => y.complete && y.value !== null);
  // A change on the year before only between two complete years in a row.
  const changes = complete.slice(1).flatMap((y, i) => {
    const prev = complete[i]!;
    return Number(y.year.slice(0, 4)) - Number(prev.year.slice(0, 4)) === 1 ? [{ year: y.year, value: y.value!, change: y.value! - prev.value! }] : [];
  });
  const recent = changes.slice(-2);
  const ytd = f.ytd && f.ytd.absolute !== null && f.ytd.current.value !== null ? f.ytd : undefined;
  const latest = latestComplete(f.series);
  const lag = f.series?.yoyLag ?? null;
  const yearEarlier = latest && lag !== null && f.series ? f.series.points[f.series.points.indexOf(latest) - lag] : undefined;
  const latestChange = latest && yearEarlier && !yearEarlier.partial && yearEarlier.value !== null ? latest.value! - yearEarlier.value : null;
  // Without a year-earlier period (days, or under a year of data), the latest complete period against the one before.
  const before = latest && f.series ? f.series.points[f.series.points.indexOf(latest) - 1] : undefined;
  const latestStep = latestChange === null && latest && before && !before.partial && before.value !== null ? latest.value! - before.value : null;

  let title: string;
  if (recent.length > 0) {
    title = `${label}: ${recent.map((r, i) => `${i > 0 ? 'then ' : ''}${d(r.change)} in ${yearText(r.year, locale)}`).join(', ')}`;
    if (ytd) title += `; ${yearText(ytd.current.year, locale)} so far: ${d(ytd.absolute!)}`;
  } else if (ytd) {
    title = `${label} so far in ${yearText(ytd.current.year, locale)}: ${d(ytd.absolute!)} on the same dates of ${yearText(ytd.prior.year, locale)}`;
  } else if (latest && latestChange !== null) {
    title = `${label} in ${periodText(latest.period, grain, locale, 'long')}: ${d(latestChange)} on a year earlier`;
  } else if (latest && latestStep !== null) {
    title = `${label} in ${periodText(latest.period, grain, locale, 'long')}: ${d(latestStep)} on the ${grain} before`;
  } else {
    return {
      title: `${label}: not enough complete periods to measure its change`,
      caption: `There are not two comparable complete periods of ${lower(label)} in this window, so no change can be given.`,
    };
  }

  const sentences: string[] = [];
  if (ytd) {
    sentences.push(`Year to date (to ${formatPeriod(ytd.through, 'day', locale, 'long')}), ${lower(label)} averaged ${v(ytd.current.value!)}, ${d(ytd.absolute!)} on the same dates of ${yearText(ytd.prior.year, locale)} (${v(ytd.prior.value!)}).`);
  }
  if (recent.length > 0) sentences.push(`${recent.map((r) => `${yearText(r.year, locale)}: ${v(r.value)}, ${d(r.change)} on the year before`).join('; ')}.`);
  const rate = f.level;
  if (rate) {
    const span = Number(rate.to.slice(0, 4)) - Number(rate.from.slice(0, 4));
    // A rate per decade from under ten years would be an extrapolation.
    const decade = span >= 10 ? ` (${v(Math.abs(rate.perYear) * 10)} a decade)` : '';
    const verb = rate.perYear > 0 ? 'rose' : rate.perYear < 0 ? 'fell' : 'changed';
    const method = audience === 'analysts' ? ' (Sen’s slope of the yearly values)' : '';
    sentences.push(`From ${yearText(rate.from, locale)} to ${yearText(rate.to, locale)} it ${verb} about ${d(Math.abs(rate.perYear)).replace(/^\+/, "")} a year${decade}${method}.`);
    if (rate.byDecade.length >= 2) sentences.push(`Decade by decade, the change a year was ${rate.byDecade.map((x) => `${d(x.perYear)} in the ${x.decade}s`).join(', ')}.`);
  }
  if (latest && latestChange !== null) sentences.push(`Latest complete ${grain}, ${periodText(latest.period, grain, locale, 'long')}: ${d(latestChange)} on a year earlier.`);
  else if (latest && latestStep !== null) sentences.push(`Latest complete ${grain}, ${periodText(latest.period, grain, locale, 'long')}: ${v(latest.value!)}, ${d(latestStep)} on the ${grain} before (${v(before!.value!)}).`);
  return { title, caption: sentences.join(' ') };
}

/** The latest year so far (else the latest complete year) against the year before, in units; "level" only when it prints as zero. */
export function levelGrowthVerdict(metric: Metric, f: GrowthSeriesFindings, locale: string): Verdict | null {
  const fmt = valueFormatOf(metric, locale);
  const d = (x: number) => formatUnitChange(x, fmt, { compact: true, signed: true });
  const direction = (x: number) => (/^[^1-9]*$/.test(formatValue(x, fmt, { compact: true })) ? 'level' : x > 0 ? 'up' : 'down');
  const label = lower(metric.label);
  if (f.ytd && f.ytd.absolute !== null) {
    return { direction: direction(f.ytd.absolute), higherIsBetter: metricDirection(metric), statement: `${label} so far in ${yearText(f.ytd.current.year, locale)} is ${d(f.ytd.absolute)} on the same dates of ${yearText(f.ytd.prior.year, locale)}` };
  }
  const complete = (f.years?.years ?? []).filter((y) => y.complete && y.value !== null);
  const [prev, last] = complete.slice(-2);
  if (!prev || !last || Number(last.year.slice(0, 4)) - Number(prev.year.slice(0, 4)) !== 1) return null;
  const change = last.value! - prev.value!;
  return { direction: direction(change), higherIsBetter: metricDirection(metric), statement: `${label} in ${yearText(last.year, locale)} was ${d(change)} on ${yearText(prev.year, locale)}` };
}
