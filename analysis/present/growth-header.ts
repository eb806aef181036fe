// Chart subtitles for the growth family's two-span charts: the metric's definition, the two spans
// compared and any filters, so a forwarded image still says what it compares.
import { filterSubtitleParts } from '../captions/scope-words.js';
import type { Metric } from '../../config/schema.js';
import { spanText } from '../captions/growth-words.js';
import type { GrowthSpan } from '../findings/growth.js';
import type { Answer } from '../types.js';
import { metricDefinition } from './header.js';
import type { PresentContext } from './presenter.js';

export function twoSpanSubtitle(answer: Answer, metric: Metric, current: GrowthSpan, prior: GrowthSpan, ctx: PresentContext, perDay = false): string {
  const parts = [metricDefinition(metric, ctx), `${spanText(current, ctx.locale)} against ${spanText(prior, ctx.locale)}`];
  // Asked per day: each span's figure is its daily average (as a per-day series' subtitle says).
  if (perDay) parts.push('average a day');
  parts.push(...filterSubtitleParts(answer.subQuestion.filters, ctx.dataset));
  return parts.filter((p) => p !== '').join(' · ');
}
