// Title and caption for a growth_summary answer: the range, centre and spread of the growth rates.
import { countOf, labelAtStart, possessive } from './grammar.js';
import type { Metric } from '../../config/schema.js';
import type { GrowthRateSummaryFinding } from '../findings/growth.js';
import { formatChange, formatUnitChange, formatValue, valueFormatOf } from '../format.js';
import type { Audience } from '../types.js';
import type { GrowthWords } from './growth-series-caption.js';
import { formatPoints, lower, periodText, plural } from './growth-words.js';

export function rateBasisText(f: GrowthRateSummaryFinding): string {
  return f.basis === 'yoy' ? (f.grain === 'year' ? 'on the year before' : `on the same ${f.grain} a year earlier`) : `on the ${f.grain} before`;
}

export function growthSummaryWords(metric: Metric, f: GrowthRateSummaryFinding | undefined, locale: string, audience: Audience): GrowthWords {
  const label = labelAtStart(metric.label);
  if (!f || f.n === 0 || f.min === null || f.max === null) {
    return {
      title: `${label}: no growth rates to summarise`,
      caption: `There are not two comparable complete periods of ${lower(label)} in this window.`,
    };
  }
  const when = (iso: string) => periodText(iso, f.grain, locale);
  const basis = rateBasisText(f);
  // A level's changes are in its units ("+2.5 ppm"); a flow's and a ratio's are relative.
  const units = f.measure === 'units';
  const fmt = valueFormatOf(metric, locale);
  const pct = (v: number | null) => (units ? formatUnitChange(v, fmt, { compact: true, signed: true }) : formatChange(v, locale));
  const spread = (sd: number) => (units ? formatUnitChange(sd, fmt, { compact: true }) : formatPoints(sd, locale).replace(/^\+/, ''));
  const growth = units ? 'change' : 'growth';
  const title =
    f.n === 1
      ? `${label} changed ${pct(f.min.value)} ${basis} in ${when(f.min.period)}`
      : `${possessive(label)} ${growth} ${basis} ranged from ${pct(f.min.value)} (${when(f.min.period)}) to ${pct(f.max.value)} (${when(f.max.period)})`;
  const count = countOf(f.n, f.grain);
  let caption: string;
  if (audience === 'leadership') {
    caption = `Across ${count}, the typical change ${basis} was ${pct(f.median)}.`;
  } else if (audience === 'managers') {
    // The middle value and middle half, not the mean and SD: one small base can blow a mean of rates up.
    caption =
      `Across ${count}, ${growth} ${basis} had a middle value of ${pct(f.median)}` +
      (f.quartiles && f.n >= 4 ? `; half of the ${plural(f.grain, f.n)} lay between ${pct(f.quartiles.lower)} and ${pct(f.quartiles.upper)}.` : '.');
  } else {
    const basisName = `${f.basis === 'yoy' ? 'year-over-year' : 'period-over-period'}${units ? ' changes' : ''}`;
    caption =
      `${f.n} ${basisName}${units ? '' : ' rates'}: median ${pct(f.median)}, mean ${pct(f.mean)}` +
      (f.sd !== null ? `, sample SD ${spread(f.sd)}` : '') +
      `; min ${pct(f.min.value)} (${when(f.min.period)}), max ${pct(f.max.value)} (${when(f.max.period)}).`;
  }
  return { title, caption };
}
