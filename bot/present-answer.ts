// An answered sub-question as a post (caption, notes, chart PNG, result CSVs, the SQL that
// ran), and the closing summary with the takeaways in order of importance.
import { renderChart } from '../analysis/charts/render.js';
import { presenterFor, type PresentContext } from '../analysis/present/index.js';
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
  return { post: { text, files }, takeaway: presented.takeaway };
};

export const presentSummary: SummaryPresenter = async (takeaways, { workspace, failures }) => {
  const top = [...takeaways].sort((a, b) => b.importance - a.importance || a.position - b.position).slice(0, 5);
  const lines = top.map((t) => `- ${t.text} (see ${t.position})`);
  const failed = failures > 0 ? `\n${failures} ${failures === 1 ? 'question' : 'questions'} could not be answered; see the messages above.` : '';
  const text = lines.length
    ? `*Summary*\n${lines.join('\n')}${failed}\nEach answer above has its table (CSV) and the SQL that produced it attached. These are descriptive figures from ${workspace.dataset.label}; follow your organisation's data-governance rules before sharing further.`
    : `*Summary*\nNo question could be answered; see the messages above.`;
  return { text };
};
