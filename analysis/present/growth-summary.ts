// Presenter for "growth_summary": a line of the growth rates with the highest and lowest marked.
import { buildLine } from '../charts/build-line.js';
import { growthSummaryWords, rateBasisText } from '../captions/growth-summary-caption.js';
import { capitalise, growthNotes } from '../captions/growth-words.js';
import { metricByName } from '../catalog.js';
import { valueFormatOf } from '../format.js';
import type { Finding } from '../types.js';
import { chartFooter, chartSubtitle } from './header.js';
import type { Presenter } from './presenter.js';

export const presentGrowthSummary: Presenter = (answer, ctx) => {
  const metric = metricByName(ctx.dataset, answer.subQuestion.metrics[0]!);
  const f = answer.findings.find(
    (x): x is Extract<Finding, { type: 'growth_rate_summary' }> => x.type === 'growth_rate_summary' && x.metric === metric.name,
  );
  const words = growthSummaryWords(metric, f, ctx.locale, ctx.audience);
  const chart =
    f && f.n > 0
      ? buildLine({
          title: words.title,
          chip: metric.label,
          subtitle: chartSubtitle(answer, metric, ctx),
          footer: chartFooter(answer, ctx),
          ...ctx.chart,
          seriesLabel: capitalise(`change ${rateBasisText(f)}`),
          grain: f.grain,
          points: f.rates.map((r) => ({ period: r.period, value: r.value, partial: false })),
          format: f.measure === 'units' ? valueFormatOf(metric, ctx.locale) : { unit: 'percent', decimals: 1, locale: ctx.locale },
        })
      : null;
  return {
    title: words.title,
    caption: words.caption,
    notes: growthNotes(answer, ctx.locale, ctx.dataset),
    chart,
    takeaway: chart ? { importance: 40, text: words.caption } : null,
  };
};
