// The registry of sub-questions: every request kind is answered through every lens, each
// declaration is complete, and the plan describes each one in plain words.
import { describe, expect, it } from 'vitest';
import { describeSubQuestion } from '../../../analysis/sub-questions/describe.js';
import { definitionOf, isTemplateName, SUB_QUESTIONS, TEMPLATE_NAMES } from '../../../analysis/sub-questions/registry.js';
import { LENSES, REQUEST_KINDS, type SubQuestion } from '../../../analysis/types.js';
import { exampleDataset } from '../../helpers/example-config.js';

describe('sub-question registry', () => {
  it('declares each name once, under its own key', () => {
    expect(new Set(TEMPLATE_NAMES).size).toBe(TEMPLATE_NAMES.length);
    for (const name of TEMPLATE_NAMES) expect(SUB_QUESTIONS[name].name).toBe(name);
    expect(isTemplateName('series')).toBe(true);
    expect(isTemplateName('toString')).toBe(false);
    expect(() => definitionOf({ template: 'no_such' as never })).toThrow(/no sub-question template named no_such/);
  });

  it('answers every request kind through every lens', () => {
    for (const kind of REQUEST_KINDS) {
      for (const lens of LENSES) {
        expect(TEMPLATE_NAMES.some((n) => SUB_QUESTIONS[n].kind === kind && SUB_QUESTIONS[n].lens === lens), `${kind} × ${lens}`).toBe(true);
      }
    }
  });

  it('describes every sub-question in one plain sentence, with no placeholder left', () => {
    const ds = exampleDataset;
    for (const name of TEMPLATE_NAMES) {
      const def = SUB_QUESTIONS[name];
      const sq: SubQuestion = {
        id: 'q1',
        kind: def.kind,
        lens: def.lens,
        template: name,
        metrics: [ds.metrics[0]!.name],
        dimension: ds.dimensions.find((d) => !d.personal_data)!.name,
        grain: 'month',
        window: { start: '2024-01-01', end: '2025-01-01' },
        filters: [],
        ...(ds.comparison_groups[0] ? { comparisonGroup: ds.comparison_groups[0].name } : {}),
      };
      const text = describeSubQuestion(sq, ds, 'en-IE');
      expect(text).toMatch(/^[A-Z].*[.?]$/);
      expect(text).not.toMatch(/undefined|null|NaN|\$\{/);
      // A breakdown's label in the plural is English, not label + "s" ("companys").
      const company = { ...ds, dimensions: ds.dimensions.map((d) => (d.name === sq.dimension ? { ...d, label: 'Company' } : d)) };
      expect(describeSubQuestion(sq, company, 'en-IE')).not.toMatch(/\bcompanys\b/i);
    }
    const drivers: SubQuestion = { id: 'q1', kind: 'growth', lens: 'breakdown', template: 'growth_drivers', metrics: [ds.metrics[0]!.name], dimension: 'route', grain: 'month', window: { start: '2024-01-01', end: '2025-01-01' }, filters: [] };
    const industry = { ...ds, dimensions: ds.dimensions.map((d) => (d.name === 'route' ? { ...d, label: 'Industry' } : d)) };
    expect(describeSubQuestion(drivers, industry, 'en-IE')).toMatch(/^Which industries drove the change/);
  });
});
