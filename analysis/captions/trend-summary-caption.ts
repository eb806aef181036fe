// Title and caption for summary statistics over a series' complete periods, from findings only.
import type { Metric } from '../../config/schema.js';
import type { TrendOutlierFinding, TrendSummaryFinding } from '../findings/segments.js';
import { quantityKind } from '../catalog.js';
import { formatPeriod, formatValue, valueFormatOf } from '../format.js';
import { MODIFIED_Z_THRESHOLD } from '../stats/index.js';
import type { Audience, Finding, Grain } from '../types.js';
import { inSentence, isPluralLabel, labelAtStart } from './grammar.js';
import type { Words } from './trend-test-caption.js';
import { formatIndex, grainNoun } from './trend-words.js';

// A caption names a handful of unusual periods; a list of eighty is not read (a long history of sparse data).
const MOST_OUTLIERS_SAID = 5;

/** The outliers furthest from the median (largest |modified z|), in time order. */
function mostExtreme(outliers: readonly TrendOutlierFinding[]): TrendOutlierFinding[] {
  return [...outliers]
    .sort((a, b) => Math.abs(b.score) - Math.abs(a.score))
    .slice(0, MOST_OUTLIERS_SAID)
    .sort((a, b) => a.period.localeCompare(b.period));
}

export function trendSummaryWords(metric: Metric, grain: Grain, findings: readonly Finding[], audience: Audience, locale: string, rowsLabel?: string): Words {
  const s = findings.find((f): f is TrendSummaryFinding => f.type === 'trend_summary' && f.metric === metric.name);
  const outliers = findings.filter((f): f is TrendOutlierFinding => f.type === 'trend_outlier' && f.metric === metric.name);
  const fmt = valueFormatOf(metric, locale);
  const v = (x: number | null) => formatValue(x, fmt, { compact: true });
  const when = (p: string) => formatPeriod(p, grain, locale, 'long');
  if (!s) {
    return {
      title: `${labelAtStart(metric.label)}: no complete ${grainNoun(grain)} to summarise`,
      caption: `There is no complete ${grainNoun(grain)} of ${inSentence(metric.label)} with a value in this period.`,
    };
  }
  const per = grainNoun(grain);
  // Only a flow adds up to "a month"; a level or a ratio is a reading: "averaged 355 ppm".
  const perGrain = quantityKind(metric) === 'flow' ? ` a ${per}` : '';
  if (s.n === 1) {
    return {
      title: `${labelAtStart(metric.label)} ${isPluralLabel(metric.label) ? 'were' : 'was'} ${v(s.mean)} in ${when(s.minPeriod)}`,
      caption: `Only one complete ${per} is available (${when(s.minPeriod)}: ${v(s.mean)}), so there is no spread to describe.`,
    };
  }
  // An average over a span is the span's own ratio (its rows' sum over their count), never the mean
  // of the periods' averages, which weights a quiet week like a busy one (January's delay per
  // flight, not the mean of four weekly means). The periods' mean stays for a flow, and for a
  // level, a reading averaged over time.
  // A rate or ratio over the span is its numerator's sum over its denominator's (s.pooled), an
  // average of a column its rows' mean (s.rows).
  const r = s.rows;
  const spanOwn = s.pooled ?? r?.mean;
  const ownRatio = quantityKind(metric) === 'ratio' && spanOwn !== undefined;
  const own = ownRatio ? spanOwn : s.mean;
  const spread = ownRatio ? `${grainNoun(grain, 2)} from ${v(s.min)} to ${v(s.max)}` : `from ${v(s.min)} to ${v(s.max)}`;
  const title = `${labelAtStart(metric.label)} averaged ${v(own)}${perGrain}, ${spread}`;
  const range = `from ${v(s.min)} (${when(s.minPeriod)}) to ${v(s.max)} (${when(s.maxPeriod)})`;
  // After the cycle and trend (quality/series-outliers.ts) a period is weighed against what its time of
  // year would give, and the caption says so: "28 °C where about 22 °C was usual", not just "stands out".
  const seasonal = (o: TrendOutlierFinding) => (o.rule === 'seasonal' || o.rule === 'seasonal_and_values') && o.expected !== undefined;
  const outlierText = (o: TrendOutlierFinding) =>
    `${when(o.period)} (${v(o.value)}${seasonal(o) ? ` where about ${v(o.expected!)} was usual` : ''}${audience === 'analysts' ? `, modified z = ${formatIndex(o.score, locale)}` : ''})`;
  const cyclePattern = grain === 'day' ? 'weekly' : 'yearly';
  const fromWhat = outliers.some(seasonal) ? ` once the usual ${cyclePattern} pattern and the trend are taken out` : ' from the rest';
  const stand =
    outliers.length === 0
      ? audience === 'analysts'
        ? ` No ${per} has |modified z| above ${formatValue(MODIFIED_Z_THRESHOLD, { unit: 'number', decimals: 1, locale })} (Iglewicz–Hoaglin).`
        : ''
      : ` ${outliers.length === 1 ? 'One' : String(outliers.length)} ${grainNoun(grain, outliers.length)} ${outliers.length === 1 ? 'stands' : 'stand'} out${fromWhat}${
          outliers.length > MOST_OUTLIERS_SAID ? `; the ${MOST_OUTLIERS_SAID} furthest out: ${mostExtreme(outliers).map(outlierText).join(', ')}` : `: ${outliers.map(outlierText).join(', ')}`
        }.`;
  // The statistics above are of the periods' values; an average's own rows are said apart, so a
  // median of weekly averages is never read as the median per flight.
  const rowsLine = r
    ? ` Across the ${formatValue(r.n, { unit: 'count', locale })} ${rowsLabel ? inSentence(rowsLabel) : 'rows with a value'} themselves: mean ${v(r.mean)}, median ${v(r.median)}.`
    : '';
  const ofPeriods = quantityKind(metric) === 'flow' ? '' : ` of the ${grainNoun(grain, 2)}' values`;
  let caption: string;
  if (audience === 'analysts') {
    const mode = s.mode === null ? 'no repeated value' : `mode ${v(s.mode)} (${s.modeCount} times)`;
    caption = `Over ${s.n} complete ${grainNoun(grain, s.n)}${ofPeriods}: mean ${v(s.mean)}, median ${v(s.median)}, standard deviation ${v(s.sd)}, ${mode}; ${range}.${stand}${rowsLine}`;
  } else if (audience === 'managers') {
    caption = !ownRatio
        ? `Over ${s.n} complete ${grainNoun(grain, s.n)}, ${inSentence(metric.label)} averaged ${v(s.mean)}${perGrain} (median${quantityKind(metric) === 'flow' ? '' : ` ${per}`} ${v(s.median)}), ${range}.${stand}${rowsLine}`
        : `The ${s.n} complete ${grainNoun(grain, s.n)}' values ran ${range} (median ${per} ${v(s.median)}).${stand}${rowsLine}`;
  } else {
    caption = `In a typical ${per}, ${inSentence(metric.label)} ${isPluralLabel(metric.label) ? 'are' : 'is'} about ${v(s.median)}; the range runs ${range}.${stand}${rowsLine}`;
  }
  return { title, caption };
}
