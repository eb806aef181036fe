// Chart header pieces the KPI presenters share: a subtitle naming the metric's definition, the
// latest complete period and what it is compared with (not the window, which a snapshot does
// not show), and the shared footer.
import { filterSubtitleParts } from '../captions/scope-words.js';
import type { Metric } from '../../config/schema.js';
import { periodName } from '../captions/kpi-words.js';
import type { Answer, Caveat, Grain } from '../types.js';
import { caveatNotes, chartFooter, metricDefinition } from './header.js';
import type { PresentContext } from './presenter.js';

export function kpiSubtitle(answer: Answer, metric: Metric, ctx: PresentContext, what: string): string {
  const parts = [metricDefinition(metric, ctx), what];
  parts.push(...filterSubtitleParts(answer.subQuestion.filters, ctx.dataset));
  return parts.filter((p) => p !== '').join(' · ');
}

/** "Latest complete month, May 2025, vs April 2025 and May 2024". */
export function comparedText(period: string, bases: (string | null)[], grain: Grain, locale: string): string {
  const named = bases.filter((b): b is string => b !== null).map((b) => periodName(b, grain, locale));
  const latest = `Latest complete ${grain}, ${periodName(period, grain, locale)}`;
  return named.length ? `${latest}, vs ${named.join(' and ')}` : latest;
}

export function kpiHeader(answer: Answer, metric: Metric, title: string, subtitle: string, ctx: PresentContext) {
  return { title, chip: metric.label, subtitle, footer: chartFooter(answer, ctx), ...ctx.chart };
}

/** Caveat notes, leaving out those the caption already states in words. */
export function kpiNotes(answer: Answer, ctx: PresentContext, statedInCaption: Caveat['code'][]): string[] {
  const rest = { ...answer, caveats: answer.caveats.filter((c) => !statedInCaption.includes(c.code)) };
  return caveatNotes(rest, ctx);
}

export function findingOf<T extends { type: string; metric: string }>(answer: Answer, type: T['type'], metric: string): T | undefined {
  return answer.findings.find((f) => f.type === type && 'metric' in f && f.metric === metric) as T | undefined;
}
