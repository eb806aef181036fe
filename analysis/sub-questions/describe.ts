// A sub-question in plain words for the plan, from its own declaration, with its filters.
import type { DatasetConfig } from '../../config/schema.js';
import { scopeText } from '../captions/scope-words.js';
import type { SubQuestion } from '../types.js';
import { isDayFilter } from '../day-of-week.js';
import { statisticDataset } from '../statistic.js';
import { planWords } from './plan-words.js';
import { definitionOf } from './registry.js';

export function describeSubQuestion(sq: SubQuestion, whole: DatasetConfig, locale: string): string {
  // "median delay": the metric named as the sub-question sees it (analysis/statistic.ts).
  const ds = statisticDataset(whole, sq);
  const text = definitionOf(sq).describe(planWords(sq, ds, locale), sq);
  const scope = scopeText(sq.filters, ds);
  // Days of the week say their own "only" ("Fridays only", analysis/day-of-week.ts).
  return scope ? `${text.replace(/[.?]$/, '')} (${sq.filters.every(isDayFilter) ? scope : `only ${scope}`}).` : text;
}
