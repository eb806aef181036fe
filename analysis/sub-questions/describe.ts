// A sub-question in plain words for the plan, from its own declaration.
import type { DatasetConfig } from '../../config/schema.js';
import type { SubQuestion } from '../types.js';
import { planWords } from './plan-words.js';
import { definitionOf } from './registry.js';

export function describeSubQuestion(sq: SubQuestion, ds: DatasetConfig, locale: string): string {
  return definitionOf(sq).describe(planWords(sq, ds, locale), sq);
}
