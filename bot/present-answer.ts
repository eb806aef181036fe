// An answered sub-question as a post (caption, notes, chart PNG, result CSVs, the SQL that
// ran), and the closing summary with the takeaways in order of importance.
import { renderChart } from '../analysis/charts/render.js';
import { presenterFor, type PresentContext, type Presented } from '../analysis/present/index.js';
import { sqlForReaders } from '../analysis/sql/render-sql.js';
import { tableToCsv } from '../analysis/table-csv.js';
import type { Answer, Audience } from '../analysis/types.js';
import type { Workspace } from '../analysis/workspace.js';
import type { AnswerPresenter, SummaryPresenter } from './Bot.js';
import type { OutgoingFile } from './port.js';

export function presentContext(ws: Workspace, audience: Audience): PresentContext {
  const c = ws.config.charts;
  return { dataset: ws.dataset, locale: c.locale, audience, chart: { width: c.width, height: c.height, scale: c.scale }, dataAsOf: ws.coverage.lastDate };
}

export const presentAnswer: AnswerPresenter = async (answer, { workspace, audience, position }) => {
  const sq = answer.subQuestion;
  const presented = presenterFor(sq.template)(answer, presentContext(workspace, audience));
  const stem = `${String(position).padStart(2, '0')}-${sq.template}-${sq.metrics.join('-')}`;
  const files: OutgoingFile[] = [];
  if (presented.chart) files.push({ name: `${stem}.png`, kind: 'chart', content: await renderChart(presented.chart) });
  for (const [name, table] of Object.entries(answer.tables)) {
    files.push({ name: Object.keys(answer.tables).length === 1 ? `${stem}.csv` : `${stem}-${name}.csv`, kind: 'table', content: tableToCsv(table) });
  }
  files.push({ name: `${stem}.sql`, kind: 'sql', content: sqlForReaders(answer.queries, workspace.source.dialect.name) });
  const text = [`*${position}. ${presented.title}*`, presented.caption, ...presented.notes.map((n) => `_Note: ${n}_`)].join('\n');
  return { text, files };
};

export const presentSummary: SummaryPresenter = (answers, { workspace, audience }) => {
  const ctx = presentContext(workspace, audience);
  const takeaways = answers
    .map((a, i) => ({ presented: presenterFor(a.subQuestion.template)(a, ctx) as Presented, position: i + 1 }))
    .filter((x) => x.presented.takeaway)
    .sort((a, b) => b.presented.takeaway!.importance - a.presented.takeaway!.importance || a.position - b.position)
    .slice(0, 5);
  const lines = takeaways.map((t) => `- ${t.presented.takeaway!.text} (see ${t.position})`);
  const text = lines.length
    ? `*Summary*\n${lines.join('\n')}\nEach answer above has its table (CSV) and the SQL that produced it attached. These are descriptive figures from ${workspace.dataset.label}; follow your organisation's data-governance rules before sharing further.`
    : '*Summary*\nNo question could be answered; see the messages above.';
  return { text };
};
