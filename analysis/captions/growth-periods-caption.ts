// Title and caption for a growth_periods answer: the metric over each of the two periods the
// request named, the change between them, and what each figure is (a total, a mean reading).
import type { Metric } from '../../config/schema.js';
import { isLevelSum, quantityKind } from '../catalog.js';
import type { GrowthPeriodsFinding } from '../findings/growth.js';
import { formatChange } from '../format.js';
import { labelAtStart } from './grammar.js';
import { perDaySentence, totalVerb } from './growth-drivers-caption.js';
import type { GrowthWords } from './growth-series-caption.js';
import { lower, spanText, valueText } from './growth-words.js';
import { perDayMetric } from './metric-words.js';

export function growthPeriodsWords(asked: Metric, f: GrowthPeriodsFinding | undefined, locale: string): GrowthWords {
  // Asked per day: the figures are daily averages, said as "Flights per day".
  const metric = f?.perDay ? perDayMetric(asked) : asked;
  const label = labelAtStart(metric.label);
  if (!f) return { title: `${label}: no data in either period`, caption: `There is no ${lower(label)} in either period to compare.` };
  const money = (v: number | null, signed = false) => valueText(v, metric, locale, signed);
  const [now, then] = [spanText(f.current, locale), spanText(f.prior, locale)];
  const { before, after, change, relative } = f.total;
  // Without a figure for the earlier period (the data starts after it), the later one alone.
  const title = before === null ? `${label}: ${money(after)} in ${now}` : after === null ? `${label}: ${money(before)} in ${then}, nothing in ${now}` : `${label}: ${money(after)} in ${now} against ${money(before)} in ${then}`;
  // A rate or share moves in points; a signed total (jobs added, below zero in a downturn) by its change alone.
  const move =
    change === null
      ? after === null
        ? `${label} was ${money(before)} in ${then}; ${now} has no data.`
        : `${label} was ${money(after)} in ${now}; ${then} has no figure to compare with.`
      : metric.unit === 'percent'
        ? `${label} ${change === 0 ? 'held flat' : `${change > 0 ? 'rose' : 'fell'} ${money(Math.abs(change), true).replace(/^\+/, '')}`} from ${then} to ${now}: ${money(before)} to ${money(after)}.`
        : relative !== null && Number.isFinite(relative)
          ? `${label} ${totalVerb(relative, locale)} from ${then} to ${now}: ${money(before)} to ${money(after)} (${money(change, true)}${totalVerb(relative, locale) === 'held flat' ? `, ${formatChange(relative, locale)}` : ''}).`
          : `${label} went from ${money(before)} in ${then} to ${money(after)} in ${now}, a change of ${money(change, true)}.`;
  const sentences = f.perDay ? [move] : [move, figureIs(metric)];
  const perDay = perDaySentence(f, label, asked, locale);
  if (perDay) sentences.push(perDay);
  return { title, caption: sentences.join(' ') };
}

/** What each period's figure is, from how the metric adds up over time. */
function figureIs(metric: Metric): string {
  switch (quantityKind(metric)) {
    case 'flow':
      return 'Each figure is the period\'s total.';
    case 'level':
      // A headcount summed across rows (industries) is totalled at each date, then averaged.
      return isLevelSum(metric)
        ? 'Each figure is the average over the period of the total at each date (a level does not add up over time).'
        : 'Each figure is the period\'s average reading (a level does not add up over time).';
    default:
      return 'Each figure is over the whole period\'s rows.';
  }
}
