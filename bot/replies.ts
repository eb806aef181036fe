// The words of every bot post. Plain text with light markdown (bold with *, lists with -),
// which each adapter renders in its platform's way.
import type { DatasetConfig } from '../config/schema.js';
import { formatPeriod } from '../analysis/format.js';
import { addDays } from '../analysis/periods.js';
import type { SubQuestion } from '../analysis/types.js';
import type { Brief } from './brief.js';
import type { Plan } from './plan.js';
import type { Prompt } from './prompts.js';

export function acknowledgement(brief: Brief, ds: DatasetConfig): string {
  const kinds = brief.kinds.map(kindNoun).join(', ');
  const metrics = brief.metrics.map((m) => metricLabel(ds, m)).join(', ');
  return metrics
    ? `On it: a ${kinds} question about ${metrics.toLowerCase()}. A few quick questions first, then a plan to agree.`
    : `On it: a ${kinds} question. A few quick questions first, then a plan to agree.`;
}

export function promptText(p: Prompt): string {
  const options = p.options.map((o, i) => `${i + 1}. ${o.label}`).join('\n');
  return `${p.question}\n${options}\nRecommended: *${p.recommended.label}* (${p.recommended.reason}). Reply with a number, your own words, or "ok" for the recommendation.`;
}

export function planText(plan: Plan, ds: DatasetConfig, locale: string): string {
  const lines = plan.items.map((sq, i) => `${i + 1}. ${describeSubQuestion(sq, ds, locale)}`);
  const gaps = plan.notCovered.length
    ? `\nNot in this plan: ${plan.notCovered.map(kindNoun).join(', ')} questions, which this version cannot answer yet; I have kept to what I can answer well.`
    : '';
  return `Here is the plan:\n${lines.join('\n')}${gaps}\nReply "go" to run it, "drop 2" to remove an item, "weekly" (or another grain) to change the grain, or "cancel".`;
}

export function describeSubQuestion(sq: SubQuestion, ds: DatasetConfig, locale: string): string {
  const metric = sq.metrics.map((m) => metricLabel(ds, m)).join(' and ');
  const span = `${formatPeriod(sq.window.start, 'month', locale, 'long')} to ${formatPeriod(addDays(sq.window.end, -1), 'month', locale, 'long')}`;
  switch (sq.template) {
    case 'series':
      return `${grainAdjective(sq.grain)} ${metric.toLowerCase()} from ${span}, with the highest and lowest ${sq.grain}s marked.`;
    default:
      return `${metric} (${sq.kind}, ${sq.lens.replace('_', ' ')}) from ${span}.`;
  }
}

export function planEditHelp(): string {
  return 'I didn\'t catch that. Reply "go" to run the plan, "drop 2" (or "drop 1 and 3") to remove items, a grain such as "weekly" to change it, or "cancel".';
}

export function catalogText(ds: DatasetConfig): string {
  const metrics = ds.metrics.map((m) => `- *${m.label}* (${m.name}): ${m.description ?? m.definition.type}`).join('\n');
  const dims = ds.dimensions.filter((d) => !d.personal_data).map((d) => d.label).join(', ');
  const groups = ds.comparison_groups.map((g) => `${g.label} (${g.members_label} vs ${g.others_label})`).join(', ');
  return `I can measure these in *${ds.label}*:\n${metrics}\nBroken down by: ${dims || 'nothing yet'}.${groups ? `\nGroups I can compare: ${groups}.` : ''}`;
}

export function runStarted(plan: Plan): string {
  return `Running ${plan.items.length} ${plan.items.length === 1 ? 'question' : 'questions'}. Each answer will appear here as it is ready.`;
}

export function cancelled(): string {
  return 'Cancelled. Nothing more will be posted in this thread; start a new request any time.';
}

function kindNoun(kind: string): string {
  return { trend: 'trend', growth: 'growth', performance: 'performance', kpi: 'KPI snapshot' }[kind] ?? kind;
}

function grainAdjective(g: SubQuestion['grain']): string {
  return { day: 'Daily', week: 'Weekly', month: 'Monthly', quarter: 'Quarterly', year: 'Yearly' }[g];
}

export function metricLabel(ds: DatasetConfig, name: string): string {
  return ds.metrics.find((m) => m.name === name)?.label ?? name;
}
