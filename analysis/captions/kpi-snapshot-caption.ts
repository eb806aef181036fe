// Title and caption of a KPI snapshot, written only from its finding and the catalog.
import { metricDirection } from '../catalog.js';
import type { DatasetConfig, Metric } from '../../config/schema.js';
import type { KpiDelta, KpiSnapshotFinding } from '../findings/kpi.js';
import { formatValue, valueFormatOf } from '../format.js';
import type { Audience, Caveat } from '../types.js';
import {
  cardValue,
  changePhrase,
  grainNoun,
  periodName,
  points,
  shortPeriodName,
  verdict,
} from './kpi-words.js';
import { labelAtStart, verbFor } from './grammar.js';
import { meaningAside, metricFormula } from './metric-words.js';

export interface KpiWords {
  title: string;
  caption: string;
}

export function kpiSnapshotWords(
  f: KpiSnapshotFinding,
  metric: Metric,
  ds: DatasetConfig,
  audience: Audience,
  locale: string,
  caveats: Caveat[] = [],
): KpiWords {
  const when = periodName(f.period, f.grain, locale);
  const value = cardValue(f.value, metric, locale);
  const short = (d: KpiDelta) => shortPeriodName(d.period, f.period, f.grain, locale);
  const against = (d: KpiDelta | null) => {
    if (!d) return null;
    const phrase = changePhrase(d, metric, locale);
    if (phrase === null) return null;
    return phrase === 'level' ? `level with ${short(d)}` : `${phrase} on ${short(d)}`;
  };
  // The same period a year earlier shares its season, so it leads (issue 17 item 8): a seasonal
  // business does not read "up 16.7% on April" about a May that is always busier than April.
  // The period before leads only when no year-earlier figure compares (and at the year grain,
  // where the period before is the year earlier).
  const headline = against(f.lastYear) ?? against(f.previous);
  // A period with no value (no rows to average) says so, never "was n/a".
  const stated = f.value === null ? 'had no value' : `${verbFor(metric.label, 'was')} ${value}`;
  const title = headline ? `${labelAtStart(metric.label)} ${stated} in ${when}, ${headline}` : `${labelAtStart(metric.label)} ${stated} in ${when}`;

  const sentences: string[] = [];
  const partial = caveats.find((c) => c.code === 'partial_period_excluded');
  const latestNote = partial
    ? `, the latest complete ${grainNoun(f.grain)} (${periodName(String(partial.data.period), f.grain, locale)} is left out: it is only covered up to ${periodName(String(partial.data.coveredTo), 'day', locale)})`
    : `, the latest complete ${grainNoun(f.grain)}`;
  const comparisons = [f.lastYear, f.previous].filter((d): d is KpiDelta => d !== null);
  const detailed = comparisons.map((d) => {
    const phrase = changePhrase(d, metric, locale);
    const base = `${periodName(d.period, f.grain, locale)} (${cardValue(d.value, metric, locale)})`;
    if (phrase === null) return `no figure for ${periodName(d.period, f.grain, locale)} to compare with`;
    return phrase === 'level' ? `level with ${base}` : `${phrase} on ${base}`;
  });
  const meaning = meaningAside(metric, ds, audience);
  sentences.push(`${labelAtStart(metric.label)}${meaning} ${stated} in ${when}${latestNote}: ${detailed.join(' and ')}.`);

  const verdicts = comparisons.map((d) => verdict(d, metric));
  const judged = judgement(verdicts, comparisons, f, metric, locale);
  if (judged) sentences.push(judged);

  if (audience === 'analysts') {
    const diffs = comparisons
      .filter((d) => d.absolute !== null)
      .map((d) => `${exactChange(d.absolute!, metric, locale)} vs ${periodName(d.period, f.grain, locale)}`);
    const rows = `${formatValue(f.rows, { unit: 'count', locale })} rows in ${when}`;
    sentences.push(`Definition: ${metricFormula(metric, ds)}. ${diffs.length ? `Absolute changes: ${diffs.join('; ')}. ` : ''}Based on ${rows}.`);
  }
  return { title, caption: sentences.join(' ') };
}

function judgement(
  verdicts: ('better' | 'worse' | null)[],
  comparisons: KpiDelta[],
  f: KpiSnapshotFinding,
  metric: Metric,
  locale: string,
): string | null {
  const direction = metricDirection(metric) === false ? 'lower is better' : 'higher is better';
  const known = verdicts.filter((v) => v !== null);
  if (known.length === 0) return null;
  if (known.length === verdicts.length && known.every((v) => v === known[0])) {
    const both = verdicts.length > 1 ? ' on both counts' : '';
    return `That is ${known[0]}${both} (${direction}).`;
  }
  const parts = comparisons
    .map((d, i) => (verdicts[i] ? `${verdicts[i]} than ${shortPeriodName(d.period, f.period, f.grain, locale)}` : null))
    .filter((x): x is string => x !== null);
  return `That is ${parts.join(' but ')} (${direction}).`;
}

/** The difference at full precision for analysts: "+€0.33", "−0.5 pts". */
function exactChange(diff: number, metric: Metric, locale: string): string {
  if (metric.unit === 'percent') return points(diff, locale);
  return formatValue(diff, valueFormatOf(metric, locale), { signed: true });
}
