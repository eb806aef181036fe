// Presenter for "performance_before_after": members as the main line, others as the overlay, per
// period across the launch.
import { beforeAfterWords } from '../captions/performance-before-after.js';
import { day, findOne, groupLabel, quantityFormat, quantityLabel, seriesQuantity, seriesUnit, unitsLeftOutSentence } from '../captions/performance-words.js';
import { buildLine, periodIndexOf } from '../charts/build-line.js';
import { resolveGroup } from '../templates/performance-common.js';
import { primaryMetric } from '../templates/performance-compare.js';
import { performanceHeader, performanceNotes } from './performance-chart.js';
import type { Presenter } from './presenter.js';

export const presentPerformanceBeforeAfter: Presenter = (answer, ctx) => {
  const sq = answer.subQuestion;
  const metric = primaryMetric(ctx.dataset, sq);
  const group = resolveGroup(ctx.dataset, sq);
  const wctx = { dataset: ctx.dataset, metric, group, locale: ctx.locale, audience: ctx.audience, dataAsOf: ctx.dataAsOf };
  const words = beforeAfterWords(answer.findings, wctx);
  const quantity = seriesQuantity(answer.findings, metric);
  const label = quantityLabel(metric, quantity, ctx.dataset, seriesUnit(answer.findings));
  const members = findOne(answer.findings, 'performance_group_series', (f) => f.group === 'members');
  const others = findOne(answer.findings, 'performance_group_series', (f) => f.group === 'others');
  const hasValues = [members, others].some((s) => s?.points.some((p) => p.value !== null));
  // The launch as a thin rule across both lines, so "before" and "after" read off the chart.
  const launchIndex = members && group.launch_date ? periodIndexOf(members.points, group.launch_date, members.grain) : null;
  const chart =
    members && others && hasValues
      ? buildLine({
          ...performanceHeader(answer, ctx, {
            title: words.title,
            label,
            metric,
            group,
            extra: group.launch_date ? [`launch ${day(group.launch_date, ctx.locale)}`] : [],
          }),
          seriesLabel: groupLabel(group, 'members'),
          grain: members.grain,
          points: members.points,
          format: quantityFormat(metric, quantity, ctx.locale),
          overlay: { label: groupLabel(group, 'others'), values: others.points.map((p) => p.value) },
          events: launchIndex === null ? [] : [{ index: launchIndex, label: `${group.label} launch` }],
        })
      : null;
  return {
    title: words.title,
    caption: [words.caption, unitsLeftOutSentence(answer.findings, { group, locale: ctx.locale, dataset: ctx.dataset })].filter(Boolean).join(' '),
    notes: performanceNotes(answer, ctx, words.notes),
    chart,
    takeaway: words.takeaway ? { importance: words.clear ? 65 : 40, text: words.takeaway } : null,
  };
};
