// The period table as a reader gets it outside the image: a CSV of the table as shown (one row per
// period, each metric's value, its two changes in their stated basis and its mark, then the totals
// row), and short monospace blocks for chat, most detailed first.
import { stringify } from 'csv-stringify/sync';
import type { DatasetConfig, Metric } from '../../config/schema.js';
import { changeText } from '../captions/period-table-caption.js';
import { metricByName } from '../catalog.js';
import type { ChangeBasis, PeriodTableFinding } from '../findings/table.js';
import { formatPeriod, formatValue, valueFormatOf } from '../format.js';

const BASIS_SUFFIX: Record<ChangeBasis, string> = { percent: 'pct', points: 'pts', units: 'units' };

/** A change in the CSV's stated unit: percent and points as numbers of percent (8.1 for +8.1%). */
function csvChange(change: number | null, basis: ChangeBasis): number | '' {
  if (change === null) return '';
  return basis === 'units' ? change : Number((change * 100).toPrecision(12));
}

export function periodTableCsv(table: PeriodTableFinding, totalLabel: string, locale: string): string {
  const header = ['period', 'label', 'partial'];
  for (const col of table.columns) {
    const s = BASIS_SUFFIX[col.basis];
    header.push(col.metric, `${col.metric}_vs_previous_${s}`, `${col.metric}_vs_year_earlier_${s}`, `${col.metric}_mark`);
  }
  const rows: (string | number | boolean)[][] = table.rows.map((r) => [
    r.period,
    formatPeriod(r.period, table.grain, locale),
    r.partial,
    ...r.cells.flatMap((c, k) => [c.value ?? '', csvChange(c.vsPrevious, table.columns[k]!.basis), csvChange(c.vsYearEarlier, table.columns[k]!.basis), c.mark ?? '']),
  ]);
  rows.push(['total', totalLabel, false, ...table.columns.flatMap((c) => [c.total.value ?? '', '', '', c.total.rule])]);
  return stringify([header, ...rows], { cast: { boolean: (b) => (b ? 'true' : 'false') } });
}

// Plain ASCII signs and spaces: chat clients draw a code block in a monospace font, where a
// typographic minus or a narrow no-break space can take another width and break the columns.
function plain(text: string): string {
  return text.replace(/\u2212/g, '-').replace(/[\u00A0\u2007\u202F]/g, ' ');
}

interface TextColumn {
  header: string;
  cells: string[];
}

type Detail = 'full' | 'year' | 'values';

/**
 * The table as monospace text blocks: every column; then the values and the change on a year
 * earlier; then the values alone. Marks: "*" best, "!" worst; "~" after a partial period's label.
 */
export function periodTableTextBlocks(table: PeriodTableFinding, totalLabel: string, ds: DatasetConfig, locale: string): string[] {
  return (['full', 'year', 'values'] as Detail[]).map((d) => textBlock(table, totalLabel, ds, locale, d));
}

function textBlock(table: PeriodTableFinding, totalLabel: string, ds: DatasetConfig, locale: string, detail: Detail): string {
  const metrics = table.columns.map((c) => metricByName(ds, c.metric));
  const value = (v: number | null, m: Metric) => (v === null ? 'n/a' : plain(formatValue(v, valueFormatOf(m, locale), { compact: true })));
  const change = (c: number | null, k: number, partial: boolean) =>
    partial ? '' : plain(changeText(c, table.columns[k]!.basis, metrics[k]!, locale).text);
  const mark = (m: 'best' | 'worst' | null) => (m === 'best' ? '*' : m === 'worst' ? '!' : ' ');
  const labels = [...table.rows.map((r) => `${plain(formatPeriod(r.period, table.grain, locale))}${r.partial ? '~' : ''}`), totalLabel];
  const groups: { label: string; columns: TextColumn[] }[] = metrics.map((m, k) => {
    const cols: TextColumn[] = [
      { header: 'value', cells: [...table.rows.map((r) => value(r.cells[k]!.value, m) + mark(r.cells[k]!.mark)), `${value(table.columns[k]!.total.value, m)} `] },
    ];
    if (detail === 'full') cols.push({ header: 'prev', cells: [...table.rows.map((r) => change(r.cells[k]!.vsPrevious, k, r.partial)), ''] });
    if (detail !== 'values') cols.push({ header: 'yr ago', cells: [...table.rows.map((r) => change(r.cells[k]!.vsYearEarlier, k, r.partial)), ''] });
    return { label: m.label, columns: cols };
  });
  const periodW = Math.max(...labels.map((l) => l.length));
  // A lone value column is widened towards its metric's name, so the name is not cut to a stub.
  const widths = groups.map((g) => g.columns.map((c) => Math.max(c.header.length, ...c.cells.map((x) => x.length), g.columns.length === 1 ? Math.min(g.label.length, 12) : 0)));
  const groupW = widths.map((ws) => ws.reduce((a, b) => a + b, 0) + ws.length - 1);
  const sep = ' | ';
  const line = (first: string, parts: string[]) => `${first.padEnd(periodW)}${sep}${parts.join(sep)}`.trimEnd();
  const head1 = line('', groups.map((g, k) => clip(g.label, groupW[k]!).padEnd(groupW[k]!)));
  const head2 = line('', groups.map((g, k) => g.columns.map((c, j) => c.header.padStart(widths[k]![j]!)).join(' ')));
  const body = labels.map((label, i) =>
    line(label, groups.map((g, k) => g.columns.map((c, j) => c.cells[i]!.padStart(widths[k]![j]!)).join(' '))),
  );
  const rule = '-'.repeat(Math.max(head1.length, ...body.map((b) => b.length)));
  const basisNote = detail === 'values' ? '' : `; prev = on the ${table.grain} before, yr ago = on ${table.grain === 'day' ? '52 weeks before' : `the same ${table.grain} a year earlier`}`;
  const key = `* best, ! worst${table.rows.some((r) => r.partial) ? ', ~ partial (not ranked)' : ''}${basisNote}`;
  return [head1, head2, rule, ...body.slice(0, -1), rule, body[body.length - 1]!, key].join('\n');
}

function clip(text: string, width: number): string {
  return text.length <= width ? text : `${text.slice(0, Math.max(1, width - 1))}.`;
}
