// Words of the period table, written only from its findings: how a change reads in each basis
// (percent, points, units), the one takeaway across the metrics, the title and the caption.
import type { DatasetConfig, Metric } from '../../config/schema.js';
import { metricByName } from '../catalog.js';
import type { ChangeBasis, PeriodTableColumn, PeriodTableFinding, TableLatestFinding, TableQuotientFinding } from '../findings/table.js';
import { formatChange, formatPeriod, formatValue, valueFormatOf } from '../format.js';
import type { Finding, Grain } from '../types.js';
import { capitalise, inPeriod, inSentence, labelAtStart, listJoin, nounFor, singularNoun } from './grammar.js';
import { formatPoints } from './growth-words.js';

export type ChangeDirection = 'up' | 'down' | 'flat' | 'none';

/**
 * A change as the table shows it: signed ("+8.1%", "−1.2 pts", "+€0.42") or as a magnitude
 * ("8.1%"), with its direction read from what is shown, so a change that rounds to nothing is flat.
 */
export function changeText(change: number | null, basis: ChangeBasis, metric: Metric, locale: string, signed = true): { text: string; direction: ChangeDirection } {
  if (change === null || !Number.isFinite(change)) return { text: 'n/a', direction: 'none' };
  const shown =
    basis === 'percent'
      ? formatChange(change, locale)
      : basis === 'points'
        ? formatPoints(change, locale)
        : formatValue(change, valueFormatOf(metric, locale), { signed: true });
  const flat = !/[1-9]/.test(shown);
  const direction: ChangeDirection = flat ? 'flat' : change > 0 ? 'up' : 'down';
  const magnitude = shown.replace(/^[+\u2212-]/, '').replace(/^(\D*?)[+\u2212-]/, '$1');
  return { text: signed && !flat ? shown : magnitude, direction };
}

/** "rose 8.1%", "fell 1.2 pts", "held level". */
function moved(change: number, basis: ChangeBasis, metric: Metric, locale: string): string {
  const { text, direction } = changeText(change, basis, metric, locale, false);
  return direction === 'flat' ? 'held level' : `${direction === 'up' ? 'rose' : 'fell'} ${text}`;
}

function valueShort(value: number, metric: Metric, locale: string): string {
  return formatValue(value, valueFormatOf(metric, locale), { compact: true });
}

function period(iso: string, grain: Grain, locale: string): string {
  return formatPeriod(iso, grain, locale, 'long');
}

/** "in July 2024", "in the week commencing 8 July 2024", "on 8 July 2024". */
/** A metric label in mid-sentence, with "the" before a ratio ("the average fare per booking", "the refund rate"). */
function named(metric: Metric, col: PeriodTableColumn | undefined): string {
  return col?.kind === 'ratio' ? `the ${inSentence(metric.label)}` : inSentence(metric.label);
}

export interface PeriodTableWords {
  title: string;
  /** The one sentence across the metrics; it leads the thread's summary. */
  takeaway: string;
  caption: string;
}

export function periodTableWords(findings: readonly Finding[], ds: DatasetConfig, locale: string): PeriodTableWords {
  const table = findings.find((f): f is PeriodTableFinding => f.type === 'period_table');
  if (!table) return { title: 'No complete period to show', takeaway: '', caption: 'There is no data in the period asked for, so the table is empty.' };
  const latest = findings.find((f): f is TableLatestFinding => f.type === 'table_latest');
  const quotient = findings.find((f): f is TableQuotientFinding => f.type === 'table_quotient');
  const peak = peakClause(table, ds, locale);
  const recent = latest ? recentClause(table, latest, quotient, ds, locale) : null;
  const labels = table.columns.map((c) => inSentence(metricByName(ds, c.metric).label));
  const title = peak ?? `${capitalise(listJoin(labels))} by ${table.grain}`;
  const takeaway = peak && recent ? `${peak}; ${recent}.` : peak ? `${peak}.` : recent ? `${capitalise(recent)}.` : '';
  const caption = [takeaway, marksSentence(table, ds, locale)].filter((s) => s !== '').join(' ');
  return { title, takeaway, caption };
}

/**
 * "Revenue peaked in July 2024 at €318K on 8.3K bookings": the first metric's highest complete
 * period, with the flows counted in units (bookings, passengers) in that same period.
 */
function peakClause(table: PeriodTableFinding, ds: DatasetConfig, locale: string): string | null {
  const lead = table.columns[0];
  if (!lead?.high) return null;
  const metric = metricByName(ds, lead.metric);
  const row = table.rows.find((r) => r.period === lead.high!.period);
  const alongside = table.columns.slice(1).flatMap((col, k) => {
    const m = metricByName(ds, col.metric);
    const v = row?.cells[k + 1]?.value ?? null;
    return col.kind === 'flow' && m.unit === 'count' && v !== null ? [`${valueShort(v, m, locale)} ${nounFor(v, singularNoun(inSentence(m.label)), inSentence(m.label))}`] : [];
  });
  const on = alongside.length > 0 ? ` on ${listJoin(alongside.slice(0, 2))}` : '';
  return `${labelAtStart(metric.label)} peaked ${inPeriod(lead.high.period, table.grain, locale)} at ${valueShort(lead.high.value, metric, locale)}${on}`;
}

/**
 * The latest complete period against a year earlier (or the period before): when one metric is
 * another divided by a third, its move is told through theirs ("bookings fell faster than revenue,
 * so the average fare rose 0.8%"); the other metrics follow.
 */
function recentClause(table: PeriodTableFinding, latest: TableLatestFinding, quotient: TableQuotientFinding | undefined, ds: DatasetConfig, locale: string): string {
  const when = inPeriod(latest.period, table.grain, locale);
  const base = latest.against === 'year_earlier' ? 'a year earlier' : `the ${table.grain} before`;
  const change = new Map(latest.changes.map((c) => [c.metric, c]));
  const col = (name: string) => table.columns.find((c) => c.metric === name);
  const say = (name: string) => {
    const c = change.get(name)!;
    const m = metricByName(ds, name);
    return `${named(m, col(name))} ${moved(c.change, c.basis, m, locale)}`;
  };
  const lead = `${when}, against ${base},`;
  const parts: string[] = [];
  const told = new Set<string>();
  if (quotient && [quotient.ratio, quotient.numerator, quotient.denominator].every((n) => change.get(n)?.basis === 'percent')) {
    const n = change.get(quotient.numerator)!.change;
    const d = change.get(quotient.denominator)!.change;
    const [nm, dm] = [metricByName(ds, quotient.numerator), metricByName(ds, quotient.denominator)];
    const [nName, dName] = [named(nm, col(nm.name)), named(dm, col(dm.name))];
    const [tn, td] = [changeText(n, 'percent', nm, locale).text, changeText(d, 'percent', dm, locale).text];
    const faster = (verb: string, first: 'n' | 'd') =>
      first === 'n' ? `${nName} ${verb} faster than ${dName} (${tn} against ${td})` : `${dName} ${verb} faster than ${nName} (${td} against ${tn})`;
    let how: string;
    if (n > 0 && d > 0) how = faster('grew', n >= d ? 'n' : 'd');
    else if (n < 0 && d < 0) how = faster('fell', n <= d ? 'n' : 'd');
    else how = `${say(quotient.numerator)} while ${say(quotient.denominator)}`;
    parts.push(`${how}, so ${say(quotient.ratio)}`);
    for (const x of [quotient.ratio, quotient.numerator, quotient.denominator]) told.add(x);
  }
  const rest = latest.changes.filter((c) => !told.has(c.metric)).map((c) => say(c.metric));
  const all = parts.length > 0 ? [parts[0]!, ...(rest.length ? [`while ${listJoin(rest)}`] : [])].join(', ') : listJoin(rest);
  return `${lead} ${all}`;
}

/** "Best months: revenue July 2024, …; worst: …": the marks the table carries, in words. */
function marksSentence(table: PeriodTableFinding, ds: DatasetConfig, locale: string): string {
  const best: string[] = [];
  const worst: string[] = [];
  const highest: string[] = [];
  const lowest: string[] = [];
  for (const col of table.columns) {
    if (!col.high || !col.low) continue;
    const m = metricByName(ds, col.metric);
    const at = (x: NonNullable<typeof col.high>) => `${inSentence(m.label)} ${period(x.period, table.grain, locale)} (${valueShort(x.value, m, locale)})`;
    // A metric with no good direction has a highest and a lowest, not a best and a worst.
    if (col.higherIsBetter === null) {
      highest.push(at(col.high));
      lowest.push(at(col.low));
      continue;
    }
    const [b, w] = col.higherIsBetter ? [col.high, col.low] : [col.low, col.high];
    best.push(at(b));
    worst.push(at(w));
  }
  const sentences = [
    best.length ? `Best ${table.grain}s: ${best.join('; ')}. Worst: ${worst.join('; ')}.` : '',
    highest.length ? `Highest ${table.grain}s: ${highest.join('; ')}. Lowest: ${lowest.join('; ')}.` : '',
  ];
  return sentences.filter(Boolean).join(' ');
}
