// Presenter for "performance_by_segment": one bar per segment showing how far the members' value
// sits above or below the others' (relative difference), small segments marked in their label.
import { bySegmentWords, segmentName } from '../captions/performance-by-segment.js';
import { findAll, groupLabel, inText, quantityLabel, unitsLeftOutSentence } from '../captions/performance-words.js';
import { buildBars } from '../charts/build-bars.js';
import { groupableDimension } from '../catalog.js';
import { resolveGroup } from '../templates/performance-common.js';
import { primaryMetric } from '../templates/performance-compare.js';
import { performanceHeader, performanceNotes } from './performance-chart.js';
import type { Presenter } from './presenter.js';

export const presentPerformanceBySegment: Presenter = (answer, ctx) => {
  const sq = answer.subQuestion;
  const metric = primaryMetric(ctx.dataset, sq);
  const group = resolveGroup(ctx.dataset, sq);
  const dim = groupableDimension(ctx.dataset, sq.dimension ?? '');
  const wctx = { dataset: ctx.dataset, metric, group, locale: ctx.locale, audience: ctx.audience, dataAsOf: ctx.dataAsOf };
  const words = bySegmentWords(answer.findings, wctx, dim);
  const overall = findAll(answer.findings, 'performance_group')[0];
  const label = quantityLabel(metric, overall?.quantity ?? 'metric', ctx.dataset, overall?.unit);
  const compared = findAll(answer.findings, 'performance_segment').filter((s) => s.relative !== null);
  // When every segment points one way, bars of the size of the gap read better than bars hanging
  // left of zero, and the subtitle says which way; mixed directions keep their signs.
  const allLower = compared.length > 0 && compared.every((s) => s.relative! <= 0);
  const allHigher = compared.length > 0 && compared.every((s) => s.relative! >= 0);
  const sense = allLower ? 'lower' : allHigher ? 'higher' : null;
  const item = (s: (typeof compared)[number]) => ({
    label: `${segmentName(s)}${s.small ? ' (small sample)' : ''}`,
    value: sense === 'lower' ? -s.relative! : s.relative!,
  });
  const items = compared.filter((s) => !s.folded).map(item);
  const fold = compared.find((s) => s.folded);
  const members = groupLabel(group, 'members');
  const others = groupLabel(group, 'others');
  const barsLabel = sense
    ? `${label}, % ${sense} for ${inText(members)} than for ${inText(others)}`
    : `${label}, % difference of ${inText(members)} from ${inText(others)}`;
  const all = findAll(answer.findings, 'performance_segment');
  // A side below the minimum group size is withheld, which is not the same as a group being absent.
  const hidden = all.filter((s) => s.suppressedMembers || s.suppressedOthers);
  const missing = all.filter((s) => s.relative === null && !hidden.includes(s));
  const extraNotes = [
    ...(missing.length ? [`${missing.map(segmentName).join(', ')}: only one group present, so no difference is shown.`] : []),
    ...(hidden.length ? [`${hidden.map(segmentName).join(', ')}: a group is too few to show (below the minimum group size), so no difference is shown.`] : []),
  ];
  const chart =
    compared.length > 0
      ? buildBars({
          ...performanceHeader(answer, ctx, {
            title: words.title,
            label: barsLabel,
            metric,
            group,
          }),
          items,
          // The template already folded the tail: its row comes last and nothing is folded again
          // (folding here would add up relative differences).
          folded: fold ? item(fold) : null,
          format: { unit: 'percent', decimals: 1, locale: ctx.locale },
        })
      : null;
  return {
    title: words.title,
    caption: [words.caption, unitsLeftOutSentence(answer.findings, { group, locale: ctx.locale, dataset: ctx.dataset })].filter(Boolean).join(' '),
    notes: performanceNotes(answer, ctx, [...words.notes, ...extraNotes]),
    chart,
    takeaway: words.takeaway ? { importance: words.clear ? 60 : 40, text: words.takeaway } : null,
  };
};
