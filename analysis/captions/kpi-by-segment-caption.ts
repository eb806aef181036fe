// Title and caption of a KPI broken down by segment, from its finding and the catalog.
import type { DatasetConfig, Metric } from '../../config/schema.js';
import type { KpiBySegmentFinding, KpiSegmentRow } from '../findings/kpi.js';
import { formatValue } from '../format.js';
import type { Audience } from '../types.js';
import type { KpiWords } from './kpi-snapshot-caption.js';
import {
  changePhrase,
  inSentence,
  kpiValue,
  periodName,
  pluralOf,
  segmentLabel,
  signedChange,
} from './kpi-words.js';
import { capitalise, labelAtStart } from './grammar.js';
import { meaningAside } from './metric-words.js';

// A segment with a handful of rows swings by chance; it is not named the biggest mover (rule of thumb, common practice).
const MIN_ROWS_TO_RANK_CHANGE = 30;

/** "All others (3)". */
export function othersLabel(row: KpiSegmentRow): string {
  return `All others (${formatValue(row.segments, { unit: 'count', locale: 'en' })})`;
}

export function rowLabel(row: KpiSegmentRow, f: KpiBySegmentFinding, ds: DatasetConfig, locale: string): string {
  if (row.other) return othersLabel(row);
  return segmentLabel(row.key, ds.dimensions.find((d) => d.name === f.dimension), ds, locale);
}

export function kpiBySegmentWords(f: KpiBySegmentFinding, metric: Metric, ds: DatasetConfig, audience: Audience, locale: string): KpiWords {
  const dim = ds.dimensions.find((d) => d.name === f.dimension);
  const dimLabel = dim?.label ?? f.dimension;
  const when = periodName(f.period, f.grain, locale);
  const named = f.segments.filter((s) => !s.other && s.value !== null);
  const ranked = [...named].sort((a, b) => b.value! - a.value!);
  const top = ranked[0];
  const label = (r: KpiSegmentRow) => rowLabel(r, f, ds, locale);
  if (!top) {
    return {
      title: `${labelAtStart(metric.label)} by ${inSentence(dimLabel)}: no values in ${when}`,
      caption: `No ${inSentence(dimLabel)} has a value of ${inSentence(metric.label)} in ${when}.`,
    };
  }
  const lyPeriod = f.total.lastYear?.period ?? null;
  const topYoy = top.lastYear ? changePhrase(top.lastYear, metric, locale) : null;
  const yoyTail = topYoy && lyPeriod ? `, ${topYoy === 'level' ? 'level with' : `${topYoy} on`} ${periodName(lyPeriod, f.grain, locale)}` : '';
  const title = capitalise(`${label(top)} had the highest ${inSentence(metric.label)} in ${when}: ${kpiValue(top.value, metric, locale)}${yoyTail}`);

  const sentences: string[] = [];
  const meaning = meaningAside(metric, ds, audience);
  const list = ranked.slice(0, audience === 'leadership' ? 3 : 5).map((r) => `${label(r)} ${kpiValue(r.value, metric, locale)}`);
  sentences.push(`${labelAtStart(metric.label)}${meaning} by ${inSentence(dimLabel)} in ${when}: ${list.join(', ')}; all ${pluralOf(dimLabel)} together ${kpiValue(f.total.value, metric, locale)}.`);
  if (ranked.length > 1) {
    const low = ranked[ranked.length - 1]!;
    if (audience !== 'leadership') sentences.push(`The lowest was ${label(low)} at ${kpiValue(low.value, metric, locale)}.`);
  }
  const missing = f.segments.filter((s) => !s.other && s.rows === 0).map(label);
  if (missing.length > 0) sentences.push(`${missing.join(', ')} ${missing.length === 1 ? 'has' : 'have'} no data in ${when}.`);
  if (lyPeriod) {
    const movers = named
      .filter((r) => r.lastYear && r.lastYear.absolute !== null && r.rows >= MIN_ROWS_TO_RANK_CHANGE)
      .sort((a, b) => moveSize(b, metric) - moveSize(a, metric));
    const biggest = movers[0];
    const newOnes = named.filter((r) => r.lastYear && r.lastYear.value === null).map(label);
    if (biggest) {
      const phrase = changePhrase(biggest.lastYear!, metric, locale);
      sentences.push(
        phrase === 'level'
          ? `Against ${periodName(lyPeriod, f.grain, locale)}, no ${inSentence(dimLabel)} moved noticeably.`
          : `The biggest change on ${periodName(lyPeriod, f.grain, locale)} was ${label(biggest)}, ${phrase}.`,
      );
    }
    if (newOnes.length > 0) sentences.push(`No figure a year earlier for ${newOnes.join(', ')}.`);
  }
  const other = f.segments.find((s) => s.other);
  if (other && audience !== 'leadership') {
    sentences.push(`${othersLabel(other)} combines the ${pluralOf(dimLabel)} past the top ${f.topN}: ${kpiValue(other.value, metric, locale)}.`);
  }
  if (audience === 'analysts') {
    const rows = named.map((r) => `${label(r)} n = ${formatValue(r.rows, { unit: 'count', locale })}`);
    sentences.push(`Rows in ${when}: ${rows.join(', ')}. Changes are against the same ${f.grain} a year earlier (${signedChange(f.total.lastYear, metric, locale)} overall).`);
  }
  return { title, caption: sentences.join(' ') };
}

/** How far a segment moved a year on: points for rates, the relative change otherwise. */
function moveSize(r: KpiSegmentRow, metric: Metric): number {
  const d = r.lastYear;
  if (!d || d.absolute === null) return -1;
  if (metric.unit === 'percent') return Math.abs(d.absolute);
  return d.relative === null ? -1 : Math.abs(d.relative);
}
