// Presenter for "trend_seasonality": the seasonal profile (index per calendar month with its
// range across years); without enough history, the weekday pattern as bars instead.
import { buildBars } from '../charts/build-bars.js';
import { buildSeasonalProfile } from '../charts/build-seasonal-profile.js';
import { seasonalityWords } from '../captions/trend-seasonality-caption.js';
import { weekdayName } from '../captions/trend-words.js';
import { isAdditive, metricByName, quantityKind } from '../catalog.js';
import type { TrendSeasonalityFinding, TrendWeekdayFinding } from '../findings/segments.js';
import { valueFormatOf } from '../format.js';
import { caveatNotes, chartFooter, chartSubtitle } from './header.js';
import type { Presenter } from './presenter.js';

export const presentTrendSeasonality: Presenter = (answer, ctx) => {
  const sq = answer.subQuestion;
  const metric = metricByName(ctx.dataset, sq.metrics[0]!);
  const additive = isAdditive(metric);
  const words = seasonalityWords(metric, additive, answer.findings, ctx.audience, ctx.locale, sq.perDay === true, sq.weekdaysAsked === true);
  const s = answer.findings.find((f): f is TrendSeasonalityFinding => f.type === 'trend_seasonality' && f.metric === metric.name);
  const w = answer.findings.find((f): f is TrendWeekdayFinding => f.type === 'trend_weekday' && f.metric === metric.name);
  // Asked about the days of the week: their bars answer it; the months are in the caption.
  const weekdayBars = w && w.days.some((d) => d.level !== null) ? w : undefined;
  const profile = s && !(sq.weekdaysAsked && weekdayBars) ? s : undefined;
  // The profile is monthly whatever grain was asked for, so the subtitle says "monthly"; the
  // weekday bars are each day's average (a flow) or level, by day of the week.
  const subtitle = profile
    ? chartSubtitle({ ...answer, subQuestion: { ...sq, grain: 'month' } }, metric, ctx)
    : `${chartSubtitle(answer, metric, ctx, { grain: false })} · ${additive ? 'average a day, by day of the week' : 'by day of the week'}`;
  const header = { title: words.title, chip: metric.label, subtitle, footer: chartFooter(answer, ctx), ...ctx.chart };
  let chart = null;
  if (profile) {
    chart = buildSeasonalProfile({
      ...header,
      months: profile.months.map((m) => ({ month: m.month, index: m.index, min: m.min, max: m.max })),
      locale: ctx.locale,
      flow: quantityKind(metric) === 'flow',
      rangeLabel: profile.rangeFromYear !== null && profile.rangeToYear !== null ? `Range across ${profile.rangeFromYear}–${profile.rangeToYear}` : 'Range across years',
      ...(profile.model === 'additive' ? { deviationFormat: valueFormatOf(metric, ctx.locale) } : {}),
      // A flow's index is of monthly totals, which favour long months; the caption gives the
      // per-day order where it differs. Totals are kept: they are what a monthly report adds up.
      ...(profile.model !== 'additive' && additive ? { indexTitle: 'Index of monthly totals (average month = 1.0)' } : {}),
    });
  } else if (weekdayBars) {
    chart = buildBars({
      ...header,
      items: weekdayBars.days.flatMap((d) => (d.level === null ? [] : [{ label: weekdayName(d.isoDay, ctx.locale), value: d.level }])),
      format: valueFormatOf(metric, ctx.locale),
      topN: 7,
    });
  }
  return {
    title: words.title,
    caption: words.caption,
    notes: caveatNotes(answer, ctx),
    chart,
    takeaway: s || (sq.weekdaysAsked && weekdayBars) ? { importance: 55, text: words.title } : null,
  };
};
