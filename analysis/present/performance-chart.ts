// Chart header and notes shared by the performance presenters: the subtitle names the compared
// quantity, the window actually compared and the two groups, so a forwarded image stands alone.
import { filterSubtitleParts } from '../captions/scope-words.js';
import type { ComparisonGroup, Metric } from '../../config/schema.js';
import { caveatNotes, chartFooter, metricDefinition } from './header.js';
import type { PresentContext } from './presenter.js';
import { findOne, windowText } from '../captions/performance-words.js';
import type { ChartHeader } from '../charts/spec.js';
import type { Answer, DateWindow } from '../types.js';

export function performanceHeader(
  answer: Answer,
  ctx: PresentContext,
  opts: { title: string; label: string; metric: Metric; group: ComparisonGroup; window?: DateWindow; extra?: string[] },
): ChartHeader {
  const win = opts.window ?? findOne(answer.findings, 'performance_window') ?? answer.subQuestion.window;
  const parts = [
    // The chip names the metric; a label of its own ("% lower for …") still leads the subtitle.
    opts.label === opts.metric.label ? metricDefinition(opts.metric, ctx) : [opts.label, metricDefinition(opts.metric, ctx)].filter((p) => p !== '').join(': '),
    windowText(win, ctx.locale),
    `${opts.group.label}: ${opts.group.members_label} vs ${opts.group.others_label}`,
    ...(opts.extra ?? []),
  ];
  parts.push(...filterSubtitleParts(answer.subQuestion.filters, ctx.dataset));
  return { title: opts.title, chip: opts.metric.label, subtitle: parts.filter((p) => p !== '').join(' · '), footer: chartFooter(answer, ctx), ...ctx.chart };
}

/** Caveat notes plus the presenter's own; leadership captions already carry the observational caution. */
export function performanceNotes(answer: Answer, ctx: PresentContext, extra: string[]): string[] {
  const caveats = ctx.audience === 'leadership' ? { ...answer, caveats: answer.caveats.filter((c) => c.code !== 'observational') } : answer;
  return [...new Set([...extra, ...caveatNotes(caveats, ctx)])];
}
