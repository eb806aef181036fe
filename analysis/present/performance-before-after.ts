// Presenter for "performance_before_after": members as the main line, others as the overlay, per
// period across the launch.
import { beforeAfterWords, unitDidWords } from '../captions/performance-before-after.js';
import { day, findOne, groupLabel, inText, quantityFormat, quantityLabel, seriesQuantity, seriesUnit, unitsLeftOutSentence } from '../captions/performance-words.js';
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
  // Per customer (the same customers before and after), or per row or day of each group.
  const words = unitDidWords(answer.findings, wctx) ?? beforeAfterWords(answer.findings, wctx);
  const quantity = seriesQuantity(answer.findings, metric);
  const label = quantityLabel(metric, quantity, ctx.dataset, seriesUnit(answer.findings));
  const members = findOne(answer.findings, 'performance_group_series', (f) => f.group === 'members');
  const others = findOne(answer.findings, 'performance_group_series', (f) => f.group === 'others');
  const hasValues = [members, others].some((s) => s?.points.some((p) => p.value !== null));
  // A group with no values (no pass holder seen before the launch) leaves the chart to the other.
  const membersEmpty = !members?.points.some((p) => p.value !== null);
  // The launch as a thin rule across both lines, so "before" and "after" read off the chart.
  const launchIndex = members && group.launch_date ? periodIndexOf(members.points, group.launch_date, members.grain) : null;
  const chart =
    members && others && hasValues
      ? buildLine({
          ...performanceHeader(answer, ctx, {
            title: words.title,
            // One line only: say whose it is.
            label: membersEmpty ? `${label}, ${inText(groupLabel(group, 'others'))} only` : label,
            metric,
            group,
            extra: group.launch_date ? [`launch ${day(group.launch_date, ctx.locale)}`] : [],
          }),
          seriesLabel: groupLabel(group, membersEmpty ? 'others' : 'members'),
          grain: members.grain,
          points: membersEmpty ? others.points : members.points,
          format: quantityFormat(metric, quantity, ctx.locale),
          ...(membersEmpty ? {} : { overlay: { label: groupLabel(group, 'others'), values: others.points.map((p) => p.value) } }),
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
