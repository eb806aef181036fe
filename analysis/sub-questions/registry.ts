// Every sub-question, registered once. Its name, kind, lens, rollup needs, SQL, findings,
// caption, chart and plan description come from its own declaration (one file beside this one);
// the rest of the program looks them up here and nowhere else.
import { scopedCaption, scopedTitle, scopeText } from '../captions/scope-words.js';
import type { Presenter } from '../present/presenter.js';
import type { SubQuestion } from '../types.js';
import type { SubQuestionDefinition } from './definition.js';
import { growthDriversSubQuestion } from './growth-drivers.js';
import { growthPeriodsSubQuestion } from './growth-periods.js';
import { growthSeriesSubQuestion } from './growth-series.js';
import { growthShareShiftSubQuestion } from './growth-share-shift.js';
import { growthSummarySubQuestion } from './growth-summary.js';
import { kpiBySegmentSubQuestion } from './kpi-by-segment.js';
import { kpiContextSubQuestion } from './kpi-context.js';
import { kpiMixSubQuestion } from './kpi-mix.js';
import { kpiSnapshotSubQuestion } from './kpi-snapshot.js';
import { performanceBeforeAfterSubQuestion } from './performance-before-after.js';
import { performanceBySegmentSubQuestion } from './performance-by-segment.js';
import { performanceCompareSubQuestion } from './performance-compare.js';
import { performanceFrequencySubQuestion } from './performance-frequency.js';
import { performanceGrowthSubQuestion } from './performance-growth.js';
import { periodTableSubQuestion } from './period-table.js';
import { segmentSharesSubQuestion } from './segment-shares.js';
import { segmentTrendSubQuestion } from './segment-trend.js';
import { seriesSubQuestion } from './series.js';
import { trendSeasonalitySubQuestion } from './trend-seasonality.js';
import { trendSummarySubQuestion } from './trend-summary.js';
import { trendTestSubQuestion } from './trend-test.js';
import { valueCompareSubQuestion } from './value-compare.js';

/** The registered sub-questions; a new one is one entry here. */
const REGISTERED = [
  seriesSubQuestion,
  trendTestSubQuestion,
  trendSeasonalitySubQuestion,
  trendSummarySubQuestion,
  segmentTrendSubQuestion,
  segmentSharesSubQuestion,
  growthSeriesSubQuestion,
  growthDriversSubQuestion,
  growthPeriodsSubQuestion,
  growthSummarySubQuestion,
  growthShareShiftSubQuestion,
  performanceGrowthSubQuestion,
  performanceCompareSubQuestion,
  performanceFrequencySubQuestion,
  performanceBeforeAfterSubQuestion,
  performanceBySegmentSubQuestion,
  kpiSnapshotSubQuestion,
  kpiContextSubQuestion,
  kpiBySegmentSubQuestion,
  kpiMixSubQuestion,
  periodTableSubQuestion,
  valueCompareSubQuestion,
] as const;

/** The name of a registered sub-question (its template). */
export type TemplateName = (typeof REGISTERED)[number]['name'];

/**
 * Every presenter's words carry the sub-question's filters: its title names them, its caption
 * opens with them and its takeaway keeps them beside its text (the summary says a scope every
 * line shares once), so an answer about one segment never reads as one about all.
 */
function scoped(present: Presenter): Presenter {
  return (answer, ctx) => {
    const p = present(answer, ctx);
    const filters = answer.subQuestion.filters;
    if (filters.length === 0) return p;
    const title = scopedTitle(p.title, filters, ctx.dataset);
    // A verdict said first in the summary (and as the digest's title) names the scope too.
    const verdict = p.takeaway?.verdict ? { ...p.takeaway.verdict, statement: scopedTitle(p.takeaway.verdict.statement.replace(/[.\s]+$/, ''), filters, ctx.dataset) } : undefined;
    const takeaway = p.takeaway ? { ...p.takeaway, scope: scopeText(filters, ctx.dataset), ...(verdict ? { verdict } : {}) } : null;
    return { ...p, title, caption: scopedCaption(p.caption, filters, ctx.dataset), takeaway };
  };
}

export const SUB_QUESTIONS: { readonly [N in TemplateName]: SubQuestionDefinition<N> } = Object.fromEntries(
  REGISTERED.map((d) => [d.name, { ...d, present: scoped(d.present) }]),
) as { [N in TemplateName]: SubQuestionDefinition<N> };

export const TEMPLATE_NAMES: readonly TemplateName[] = REGISTERED.map((d) => d.name);

export function isTemplateName(name: string): name is TemplateName {
  return Object.hasOwn(SUB_QUESTIONS, name);
}

/** The declaration of a sub-question's template (a state saved by an older version may name one no longer registered). */
export function definitionOf(sq: Pick<SubQuestion, 'template'>): SubQuestionDefinition {
  const name: string = sq.template;
  if (!isTemplateName(name)) throw new Error(`no sub-question template named ${name}`);
  return SUB_QUESTIONS[name];
}
