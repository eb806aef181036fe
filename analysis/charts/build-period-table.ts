// The period table as chart specs: every text formatted, every change cell placed on its column's
// diverging colour scale, and a long window split into pages of at most PAGE_ROWS periods (whole
// years together where they fit) rather than shrunk. Pure: the renderer only draws what is here.
import { metricDirection } from '../catalog.js';
import type { Metric } from '../../config/schema.js';
import { changeText } from '../captions/period-table-caption.js';
import type { ChangeBasis, PeriodTableCell } from '../findings/table.js';
import { formatPeriod, formatValue, valueFormatOf } from '../format.js';
import { GRAIN_WORDS } from '../grains.js';
import { capitalise, inSentence, possessive } from '../captions/grammar.js';
import type { Grain } from '../types.js';
import { colourDomain } from './build-growth-grid.js';
import { headerOf } from './header.js';
import type { ChartHeader, PeriodTableSpec, TableCell, TableColumn, TableRow } from './spec.js';

/** Periods per image: a year of months and one more, so a page never needs a smaller font. */
export const PAGE_ROWS = 13;

/**
 * Images per table at most: four years of months. A longer window (a century of months is a
 * hundred pages, more than anyone reads in a thread) draws its latest pages and says so; every
 * period stays in the table's CSV.
 */
export const MAX_PAGES = 4;

export interface PeriodTableMetric {
  metric: Metric;
  basis: ChangeBasis;
}

export interface PeriodTableRowInput {
  period: string;
  partial: boolean;
  /** Small text beside a partial period's label ("to 18 Jun"). */
  note: string;
  /** One per metric. */
  cells: PeriodTableCell[];
}

export interface PeriodTableInput extends ChartHeader {
  grain: Grain;
  locale: string;
  metrics: PeriodTableMetric[];
  rows: PeriodTableRowInput[];
  /** The totals row's label and one value per metric; drawn at the end of the last page. */
  total: { label: string; values: (number | null)[] } | null;
  notes: string[];
}

const GRAIN_NOUN: Record<Grain, string> = { day: 'Day', week: 'Week', month: 'Month', quarter: 'Quarter', year: 'Year' };
const PREVIOUS_LABEL: Record<Grain, string> = { day: 'vs day before', week: 'vs week before', month: 'vs month before', quarter: 'vs quarter before', year: 'vs year before' };
// Layout estimates at the default size (1200×675, one layout unit), for the image's own size.
const PERIOD_COLUMN = { day: 150, week: 190, month: 150, quarter: 130, year: 110 } as const;
const METRIC_WIDTH = 320;
const ROW_HEIGHT = 36;
const CHROME_HEIGHT = 345;

export function buildPeriodTablePages(input: PeriodTableInput): PeriodTableSpec[] {
  const { grain, locale } = input;
  const valueTexts = input.metrics.map((m, k) => valueTextsOf(m.metric, locale, [...input.rows.map((r) => r.cells[k]?.value ?? null), input.total?.values[k] ?? null]));
  // One colour scale per change column over the whole window, so a colour means the same on every page.
  const domains = input.metrics.map((m, k) => ({
    previous: domainOf(m.basis, input.rows.map((r) => r.cells[k]?.vsPrevious ?? null)),
    yearEarlier: domainOf(m.basis, input.rows.map((r) => r.cells[k]?.vsYearEarlier ?? null)),
  }));
  const columns: TableColumn[] = input.metrics.flatMap((m, k): TableColumn[] => [
    { label: valueColumnLabel(m.metric), group: k, role: 'value' },
    { label: PREVIOUS_LABEL[grain], group: k, role: 'change' },
    { label: grain === 'day' ? 'vs 52 weeks before' : 'vs a year earlier', group: k, role: 'change' },
  ]);
  const rows: TableRow[] = input.rows.map((r, i) => ({
    label: formatPeriod(r.period, grain, locale),
    note: r.note,
    kind: r.partial ? 'partial' : 'period',
    cells: input.metrics.flatMap((m, k) => {
      const c = r.cells[k]!;
      const tone = (change: number | null, domain: number) => (r.partial ? null : changeCell(change, m, domain, locale));
      return [
        { text: valueTexts[k]![i]!, tone: null, direction: null, mark: r.partial ? null : c.mark },
        tone(c.vsPrevious, domains[k]!.previous) ?? blank(r.partial),
        tone(c.vsYearEarlier, domains[k]!.yearEarlier) ?? blank(r.partial),
      ];
    }),
  }));
  const totalRow: TableRow | null = input.total
    ? {
        label: input.total.label,
        note: '',
        kind: 'total',
        cells: input.metrics.flatMap((_, k) => [{ text: valueTexts[k]![input.rows.length]!, tone: null, direction: null, mark: null }, blank(false), blank(false)]),
      }
    : null;
  const periods = input.rows.map((r) => r.period);
  const from = drawnFrom(periods, grain);
  const pages = pageRows(periods.slice(from), grain).map((r) => ({ from: r.from + from, to: r.to + from }));
  const notDrawn = notDrawnNote(input, from);
  const width = Math.max(input.width, Math.round(64 + PERIOD_COLUMN[grain] + METRIC_WIDTH * input.metrics.length));
  const anyPartial = input.rows.some((r) => r.partial);
  const noun = GRAIN_NOUN[grain].toLowerCase();
  return pages.map((range, p) => {
    const last = p === pages.length - 1;
    const pageRowsShown = [...rows.slice(range.from, range.to), ...(last && totalRow ? [totalRow] : [])];
    const height = Math.max(input.height, CHROME_HEIGHT + ROW_HEIGHT * (Math.min(PAGE_ROWS, maxPageLength(pages)) + (totalRow ? 1 : 0)));
    // A table cut to its latest pages says so where the page number is read.
    const latest = from > 0 ? `latest ${GRAIN_WORDS[grain].plural}, ` : '';
    const pageNote =
      pages.length > 1 || latest
        ? `${capitalise(`${latest}page ${p + 1} of ${pages.length}`)}: ${formatPeriod(input.rows[range.from]!.period, grain, locale)} to ${formatPeriod(input.rows[range.to - 1]!.period, grain, locale)}${last ? '' : totalRow ? `; the ${inSentence(input.total!.label)} row is on page ${pages.length}` : ''}`
        : '';
    return {
      kind: 'period_table',
      ...headerOf({ ...input, width, height }),
      subtitle: pageNote ? `${pageNote} · ${input.subtitle}` : input.subtitle,
      periodLabel: GRAIN_NOUN[grain],
      groups: input.metrics.map((m) => m.metric.label),
      columns,
      rows: pageRowsShown,
      legend: {
        better: 'better',
        worse: 'worse',
        best: `best ${noun}`,
        worst: `worst ${noun}`,
        partial: anyPartial ? `partial ${noun}: not ranked or compared` : null,
      },
      notes: [...(notDrawn ? [notDrawn] : []), ...input.notes],
    };
  });
}

/**
 * The first period drawn: 0 when the whole window fits in MAX_PAGES pages, else the latest
 * periods that do, starting at a year's start for months and quarters (Jan 2043 to Dec 2046).
 */
function drawnFrom(periods: readonly string[], grain: Grain): number {
  if (pageRows(periods, grain).length <= MAX_PAGES) return 0;
  const from = periods.length - MAX_PAGES * PAGE_ROWS;
  if (grain !== 'month' && grain !== 'quarter') return from;
  const yearStart = periods.findIndex((p, i) => i >= from && p.slice(0, 4) !== periods[i - 1]?.slice(0, 4));
  return yearStart >= 0 && pageRows(periods.slice(yearStart), grain).length <= MAX_PAGES ? yearStart : from;
}

/**
 * What a table cut to its latest pages leaves out, said on every page: how many periods are drawn
 * of how many, that the rest are in the CSV, that the totals row and the marks cover them all,
 * and which marked periods fall in the part not drawn.
 */
function notDrawnNote(input: PeriodTableInput, hidden: number): string | null {
  if (hidden <= 0) return null;
  const { grain, locale, rows } = input;
  const n = (v: number) => new Intl.NumberFormat(locale).format(v);
  const plural = GRAIN_WORDS[grain].plural;
  const period = (iso: string) => formatPeriod(iso, grain, locale);
  const marked = input.metrics.flatMap((m, k) => {
    const at = (mark: 'best' | 'worst') => rows.slice(0, hidden).find((r) => !r.partial && r.cells[k]?.mark === mark);
    return (['best', 'worst'] as const).flatMap((mark) => {
      const r = at(mark);
      return r ? [`${possessive(m.metric.label)} ${mark} (${period(r.period)})`] : [];
    });
  });
  const total = input.total ? `; the ${inSentence(input.total.label)} row and the ★ and ✖ marks cover all of them` : '';
  const marks = marked.length > 0 ? ` Marked among the earlier ones: ${marked.join(', ')}.` : '';
  return `Drawn: the latest ${n(rows.length - hidden)} of ${n(rows.length)} ${plural} (${period(rows[hidden]!.period)} to ${period(rows.at(-1)!.period)}); the earlier ${n(hidden)} are in the attached CSV${total}.${marks}`;
}

function blank(partial: boolean): TableCell {
  return { text: partial ? '–' : '', tone: null, direction: null, mark: null };
}

function changeCell(change: number | null, m: PeriodTableMetric, domain: number, locale: string): TableCell {
  const { text, direction } = changeText(change, m.basis, unnamedUnit(m.metric), locale, false);
  if (direction === 'none') return { text, tone: null, direction: null, mark: null };
  const size = Math.max(-1, Math.min(1, change! / domain));
  const good = metricDirection(m.metric);
  const tone = direction === 'flat' || good === null ? 0 : good ? size : -size;
  return { text, tone: tone === 0 ? 0 : tone, direction, mark: null };
}

/**
 * The value column's header: the currency, or the unit's name ("thousand", "ppm"), which its cells
 * then leave out, so a narrow column holds the figure at a readable size ("14,813", not "14,813
 * thousand" twelve times over).
 */
function valueColumnLabel(metric: Metric): string {
  if (metric.unit === 'currency' && metric.currency) return metric.currency;
  return metric.unit_label !== undefined && (metric.unit === 'count' || metric.unit === 'number') ? metric.unit_label : 'value';
}

/** The metric with its unit's name left to the column header. */
function unnamedUnit(metric: Metric): Metric {
  const { unit_label: _named, ...rest } = metric;
  return rest;
}

/** Full figures where the longest fits a table cell; about three significant figures otherwise. */
function valueTextsOf(metric: Metric, locale: string, values: (number | null)[]): string[] {
  const fmt = valueFormatOf(unnamedUnit(metric), locale);
  const full = values.map((v) => (v === null ? 'n/a' : formatValue(v, fmt)));
  return full.some((t) => t.length > 10) ? values.map((v) => (v === null ? 'n/a' : formatValue(v, fmt, { compact: true }))) : full;
}

/**
 * The colour scale's half-width for one change column: for fractions (percent and points) the
 * same round steps as the growth grid; for changes in units, the 90th percentile of their sizes
 * rounded up to 1, 2, 2.5 or 5 times a power of ten.
 */
export function domainOf(basis: ChangeBasis, changes: (number | null)[]): number {
  const values = changes.filter((c): c is number => c !== null && Number.isFinite(c));
  if (basis !== 'units') return colourDomain(values);
  if (values.length === 0) return 1;
  const abs = values.map(Math.abs).sort((a, b) => a - b);
  const p90 = abs[Math.min(abs.length - 1, Math.ceil(0.9 * abs.length) - 1)]!;
  if (p90 === 0) return 1;
  const power = 10 ** Math.floor(Math.log10(p90));
  const step = [1, 2, 2.5, 5, 10].find((s) => s * power >= p90 - 1e-12) ?? 10;
  return step * power;
}

/**
 * Row ranges [from, to) of each page, as few pages as PAGE_ROWS allows. Months and quarters break
 * between years where that keeps pages within PAGE_ROWS, choosing the breaks that make the longest
 * page shortest (24 months: 12 and 12; 14 quarters: 8 and 6); other grains split evenly.
 */
export function pageRows(periods: readonly string[], grain: Grain): { from: number; to: number }[] {
  const n = periods.length;
  if (n <= PAGE_ROWS) return [{ from: 0, to: n }];
  const count = Math.ceil(n / PAGE_ROWS);
  if (grain === 'month' || grain === 'quarter') {
    const breaks = [0, ...periods.flatMap((p, i) => (i > 0 && p.slice(0, 4) !== periods[i - 1]!.slice(0, 4) ? [i] : [])), n];
    const best = yearPages(breaks, count);
    if (best) return best;
  }
  return Array.from({ length: count }, (_, k) => ({ from: Math.round((k * n) / count), to: Math.round(((k + 1) * n) / count) }));
}

/** The split of rows into `count` pages at year breaks that minimises the longest page; null if none fits. */
function yearPages(breaks: number[], count: number): { from: number; to: number }[] | null {
  // best[k][j]: the smallest possible longest page when the first j year-blocks fill k pages.
  const blocks = breaks.length - 1;
  const best: number[][] = Array.from({ length: count + 1 }, () => Array<number>(blocks + 1).fill(Infinity));
  const from: number[][] = Array.from({ length: count + 1 }, () => Array<number>(blocks + 1).fill(-1));
  best[0]![0] = 0;
  for (let k = 1; k <= count; k++) {
    for (let j = 1; j <= blocks; j++) {
      for (let i = k - 1; i < j; i++) {
        const size = breaks[j]! - breaks[i]!;
        const worst = Math.max(best[k - 1]![i]!, size);
        if (size <= PAGE_ROWS && worst < best[k]![j]!) {
          best[k]![j] = worst;
          from[k]![j] = i;
        }
      }
    }
  }
  if (!Number.isFinite(best[count]![blocks]!)) return null;
  const pages: { from: number; to: number }[] = [];
  for (let k = count, j = blocks; k > 0; k--) {
    const i = from[k]![j]!;
    pages.unshift({ from: breaks[i]!, to: breaks[j]! });
    j = i;
  }
  return pages;
}

function maxPageLength(pages: { from: number; to: number }[]): number {
  return Math.max(...pages.map((p) => p.to - p.from));
}
