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
  const out: string[] = ['Here is the plan:'];
  let kind: string | undefined;
  plan.items.forEach((sq, i) => {
    if (sq.kind !== kind) {
      kind = sq.kind;
      out.push(`*${capitalise(kindNoun(sq.kind))}*`);
    }
    out.push(`${i + 1}. ${describeSubQuestion(sq, ds, locale)}`);
  });
  if (plan.readings.length) out.push(`How I read the dates: ${plan.readings.join('; ')}.`);
  if (plan.leftOut.length) out.push(`Left out to keep this focused: ${plan.leftOut.map((sq) => describeSubQuestion(sq, ds, locale).replace(/\.$/, '')).join('; ')}.`);
  if (plan.notCovered.length) out.push(`Not in this plan: ${plan.notCovered.map(kindNoun).join(', ')} questions, which this version cannot answer yet.`);
  out.push('Reply "go" to run it, "drop 2" to remove an item, "weekly" (or another grain) to change the grain, or "cancel".');
  return out.join('\n');
}

export function describeSubQuestion(sq: SubQuestion, ds: DatasetConfig, locale: string): string {
  const metric = sq.metrics.map((m) => metricLabel(ds, m)).join(' and ').toLowerCase();
  const dim = (sq.dimension ? ds.dimensions.find((d) => d.name === sq.dimension)?.label ?? sq.dimension : '').toLowerCase();
  const group = ds.comparison_groups.find((g) => g.name === sq.comparisonGroup);
  const span = `${formatPeriod(sq.window.start, 'month', locale, 'long')} to ${formatPeriod(addDays(sq.window.end, -1), 'month', locale, 'long')}`;
  const grain = grainAdjective(sq.grain).toLowerCase();
  const vs = group ? `${group.members_label.toLowerCase()} vs ${group.others_label.toLowerCase()}` : '';
  const text: Record<string, string> = {
    series: `${capitalise(grain)} ${metric}, ${span}, with the highest and lowest ${sq.grain}s marked.`,
    trend_test: `Is ${metric} trending up or down (${span})? Direction, strength and the change since the peak.`,
    trend_seasonality: `Which calendar months are busiest and quietest for ${metric}, and how consistently across years.`,
    trend_summary: `Summary statistics of ${grain} ${metric} (${span}): range, mean, median, spread and outliers.`,
    segment_trend: `${capitalise(metric)} by ${dim} over time, with each ${dim}'s own trend.`,
    segment_shares: `Each ${dim}'s share of ${metric} (${span}), and how concentrated it is.`,
    growth_series: `How fast ${metric} is growing: ${grain} change on the previous period and on the same period last year.`,
    growth_drivers: `Which ${dim}s drove the change in ${metric}, ${span} against a year earlier.`,
    growth_summary: `Summary of ${grain} growth rates of ${metric}: best, worst, typical.`,
    growth_share_shift: `How each ${dim}'s share of ${metric} shifted, ${span} against a year earlier.`,
    performance_compare: `${capitalise(metric)}: ${vs} (${span}), with a significance test and a verdict.`,
    performance_frequency: `How often ${vs} book (${span}): bookings per customer.`,
    performance_before_after: `${capitalise(metric)} before and after the ${group?.label ?? 'programme'} launch, for ${vs}.`,
    performance_by_segment: `${capitalise(metric)}: ${vs} within each ${dim}.`,
    kpi_snapshot: `Where ${metric} stands in the latest complete ${sq.grain}, against the ${sq.grain} before and a year earlier.`,
    kpi_context: `How the latest ${sq.grain} of ${metric} compares with its whole history.`,
    kpi_by_segment: `The latest ${metric} by ${dim}, with changes on a year earlier.`,
    kpi_mix: `Each ${dim}'s share of ${metric} in the latest complete ${sq.grain}, against a year earlier.`,
  };
  return text[sq.template] ?? `${capitalise(metric)} (${sq.kind}, ${sq.lens.replace('_', ' ')}), ${span}.`;
}

function capitalise(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
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
