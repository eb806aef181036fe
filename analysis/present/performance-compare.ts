// Presenter for "performance_compare": both groups' estimates with interval whiskers and n.
import { compareWords } from '../captions/performance-compare.js';
import { findAll, groupLabel, quantityFormat, quantityLabel, unitsLeftOutSentence } from '../captions/performance-words.js';
import { buildGroupCompare } from '../charts/build-group-compare.js';
import { resolveGroup } from '../templates/performance-common.js';
import { primaryMetric } from '../templates/performance-compare.js';
import { performanceHeader, performanceNotes } from './performance-chart.js';
import type { Presenter } from './presenter.js';

export const presentPerformanceCompare: Presenter = (answer, ctx) => {
  const sq = answer.subQuestion;
  const metric = primaryMetric(ctx.dataset, sq);
  const group = resolveGroup(ctx.dataset, sq);
  const words = compareWords(answer.findings, { dataset: ctx.dataset, metric, group, locale: ctx.locale, audience: ctx.audience, dataAsOf: ctx.dataAsOf });
  const estimates = findAll(answer.findings, 'performance_group').filter((f) => f.metric === metric.name && f.estimate !== null && f.n > 0);
  const quantity = estimates[0]?.quantity ?? 'metric';
  const label = quantityLabel(metric, quantity, ctx.dataset, estimates[0]?.unit);
  const chart =
    estimates.length > 0
      ? buildGroupCompare({
          ...performanceHeader(answer, ctx, { title: words.title, label, metric, group }),
          groups: estimates.map((f) => ({ label: groupLabel(group, f.group), estimate: f.estimate!, low: f.low, high: f.high, n: f.n })),
          format: quantityFormat(metric, quantity, ctx.locale),
          valueLabel: label,
          level: estimates[0]!.confidence,
        })
      : null;
  return {
    title: words.title,
    caption: [words.caption, unitsLeftOutSentence(answer.findings, { group, locale: ctx.locale, dataset: ctx.dataset })].filter(Boolean).join(' '),
    notes: performanceNotes(answer, ctx, words.notes),
    chart,
    takeaway: words.takeaway ? { importance: words.clear ? 70 : 40, text: words.takeaway } : null,
  };
};
