// Title and caption for a growth_share_shift answer: whose share moved most, and whether the total
// became more or less concentrated.
import { configuredAs } from './metric-words.js';
import { addMonths } from '../periods.js';
import type { DatasetConfig, Metric } from '../../config/schema.js';
import type { GrowthShareSegment, GrowthShareShiftFinding } from '../findings/growth.js';
import { formatValue } from '../format.js';
import type { Audience } from '../types.js';
import { labelAtStart, possessive, verbFor } from './grammar.js';
import type { GrowthWords } from './growth-series-caption.js';
import { capitalise, dimensionLabel, formatPoints, formatShare, lower, plural, segmentText, spanText } from './growth-words.js';

/** HHI moves smaller than this (on the 0–10,000 scale) read as "about as concentrated" (a rule of thumb). */
const HHI_STEADY = 100;

/**
 * A largest share shift under a point (0.01 of share) is not a headline of its own: the
 * title says the shares held, and names the largest move beside. Our own line, not a published rule.
 */
export const SHARE_STEADY = 0.01;

export function growthShareShiftWords(
  metric: Metric,
  f: GrowthShareShiftFinding | undefined,
  dataset: DatasetConfig,
  locale: string,
  audience: Audience,
): GrowthWords {
  const label = labelAtStart(metric.label);
  if (!f) {
    const additive = metric.definition.type === 'sum' || metric.definition.type === 'count';
    return {
      title: `${label}: no shares to compare`,
      caption: additive
        ? `There is no ${lower(label)} in either span to share out.`
        : `${label} is set up in the config as ${configuredAs(metric, dataset).as}, not a sum or a count, so it has no shares of a total; compare segments with a breakdown instead.`,
    };
  }
  const name = (s: GrowthShareSegment) => segmentText(s.segment, f.dimension, dataset);
  const dimNoun = lower(dimensionLabel(f.dimension, dataset));
  const moved = [...f.segments].filter((s) => s.shareChange !== null).sort((a, b) => Math.abs(b.shareChange!) - Math.abs(a.shareChange!));
  const top = moved[0];
  const topMove = top ? `${possessive(capitalise(name(top)))} share of ${lower(label)} ${top.shareChange! > 0 ? 'rose' : 'fell'} ${formatPoints(Math.abs(top.shareChange!), locale).replace(/^\+/, '')} to ${formatShare(top.shareAfter, locale)}` : '';
  // A 0.4-point shift is no news: it is said as shares holding, with the largest move beside.
  const title =
    !top || top.shareChange === 0
      ? `Shares of ${lower(label)} by ${dimNoun} did not move`
      : Math.abs(top.shareChange!) < SHARE_STEADY
        ? `Shares of ${lower(label)} by ${dimNoun} moved less than a point: the largest move was ${possessive(name(top))}, ${top.shareChange! > 0 ? 'up' : 'down'} ${formatPoints(Math.abs(top.shareChange!), locale).replace(/^\+/, '')} to ${formatShare(top.shareAfter, locale)}`
        : topMove;
  const spans = `${spanText(f.current, locale)} against ${spanText(f.prior, locale)}`;
  // The base is a year earlier unless the request named another period ("2025 against 2023").
  const earlier = addMonths(f.current.start, -12) === f.prior.start ? 'a year earlier' : 'in the earlier period';
  const hhiText = (v: number | null) => formatValue(v, { unit: 'number', decimals: 0, locale });
  const pct = `${Math.round(f.threshold * 100)}%`;
  const hhiMove =
    f.before.hhi === null || f.after.hhi === null
      ? null
      : Math.abs(f.after.hhi - f.before.hhi) < HHI_STEADY
        ? 'about as concentrated as'
        : f.after.hhi > f.before.hhi
          ? 'more concentrated than'
          : 'less concentrated than';
  const sentences: string[] = [];
  const shifts = moved.slice(0, 3).map((s) => `${name(s)} ${formatShare(s.shareAfter, locale)} (${formatPoints(s.shareChange, locale)})`);
  if (audience === 'leadership') {
    if (hhiMove) sentences.push(`${capitalise(label)} by ${dimNoun} ${verbFor(label, 'was')} ${hhiMove} ${earlier} (${spans}).`);
    const n = f.after.countToThreshold;
    if (n !== null) sentences.push(n === 1 ? `The top ${dimNoun} carries ${pct} or more of it.` : `The top ${n} ${plural(dimNoun, n)} carry ${pct} or more of it.`);
  } else {
    sentences.push(`Shares, ${spans}: ${shifts.join('; ')}.`);
    const [now, then] = [f.after.countToThreshold, f.before.countToThreshold];
    // How many segments reach the threshold, now and before; a side that never reaches it is left unsaid, never "n/a".
    const reachText =
      now === null
        ? null
        : `${capitalise(String(now))} ${plural(dimNoun, now)} ${now === 1 ? 'reaches' : 'reach'} ${pct} of ${lower(label)} now${then === null ? '' : `, against ${then} ${earlier}`}`;
    const tail = audience === 'analysts' ? `HHI ${hhiText(f.before.hhi)} → ${hhiText(f.after.hhi)} (0–10,000 scale).` : hhiMove ? `overall it is ${hhiMove} before.` : '';
    if (reachText) sentences.push(tail ? `${reachText}; ${tail}` : `${reachText}.`);
    else if (tail) sentences.push(capitalise(tail));
  }
  return { title, caption: sentences.join(' ') };
}
