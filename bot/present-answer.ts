// An answered sub-question as a post (caption, notes, chart PNG, result CSVs, the SQL that
// ran), and the closing summary with the takeaways in order of importance.
import { statisticDataset } from '../analysis/statistic.js';
import { renderChart } from '../analysis/charts/render.js';
import { renderDigest } from '../analysis/charts/render-digest.js';
import { dataDateWords } from '../analysis/window-words.js';
import { timePhase } from '../analysis/phase-timings.js';
import type { PresentContext } from '../analysis/present/index.js';
import { answerCaveats, measureNotes, threadNotes } from '../analysis/quality/thread-notes.js';
import { definitionOf } from '../analysis/sub-questions/registry.js';
import { sqlForReaders } from '../analysis/sql/render-sql.js';
import { tableToCsv } from '../analysis/table-csv.js';
import type { Answer, Audience } from '../analysis/types.js';
import type { Workspace } from '../analysis/workspace.js';
import type { AnswerPresenter, DigestChart, SummaryPresenter } from './presenters.js';
import { firstClause } from '../analysis/captions/grammar.js';
import { askedDirection, verdictFor, verdictLine, wantsVerdict } from '../analysis/captions/verdict-words.js';
import type { OutgoingFile } from './port.js';

export function presentContext(ws: Workspace, audience: Audience): PresentContext {
  const c = ws.config.charts;
  return { dataset: ws.dataset, locale: c.locale, audience, chart: { width: c.width, height: c.height, scale: c.scale }, dataAsOf: ws.coverage.lastDate, ...(ws.coverage.stamps ? { stamps: ws.coverage.stamps } : {}) };
}

export const presentAnswer: AnswerPresenter = async (answer, { workspace, audience, position, timings }) => {
  const sq = answer.subQuestion;
  // Notes about the data as a whole are said once, in the summary; each post keeps those that change its answer.
  const own = { ...answer, caveats: answerCaveats(answer.caveats, workspace.coverage, sq) };
  const labelOf = (m: string) => workspace.dataset.metrics.find((x) => x.name === m)?.label ?? m;
  const dataNotes = measureNotes(answer.caveats, workspace.coverage, sq, labelOf, workspace.config.charts.locale);
  const presented = timePhase(timings, 'read', () => definitionOf(sq).present(own, { ...presentContext(workspace, audience), dataset: statisticDataset(workspace.dataset, sq) }));
  const stem = `${String(position).padStart(2, '0')}-${sq.template}-${sq.metrics.join('-')}`;
  const files: OutgoingFile[] = [];
  const spec = presented.chart;
  // A long table comes as pages, each an image of its own: "-p1", "-p2"...
  const pages = spec ? [spec, ...(presented.moreCharts ?? [])] : [];
  const pngs = await timePhase(timings, 'render', () => Promise.all(pages.map((p) => renderChart(p))));
  pngs.forEach((png, i) => files.push({ name: pages.length > 1 ? `${stem}-p${i + 1}.png` : `${stem}.png`, kind: 'chart', content: png }));
  const chart = pngs[0] ?? null;
  timePhase(timings, 'post', () => {
    // The reader's table, when the answer has one, is the CSV by the answer's name; the query results sit beside it.
    if (presented.csv !== undefined) files.push({ name: `${stem}.csv`, kind: 'table', content: presented.csv });
    for (const [name, table] of Object.entries(answer.tables)) {
      const single = Object.keys(answer.tables).length === 1 && presented.csv === undefined;
      files.push({ name: single ? `${stem}.csv` : `${stem}-${name}.csv`, kind: 'table', content: tableToCsv(table) });
    }
    files.push({ name: `${stem}.sql`, kind: 'sql', content: sqlForReaders(answer.queries, workspace.source.dialect.name) });
  });
  // An answer from a smaller plan says so before anything else (analysis/smaller-plan.ts).
  const retried = answer.retry ? [`_The first try ${answer.retry.failure}, so this answer was computed again with ${answer.retry.change}._`] : [];
  const text = [`*${position}. ${presented.title}*`, ...retried, presented.caption, ...[...presented.notes, ...(presented.takeaway ? [] : dataNotes)].map((n) => `_Note: ${n}_`)].join('\n');
  const post = { text, files, ...(presented.textBlocks?.length ? { monospace: presented.textBlocks } : {}) };
  const takeaway = presented.takeaway && dataNotes.length > 0 ? { ...presented.takeaway, dataNotes } : presented.takeaway;
  // A table's rows do not survive shrinking to a digest thumbnail; its takeaway leads the digest instead.
  if (spec?.kind === 'period_table') return { post, takeaway, chart: null };
  return { post, takeaway, chart, ...(spec ? { chartSpec: spec } : {}) };
};

export const presentSummary: SummaryPresenter = async (takeaways, { workspace, failures, charts, requestText, timings, items, quality, now }) => {
  // The most important few, told in the order they were asked; a takeaway that leads (the one
  // across a table's metrics) comes first.
  // The answer to a ranking asked ("which species cause the most cost") leads before both.
  const askedAt = new Set((items ?? []).flatMap((sq, i) => (sq.answersAsked ? [i + 1] : [])));
  const first = (t: { position: number; leads?: boolean }) => (askedAt.has(t.position) ? 2 : t.leads ? 1 : 0);
  const top = [...takeaways]
    .sort((a, b) => first(b) - first(a) || b.importance - a.importance || a.position - b.position)
    .slice(0, 5)
    .sort((a, b) => first(b) - first(a) || a.position - b.position);
  // The answer to the question asked comes before everything else: the first verdict in plan order.
  // A request that only names a year-earlier comparison (a table "with the growth on the year
  // before") keeps a leading takeaway first; a yes-or-no question is always answered first.
  // A request that names the periods to compare ("2025 against 2023") wants that verdict too.
  const namedComparison = (items ?? []).some((sq) => sq.compareWindow);
  const verdictFirst = askedDirection(requestText) !== null || ((wantsVerdict(requestText) || namedComparison) && !takeaways.some((t) => t.leads));
  const settled = verdictFirst ? verdictFor(requestText, takeaways) : undefined;
  const verdict = settled ? { text: verdictLine(requestText, settled.verdict!), position: settled.position } : null;
  // A scope every line shares is said once, in the heading; otherwise each line leads with its own.
  const scopes = new Set(top.map((t) => t.scope ?? ''));
  const shared = scopes.size === 1 ? [...scopes][0]! : '';
  const scoped = (t: { text: string; scope?: string }) => (t.scope && !shared ? `Filtered to ${t.scope}. ${t.text}` : t.text);
  // A takeaway the verdict already says word for word (a trend test's title) is not said again.
  // So is one from the same answer whose figures the verdict all gives ("Revenue: €142K … against
  // €145K …" under "No: revenue is 2.0% below …; €142K against €145K").
  const restated = (t: { text: string; position: number }) =>
    !!verdict && t.position === verdict.position && (verdict.text.toLowerCase().includes(t.text.replace(/[.\s]+$/, '').toLowerCase()) || figuresWithin(t.text, verdict.text));
  const listed = top.filter((t) => !restated(t));
  const lines = [...(verdict ? [verdict] : []), ...listed].map((t) => `- ${scoped(t)} (see ${t.position})`);
  const failed = failures > 0 ? `\n${failures} ${failures === 1 ? 'question' : 'questions'} could not be answered; see the messages above.` : '';
  if (top.length === 0) return { text: `*Summary*\nNo question could be answered; see the messages above.` };
  const notes = [...new Set([...threadNotes(items ?? [], quality, workspace, now ?? new Date(), workspace.config.charts.locale), ...takeaways.flatMap((t) => t.dataNotes ?? [])])];
  const about = notes.length ? `\n*About the data* (applies to every answer above)\n${notes.map((n) => `- ${n}`).join('\n')}` : '';
  const text = `*Summary*${shared ? ` (filtered to ${shared})` : ''}\n${lines.join('\n')}${failed}${about}\nEach answer above has its table (CSV) and the SQL that produced it attached; the digest below puts the key charts and takeaways on one page for forwarding. These are descriptive figures from ${workspace.dataset.label}; comparisons between groups are observational, and your organisation's data-governance rules apply before sharing further.`;
  const asOf = workspace.coverage.lastDate ? ` · Data as of ${dataDateWords(workspace.coverage.lastDate, workspace.coverage.stamps, workspace.config.charts.locale)}` : '';
  // The digest is titled with a finding: the verdict, else the first takeaway; the rest are listed under it.
  const [headline, ...rest] = verdict ? [verdict, ...listed] : top;
  const digest = await timePhase(timings, 'render', () => renderDigest({
    // The finding's first clause: a headline, not a paragraph cut at the width.
    title: firstClause(headline!.text).replace(/\.$/, ''),
    subtitle: `${workspace.dataset.label}${shared ? ` (filtered to ${shared})` : ''}, answering: "${requestText.length > 120 ? `${requestText.slice(0, 117)}...` : requestText}"`,
    takeaways: rest.map((t) => ({ text: scoped(t) })),
    charts: distinctCharts(top, charts),
    footer: `Source: ${workspace.dataset.label}${asOf} · Observational figures; follow your organisation's data-governance rules`,
  }));
  return { text, files: [{ name: 'digest.png', kind: 'digest', content: digest }] };
};

/**
 * Up to four charts for the digest, in the takeaways' order, each showing something the others do
 * not: a chart of the same kind and metric as one already chosen (the monthly line and the trend
 * line over it) is left out while two that differ are there, and taken only to avoid a digest of
 * a single chart (issue 17 item 7: not three near-identical lines).
 */
export function distinctCharts(top: { position: number }[], charts: Map<number, DigestChart>): DigestChart[] {
  const withChart = top.filter((t) => charts.has(t.position)).map((t) => charts.get(t.position)!);
  const seen = new Set<string>();
  const firstPick: DigestChart[] = [];
  const later: DigestChart[] = [];
  for (const c of withChart) {
    // Bars of the same metric over different things (two periods; each route's change) differ.
    const over = c.spec?.kind === 'bars' && Array.isArray(c.spec.bars) ? `|${c.spec.bars.map((b) => b.label).sort().join('/')}` : '';
    const key = c.spec ? `${c.spec.kind}|${c.spec.chip ?? c.spec.title}${over}` : `png|${firstPick.length + later.length}`;
    (seen.has(key) ? later : firstPick).push(c);
    seen.add(key);
  }
  return (firstPick.length >= 2 ? firstPick : [...firstPick, ...later]).slice(0, 4);
}

/**
 * The figures of a text (amounts with a currency, a unit suffix, a percent, a decimal point or a
 * thousands comma; not bare day or year numbers, which the two texts may write differently).
 */
function figuresOf(text: string): string[] {
  return [...text.matchAll(/[€$£¥]?\d[\d,]*(?:\.\d+)?\s?(?:[KMBkmb]\b|%|pts\b)?/g)]
    .map((m) => m[0].trim())
    .filter((f) => /[€$£¥%,.]|[KMBkmb]$|pts$/.test(f));
}

/** True when the text has figures and the other text gives every one of them. */
function figuresWithin(text: string, other: string): boolean {
  const figures = figuresOf(text);
  const given = new Set(figuresOf(other));
  return figures.length > 0 && figures.every((f) => given.has(f));
}
