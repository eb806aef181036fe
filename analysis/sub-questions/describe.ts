// A sub-question in plain words for the plan, from its own declaration, with its filters.
import type { DatasetConfig } from '../../config/schema.js';
import { scopeText } from '../captions/scope-words.js';
import type { SubQuestion } from '../types.js';
import { planWords } from './plan-words.js';
import { definitionOf } from './registry.js';

export function describeSubQuestion(sq: SubQuestion, ds: DatasetConfig, locale: string): string {
  const text = definitionOf(sq).describe(planWords(sq, ds, locale), sq);
  const scope = scopeText(sq.filters, ds);
  return scope ? `${text.replace(/[.?]$/, '')} (only ${scope}).` : text;
}
