// Presenter for "performance_frequency": mean per unit (e.g. bookings per customer) of both groups
// with interval whiskers and the number of units.
import { frequencyFormat, frequencyWords, perUnitLabel } from '../captions/performance-frequency.js';
import { findAll, groupLabel } from '../captions/performance-words.js';
import { buildGroupCompare } from '../charts/build-group-compare.js';
import { resolveGroup } from '../templates/performance-common.js';
import { primaryMetric } from '../templates/performance-compare.js';
import { performanceHeader, performanceNotes } from './performance-chart.js';
import type { Presenter } from './presenter.js';

export const presentPerformanceFrequency: Presenter = (answer, ctx) => {
  const sq = answer.subQuestion;
  const metric = primaryMetric(ctx.dataset, sq);
  const group = resolveGroup(ctx.dataset, sq);
  const wctx = { dataset: ctx.dataset, metric, group, locale: ctx.locale, audience: ctx.audience, dataAsOf: ctx.dataAsOf };
  const words = frequencyWords(answer.findings, wctx);
  const label = perUnitLabel(metric, wctx);
  const groups = findAll(answer.findings, 'performance_frequency_group').filter((f) => f.units > 0);
  const chart =
    groups.length > 0
      ? buildGroupCompare({
          ...performanceHeader(answer, ctx, { title: words.title, label, metric, group }),
          groups: groups.map((f) => ({ label: groupLabel(group, f.group), estimate: f.mean, low: f.low, high: f.high, n: f.units })),
          format: frequencyFormat(metric, ctx.locale),
          valueLabel: label,
          level: groups[0]!.confidence,
        })
      : null;
  return {
    title: words.title,
    caption: words.caption,
    notes: performanceNotes(answer, ctx, words.notes),
    chart,
    takeaway: words.takeaway ? { importance: words.clear ? 70 : 40, text: words.takeaway } : null,
  };
};
