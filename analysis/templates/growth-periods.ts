// Template "growth_periods": the two periods a request named ("2009 vs 2008"), the metric over
// each (growth × summary). The spans are the ones every growth comparison uses (comparedSpans);
// each side is one aggregate over its dates, so a level is its mean reading and a flow its total.
import { isAdditive, metricByName, metricPercentScale } from '../catalog.js';
import { type CompileContext, measureSql, rowCountSql, tableRef } from '../compile-context.js';
import type { GrowthPeriodsFinding } from '../findings/growth.js';
import { QueryBuilder } from '../sql/query-builder.js';
import { percentChange } from '../stats/index.js';
import type { CompiledQuery, Finding, SubQuestion } from '../types.js';
import { comparedSpans, perDaySpanDays, readWindowComparison, sidesSql } from './growth-compare.js';
import type { Reading, Template } from './template.js';

const WINDOW = '__tc_window';
const DAY = '__tc_day';

export function compilePeriodsComparison(asked: SubQuestion, ctx: CompileContext): CompiledQuery {
  const spans = comparedSpans(asked, ctx.coverage);
  const sq = { ...asked, window: spans.current };
  const q = new QueryBuilder(ctx.dialect);
  const d = ctx.dialect;
  const [win, day] = [q.ident(WINDOW), q.ident(DAY)];
  const table = tableRef(q, ctx);
  const sides = sidesSql(q, ctx, sq, spans.prior, { table, win, day, first: q.ident('__tc_first'), last: q.ident('__tc_last') }, spans.asked);
  const measures = sq.metrics.map((name) => `  ${measureSql(q, ctx, metricByName(ctx.dataset, name))} AS ${q.ident(name)}`);
  // Shaped as the grand-total rows of the window comparison, so one reader serves both.
  return q.finish(`${sides}
SELECT ${win} AS window_name,
  1 AS g_segment,
  1 AS g_lfl,
${measures.join(',\n')},
  ${d.toDouble(rowCountSql(q, ctx))} AS row_count,
  MIN(${day}) AS first_day,
  MAX(${day}) AS last_day
FROM tagged
GROUP BY 1
ORDER BY 1`);
}

export const growthPeriodsTemplate: Template = {
  compile: (sq, ctx) => [{ name: 'periods', ...compilePeriodsComparison(sq, ctx) }],
  read: (sq, tables, ctx): Reading => {
    const cmp = readWindowComparison(sq, tables.periods ?? { columns: [], rows: [], truncated: false }, ctx.coverage);
    if (cmp.empty) return { findings: [], caveats: cmp.caveats };
    const findings: Finding[] = [];
    for (const metric of sq.metrics) {
      const additive = isAdditive(metricByName(ctx.dataset, metric));
      // A sum over no rows is zero once the side is in the data at all; anything else stays unknown.
      const side = (s: typeof cmp.current) => s.total?.values[metric] ?? (additive && s.total ? 0 : null);
      const totalOf = (before: number | null, after: number | null): GrowthPeriodsFinding['total'] => ({
        before,
        after,
        change: before !== null && after !== null ? after - before : null,
        // No percentage of a signed quantity (jobs added, below zero in a downturn) or off a tiny base.
        relative: percentChange(before, after, metricPercentScale(metricByName(ctx.dataset, metric), [before, after], additive)),
      });
      const [before, after] = [side(cmp.prior), side(cmp.current)];
      const totals = totalOf(before, after);
      // Asked per day: each span's daily average, the totals kept beside.
      const days = perDaySpanDays(sq, ctx.dataset, metric, cmp);
      const f: GrowthPeriodsFinding = {
        type: 'growth_periods',
        metric,
        current: cmp.currentSpan,
        prior: cmp.priorSpan,
        additive,
        total: days ? totalOf(before === null ? null : before / days.before, after === null ? null : after / days.after) : totals,
        ...(days ? { perDay: { days, totals } } : {}),
      };
      findings.push(f);
    }
    return { findings, caveats: cmp.caveats };
  },
};
