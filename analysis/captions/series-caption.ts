// Title and caption for a series answer, written only from its findings.
import { inPeriod, inSentence, labelAtStart, verbFor } from './grammar.js';
import type { Metric } from '../../config/schema.js';
import { formatPeriod, formatValue, valueFormatOf } from '../format.js';
import type { Finding, Grain } from '../types.js';

export interface SeriesWords {
  title: string;
  caption: string;
}

type Point = { period: string; value: number };

/**
 * `lowFirst`: the request asked for the low end ("the coldest month on record", "the quietest
 * week"), so the lowest period leads and the highest follows.
 */
export function seriesWords(metric: Metric, grain: Grain, findings: Finding[], locale: string, lowFirst = false): SeriesWords {
  const fmt = valueFormatOf(metric, locale);
  const peak = findings.find((f): f is Extract<Finding, { type: 'peak' }> => f.type === 'peak' && f.metric === metric.name);
  const trough = findings.find((f): f is Extract<Finding, { type: 'trough' }> => f.type === 'trough' && f.metric === metric.name);
  // "Orders per day": each point is its period's total over its days, said in the label and the values.
  const perDay = findings.some((f) => f.type === 'series' && f.metric === metric.name && f.perDay === true);
  const label = perDay ? `${metric.label} per day` : metric.label;
  const value = (p: Point) => formatValue(p.value, fmt, perDay ? { rate: true } : { compact: true });
  const when = (p: Point) => formatPeriod(p.period, grain, locale, 'long');
  if (!peak || !trough) {
    return { title: `${labelAtStart(label)}: no complete ${grainNoun(grain)} to compare`, caption: `There is no complete ${grainNoun(grain)} of ${inSentence(metric.label)} in this period.` };
  }
  const basis = perDay ? ` Each ${grainNoun(grain)}'s total is divided by its days (the days of it the period and the data cover).` : '';
  // One complete period is no peak: a partial one beside it may be drawn higher (issue 17 item 9).
  const only = `${labelAtStart(label)} ${verbFor(label, 'was')} ${value(peak)} ${inPeriod(peak.period, grain, locale)}, the only complete ${grainNoun(grain)}`;
  if (peak.period !== trough.period && lowFirst) {
    const low = `${labelAtStart(label)} ${verbFor(label, 'was')} lowest ${inPeriod(trough.period, grain, locale)}, at ${value(trough)}`;
    return { title: low, caption: `${low}; its highest ${grainNoun(grain)} was ${grain === 'week' ? 'the ' : ''}${when(peak)} at ${value(peak)}.${basis}` };
  }
  const title = peak.period === trough.period ? only : `${labelAtStart(label)} peaked ${inPeriod(peak.period, grain, locale)} at ${value(peak)}`;
  const caption =
    peak.period === trough.period
      ? `${only}.${basis}`
      : `${labelAtStart(label)} peaked ${inPeriod(peak.period, grain, locale)} at ${value(peak)}; its lowest ${grainNoun(grain)} was ${grain === 'week' ? 'the ' : ''}${when(trough)} at ${value(trough)}.${basis}`;
  return { title, caption };
}

export function grainNoun(grain: Grain): string {
  return grain;
}
