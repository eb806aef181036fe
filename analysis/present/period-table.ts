// Presenter for "period_table": the table as images (a page per PAGE_ROWS periods), its CSV and
// monospace text, the caption with the best and worst periods, and the takeaway across the
// metrics that leads the thread's summary.
import type { DatasetConfig } from '../../config/schema.js';
import { caveatNote } from '../captions/caveat-text.js';
import { capitalise, inSentence, labelAtStart, listJoin } from '../captions/grammar.js';
import { periodTableWords } from '../captions/period-table-caption.js';
import { filterSubtitleParts } from '../captions/scope-words.js';
import { buildPeriodTablePages, type PeriodTableRowInput } from '../charts/build-period-table.js';
import { metricByName } from '../catalog.js';
import type { PeriodTableFinding, TotalRule } from '../findings/table.js';
import { formatPeriod } from '../format.js';
import type { Answer, Caveat, Grain } from '../types.js';
import { shortWindow } from '../window-words.js';
import { chartFooter, metricDefinition } from './header.js';
import { periodTableCsv, periodTableTextBlocks } from './period-table-files.js';
import type { PresentContext, Presenter } from './presenter.js';

const GRAIN_ADJECTIVE: Record<Grain, string> = { day: 'Daily', week: 'Weekly', month: 'Monthly', quarter: 'Quarterly', year: 'Yearly' };

export const presentPeriodTable: Presenter = (answer, ctx) => {
  const ds = ctx.dataset;
  const table = answer.findings.find((f): f is PeriodTableFinding => f.type === 'period_table');
  const words = periodTableWords(answer.findings, ds, ctx.locale);
  const partials = answer.caveats.filter((c) => c.code === 'partial_period' && c.data.shown === 'row');
  const notes = [...new Set([...partials.map((c) => partialNote(c, ctx.locale)), ...answer.caveats.filter((c) => !partials.includes(c)).map((c) => caveatNote(c, ctx.locale))])];
  if (!table) return { title: words.title, caption: words.caption, notes, chart: null, takeaway: null };
  const totalLabel = totalsLabel(table.columns.map((c) => c.total.rule));
  const rows: PeriodTableRowInput[] = table.rows.map((r) => ({ period: r.period, partial: r.partial, note: r.covered ? partialShort(r.period, r.covered, ctx.locale) : '', cells: r.cells }));
  const pages = buildPeriodTablePages({
    title: words.title,
    subtitle: subtitleOf(answer, table, ctx),
    footer: chartFooter({ ...answer, caveats: answer.caveats.filter((c) => !partials.includes(c)) }, ctx),
    ...ctx.chart,
    grain: table.grain,
    locale: ctx.locale,
    metrics: table.columns.map((c) => ({ metric: metricByName(ds, c.metric), basis: c.basis })),
    rows,
    total: { label: totalLabel, values: table.columns.map((c) => c.total.value) },
    notes: smallPrint(table, totalLabel, ctx),
  });
  return {
    title: words.title,
    caption: words.caption,
    notes,
    chart: pages[0] ?? null,
    moreCharts: pages.slice(1),
    csv: periodTableCsv(table, totalLabel, ctx.locale),
    textBlocks: periodTableTextBlocks(table, totalLabel, ds, ctx.locale),
    takeaway: words.takeaway ? { importance: 95, text: words.takeaway, leads: true } : null,
  };
};

function subtitleOf(answer: Answer, table: PeriodTableFinding, ctx: PresentContext): string {
  const labels = table.columns.map((c, i) => (i === 0 ? labelAtStart : inSentence)(metricByName(ctx.dataset, c.metric).label));
  return [listJoin(labels), `${GRAIN_ADJECTIVE[table.grain].toLowerCase()}, ${shortWindow(table.span, ctx.stamps, ctx.locale)}`, ...filterSubtitleParts(answer.subQuestion.filters, ctx.dataset)].join(' · ');
}

/** "Total" when every metric sums, "Average" when every one is a level, "Whole period" otherwise. */
function totalsLabel(rules: TotalRule[]): string {
  if (rules.every((r) => r === 'sum')) return 'Total';
  if (rules.every((r) => r === 'mean')) return 'Average';
  return 'Whole period';
}

/** The small print: what the totals row holds, how changes are stated and compared, what each metric means. */
function smallPrint(table: PeriodTableFinding, totalLabel: string, ctx: PresentContext): string[] {
  const ds = ctx.dataset;
  const label = (name: string) => inSentence(metricByName(ds, name).label);
  const byRule = (rule: TotalRule) => table.columns.filter((c) => c.total.rule === rule).map((c) => label(c.metric));
  const totals = [
    byRule('sum').length ? `${listJoin(byRule('sum'))} ${byRule('sum').length === 1 ? 'is' : 'are'} summed` : '',
    byRule('overall').length ? `${listJoin(byRule('overall'))} ${byRule('overall').length === 1 ? 'is' : 'are'} worked out over the whole period` : '',
    byRule('mean').length ? `${listJoin(byRule('mean'))} ${byRule('mean').length === 1 ? 'is' : 'are'} the average of the ${table.grain}s` : '',
  ].filter((s) => s);
  const grain = table.grain;
  const yearEarlier = { calendar: `the same ${grain} a year earlier`, iso_week: 'the same ISO week number a year earlier', weeks_52: 'the same weekday 52 weeks earlier' }[table.yearEarlier];
  const inPoints = table.columns.filter((c) => c.basis === 'points').map((c) => label(c.metric));
  const inUnits = table.columns.filter((c) => c.basis === 'units').map((c) => label(c.metric));
  const basis = [inPoints.length ? `in percentage points for ${listJoin(inPoints)}` : '', inUnits.length ? `in its own units for ${listJoin(inUnits)}` : ''].filter((s) => s);
  const changes = `Changes on the ${grain} before and on ${yearEarlier}, in percent${basis.length ? ` (${basis.join('; ')})` : ''}; colour shows better or worse for the metric, each column on its own scale. ★ and ✖ mark each metric's best and worst complete ${grain} of the whole table.`;
  const meanings = table.columns.flatMap((c) => {
    const m = metricByName(ds, c.metric);
    const meaning = metricDefinition(m, ctx);
    // Words that already start with the metric's label (its kind in words) need no second one.
    return meaning ? [meaning.startsWith(labelAtStart(m.label)) ? meaning : `${labelAtStart(m.label)}: ${meaning}`] : [];
  });
  return [`${capitalise(changes)}`, `${totalLabel} row: ${totals.join('; ')}.`, ...(meanings.length ? [`${meanings.join('; ')}.`] : [])];
}

function partialNote(c: Caveat, locale: string): string {
  const grain = (c.data.grain as Grain | undefined) ?? 'month';
  const day = (v: unknown) => (typeof v === 'string' ? formatPeriod(v, 'day', locale, 'long') : 'n/a');
  return `${capitalise(formatPeriod(String(c.data.period), grain, locale, 'long'))} is partial (data from ${day(c.data.coveredFrom)} to ${day(c.data.coveredTo)}): it is shown, but not ranked, and no change is given for it.`;
}

/** "partial, to 18 Jun" or "partial, from 15 Mar" beside a partial period's label. */
function partialShort(period: string, covered: { from: string; to: string }, locale: string): string {
  const short = (iso: string) => dayMonth(locale).format(new Date(`${iso}T00:00:00Z`));
  return covered.from > period ? `partial, from ${short(covered.from)}` : `partial, to ${short(covered.to)}`;
}

function dayMonth(locale: string): Intl.DateTimeFormat {
  const options = { day: 'numeric', month: 'short', timeZone: 'UTC' } as const;
  try {
    return new Intl.DateTimeFormat(locale, options);
  } catch {
    return new Intl.DateTimeFormat('en', options);
  }
}
