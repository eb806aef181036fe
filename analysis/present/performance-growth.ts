// Presenter for "performance_growth": each group's growth, in total and like for like, as bars.
import { groupGrowthWords } from '../captions/performance-growth.js';
import { findOne, groupLabel } from '../captions/performance-words.js';
import { buildGroupCompare } from '../charts/build-group-compare.js';
import { resolveGroup } from '../templates/performance-common.js';
import { primaryMetric } from '../templates/performance-compare.js';
import { performanceHeader, performanceNotes } from './performance-chart.js';
import type { Presenter } from './presenter.js';

export const presentPerformanceGrowth: Presenter = (answer, ctx) => {
  const metric = primaryMetric(ctx.dataset, answer.subQuestion);
  const group = resolveGroup(ctx.dataset, answer.subQuestion);
  const words = groupGrowthWords(answer.findings, { dataset: ctx.dataset, metric, group, locale: ctx.locale, audience: ctx.audience, dataAsOf: ctx.dataAsOf });
  const f = findOne(answer.findings, 'performance_group_growth');
  const anyChanged = !!f && f.groups.some((g) => g.changed.length > 0);
  // A bar per group for its total growth, and one for its like-for-like growth where a unit new or gone sets them apart.
  const bars = f
    ? f.groups.flatMap((g) => {
        const name = groupLabel(group, g.group);
        const total = g.total.relative === null ? [] : [{ label: anyChanged ? `${name}, in total` : name, estimate: g.total.relative, low: null, high: null, n: g.units }];
        const lfl = anyChanged && g.likeForLike?.relative != null ? [{ label: `${name}, like for like`, estimate: g.likeForLike.relative, low: null, high: null, n: g.likeForLike.units }] : [];
        return [...total, ...lfl];
      })
    : [];
  const label = `Growth of ${metric.label.toLowerCase()} against a year earlier`;
  const chart =
    f && bars.length > 0
      ? buildGroupCompare({
          ...performanceHeader(answer, ctx, { title: words.title, label, metric, group, window: f.current }),
          groups: bars,
          format: { unit: 'percent', decimals: 1, locale: ctx.locale },
          valueLabel: label,
        })
      : null;
  return {
    title: words.title,
    caption: words.caption,
    notes: performanceNotes(answer, ctx, words.notes),
    chart,
    takeaway: words.takeaway ? { importance: 70, text: words.takeaway } : null,
  };
};
