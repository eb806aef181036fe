// Every sub-question template by name (one file per family beside this one).
import type { SubQuestion } from '../types.js';
import { seriesTemplate } from './series.js';
import type { Template } from './template.js';

export type { ReadContext, Reading, Template } from './template.js';

export const TEMPLATES: Record<string, Template> = {
  [seriesTemplate.name]: seriesTemplate,
};

export function templateFor(sq: SubQuestion): Template {
  const t = TEMPLATES[sq.template];
  if (!t) throw new Error(`no template named ${sq.template}`);
  return t;
}
