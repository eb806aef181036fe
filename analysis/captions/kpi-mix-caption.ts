// Title and caption of a KPI's mix across segments, from its finding and the catalog.
import type { DatasetConfig, Metric } from '../../config/schema.js';
import type { KpiMixFinding, KpiMixRow } from '../findings/kpi.js';
import { formatValue } from '../format.js';
import { hhiBand } from '../stats/index.js';
import type { Audience } from '../types.js';
import { capitalise, labelAtStart } from './grammar.js';
import type { KpiWords } from './kpi-snapshot-caption.js';
import { inSentence, kpiValue, periodName, pluralOf, points, segmentLabel, shareMove } from './kpi-words.js';

// A share that moved less than this is "about the same" (0.05 points), matching the KPI card's cut.
const FLAT_SHARE = 0.0005;

export function shareOfLabel(f: KpiMixFinding, ds: DatasetConfig): string {
  const m = f.shareOf ? ds.metrics.find((x) => x.name === f.shareOf) : undefined;
  return m ? inSentence(m.label) : 'rows';
}

export function mixRowLabel(row: KpiMixRow, f: KpiMixFinding, ds: DatasetConfig, locale: string): string {
  if (row.other) return 'All others';
  return segmentLabel(row.key, ds.dimensions.find((d) => d.name === f.dimension), ds, locale);
}

export function kpiMixWords(f: KpiMixFinding, metric: Metric, ds: DatasetConfig, audience: Audience, locale: string): KpiWords {
  const dimLabel = ds.dimensions.find((d) => d.name === f.dimension)?.label ?? f.dimension;
  const when = periodName(f.period, f.grain, locale);
  const of = shareOfLabel(f, ds);
  const pct = (x: number | null) => formatValue(x, { unit: 'percent', decimals: 1, locale });
  const label = (r: KpiMixRow) => mixRowLabel(r, f, ds, locale);
  const top = f.segments[0];
  const ly = f.lastYearPeriod ? periodName(f.lastYearPeriod, f.grain, locale) : null;
  if (!top || top.share === null) {
    return {
      title: `${labelAtStart(metric.label)}: no ${of} to split by ${inSentence(dimLabel)} in ${when}`,
      caption: `Shares of ${of} by ${inSentence(dimLabel)} cannot be given for ${when}: the total is not positive or a segment is negative.`,
    };
  }
  const topMove = ly && top.shareChange !== null ? shareMove(top.shareChange, locale, FLAT_SHARE) : null;
  const title = capitalise(`${label(top)} had the largest share of ${of} in ${when}: ${pct(top.share)}${topMove ? `, ${topMove} ${ly}` : ''}`);

  const sentences: string[] = [];
  const segs = formatValue(f.segments.filter((s) => s.value > 0).length, { unit: 'count', locale });
  if (f.countToThreshold !== null) {
    const reached = f.shareToThreshold ?? f.segments.slice(0, f.countToThreshold).reduce((a, r) => a + (r.share ?? 0), 0);
    sentences.push(`In ${when} the top ${formatValue(f.countToThreshold, { unit: 'count', locale })} of ${segs} ${pluralOf(dimLabel)} carried ${pct(reached)} of ${of}.`);
  }
  if (f.shareOf !== metric.name && audience !== 'leadership') {
    sentences.push(`Shares are of ${of}, the base ${inSentence(metric.label)} is computed over, so this is the mix behind it.`);
  }
  if (ly) {
    const movers = f.segments
      .filter((r) => r.shareChange !== null && Math.abs(r.shareChange) >= FLAT_SHARE)
      .sort((a, b) => Math.abs(b.shareChange!) - Math.abs(a.shareChange!))
      .slice(0, audience === 'leadership' ? 1 : 3);
    sentences.push(
      movers.length
        ? `Biggest share changes since ${ly}: ${movers.map((r) => `${label(r)} ${points(r.shareChange!, locale)}`).join(', ')}.`
        : `Shares are about the same as in ${ly}.`,
    );
  } else if (audience !== 'leadership') {
    sentences.push('There is no full period a year earlier to compare shares with.');
  }
  if (audience !== 'leadership' && f.shareOf !== metric.name) {
    const values = f.segments.filter((r) => r.metricValue !== null).slice(0, 3);
    if (values.length) sentences.push(`${labelAtStart(metric.label)} by ${inSentence(dimLabel)}: ${values.map((r) => `${label(r)} ${kpiValue(r.metricValue, metric, locale)}`).join(', ')}.`);
  }
  if (audience === 'analysts' && f.hhi !== null) {
    const band = hhiBand(f.hhi).replace('_', ' ');
    const before = f.lastYearHhi !== null && ly ? `, ${formatValue(f.lastYearHhi, { unit: 'number', decimals: 0, locale })} in ${ly}` : '';
    sentences.push(`HHI ${formatValue(f.hhi, { unit: 'number', decimals: 0, locale })} (${band} by the 2010 DoJ/FTC bands)${before}.`);
  }
  return { title, caption: sentences.join(' ') };
}
