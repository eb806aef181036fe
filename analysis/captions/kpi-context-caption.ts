// Title and caption placing the latest complete period in its history, from the finding.
import type { DatasetConfig, Metric } from '../../config/schema.js';
import type { KpiContextFinding } from '../findings/kpi.js';
import { formatValue } from '../format.js';
import type { Audience } from '../types.js';
import type { KpiWords } from './kpi-snapshot-caption.js';
import { grainNoun, kpiValue, ordinal, periodName } from './kpi-words.js';
import { labelAtStart, verbFor } from './grammar.js';
import { meaningAside } from './metric-words.js';

export function kpiContextWords(f: KpiContextFinding, metric: Metric, ds: DatasetConfig, audience: Audience, locale: string): KpiWords {
  const when = periodName(f.period, f.grain, locale);
  const value = kpiValue(f.value, metric, locale);
  const since = periodName(f.firstPeriod, f.grain, locale);
  const periods = `${formatValue(f.n, { unit: 'count', locale })} complete ${grainNoun(f.grain, f.n)} since ${since}`;
  const place =
    f.n === 1
      ? `the only complete ${grainNoun(f.grain)} so far`
      : f.rank === 1
        ? `the highest of the ${periods}`
        : f.value <= f.min
          ? `the lowest of the ${periods}`
          : `the ${ordinal(f.rank)} highest of the ${periods}`;
  const title = `${labelAtStart(metric.label)} in ${when} ${verbFor(metric.label, 'was')} ${value}, ${place.replace(/ since .*$/, '')}`;

  const sentences: string[] = [];
  const meaning = meaningAside(metric, ds, audience);
  sentences.push(`${labelAtStart(metric.label)}${meaning} ${verbFor(metric.label, 'was')} ${value} in ${when}, ${place}.`);
  if (f.n > 1) {
    const range = `from ${kpiValue(f.min, metric, locale)} in ${periodName(f.minPeriod, f.grain, locale)} to ${kpiValue(f.max, metric, locale)} in ${periodName(f.maxPeriod, f.grain, locale)}`;
    if (audience === 'leadership') sentences.push(`A typical ${grainNoun(f.grain)} is about ${kpiValue(f.median, metric, locale)}.`);
    else sentences.push(`The typical (median) ${grainNoun(f.grain)} is ${kpiValue(f.median, metric, locale)}; the history runs ${range}.`);
  }
  // Judged by the series screen (quality/series-outliers.ts): against the season and trend when the history allows.
  const seasonal = (f.outlierRule === 'seasonal' || f.outlierRule === 'seasonal_and_values') && f.usual !== undefined;
  const usual = seasonal ? kpiValue(f.usual!, metric, locale) : '';
  const zText = f.robustZ === null ? '' : formatValue(f.robustZ, { unit: 'number', decimals: 1, locale });
  const ofWhat = seasonal ? ' of what is left after season and trend' : '';
  if (f.outlier && f.robustZ !== null) {
    const side = f.robustZ > 0 ? 'above' : 'below';
    if (audience === 'leadership') sentences.push(`That is far ${side} its usual level${seasonal ? ` for the time of year (about ${usual})` : ''}: treat it as exceptional, not as the new normal.`);
    else if (audience === 'managers') sentences.push(`That is far ${side} ${seasonal ? `the usual for the time of year (about ${usual})` : 'the usual range'}, an outlier: check what happened before reading it as a trend.`);
    else sentences.push(`It is an outlier: modified z-score ${zText}${ofWhat}${seasonal ? ` (usual about ${usual})` : ''} (Iglewicz–Hoaglin; |z| above 3.5 flags an outlier).`);
  } else if (f.robustZ !== null && audience === 'analysts') {
    sentences.push(`Modified z-score ${zText}${ofWhat}, inside the 3.5 outlier cut-off (Iglewicz–Hoaglin).`);
  }
  if (audience === 'analysts' && f.sd !== null) {
    sentences.push(`Mean ${kpiValue(f.mean, metric, locale)}, standard deviation ${kpiValue(f.sd, metric, locale)}; percentile ${formatValue(f.percentile, { unit: 'percent', decimals: 0, locale })} (share of ${grainNoun(f.grain, 2)} at or below the latest).`);
  }
  return { title: title.replace(/\s+/g, ' '), caption: sentences.join(' ') };
}

