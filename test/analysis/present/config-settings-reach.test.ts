// Issue 15 item 7: every display setting of a metric in the config (unit, currency, decimals,
// unit_label) and the charts' locale reaches every caption and every chart of every template.
// One sub-question per template on the demo data (test/helpers/template-cases.ts) is answered
// once, then presented with the settings changed: every currency metric in Swiss francs with
// three decimals, every count named in its own unit, and the locale German. Formats follow
// ECMA-402 Intl.NumberFormat (Node's CLDR data): en-IE writes "CHF 12.345", de-DE "12,345 CHF".
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { Presented } from '../../../analysis/present/presenter.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import type { Answer, Audience } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import type { DatasetConfig } from '../../../config/schema.js';
import { loadConfig } from '../../../config/load.js';
import { demoFixture } from '../../helpers/demo-fixture.js';
import { CASES } from '../../helpers/template-cases.js';

let ws: Workspace;
const answers: Answer[] = [];

beforeAll(async () => {
  const demo = await demoFixture();
  ws = await openWorkspace(loadConfig(demo.configPath));
  for (const sq of CASES) answers.push(await answerSubQuestion(sq, ws));
}, 600_000);
afterAll(async () => {
  await ws?.source.close();
});

/** The demo's catalog with every currency metric in CHF at three decimals and each count named in its unit. */
function restyled(ds: DatasetConfig): DatasetConfig {
  return {
    ...ds,
    metrics: ds.metrics.map((m) =>
      m.unit === 'currency' ? { ...m, currency: 'CHF', decimals: 3 } : m.unit === 'count' ? { ...m, unit_label: `${m.name}_u` } : m,
    ),
  };
}

/** Every text a reader sees: title, caption, notes, takeaway, and every string in the chart specs. */
function texts(p: Presented): string[] {
  const out = [p.title, p.caption, ...p.notes, ...(p.takeaway ? [p.takeaway.text] : [])];
  const walk = (v: unknown) => {
    if (typeof v === 'string') out.push(v);
    else if (Array.isArray(v)) v.forEach(walk);
    else if (v && typeof v === 'object') Object.values(v).forEach(walk);
  };
  walk(p.chart);
  walk(p.moreCharts ?? []);
  walk(p.textBlocks ?? []);
  return out;
}

function presentAll(locale: string, audience: Audience): { template: string; texts: string[]; formats: Record<string, unknown>[] }[] {
  const dataset = restyled(ws.dataset);
  return answers.map((a) => {
    const p = SUB_QUESTIONS[a.subQuestion.template].present(a, { dataset, locale, audience, chart: { width: 1200, height: 675, scale: 1 }, dataAsOf: ws.coverage.lastDate });
    const formats: Record<string, unknown>[] = [];
    const walk = (v: unknown) => {
      if (Array.isArray(v)) v.forEach(walk);
      else if (v && typeof v === 'object') {
        const o = v as Record<string, unknown>;
        if (typeof o.unit === 'string' && typeof o.locale === 'string') formats.push(o);
        Object.values(o).forEach(walk);
      }
    };
    walk([p.chart, ...(p.moreCharts ?? [])]);
    return { template: a.subQuestion.template, texts: texts(p), formats };
  });
}

describe('config settings reach every caption and chart', () => {
  for (const audience of ['managers', 'analysts'] as const) {
    it(`currency and decimals (${audience}): no euro left anywhere, and every franc amount below a thousand has three decimals`, () => {
      const problems: string[] = [];
      let francs = 0;
      for (const r of presentAll('en-IE', audience)) {
        for (const t of r.texts) {
          if (/€|\bEUR\b/.test(t)) problems.push(`${r.template}: euro in "${t}"`);
          for (const m of t.matchAll(/CHF\s?(\d[\d,]*)(\.\d+)?([KMB])?/g)) {
            francs++;
            if (!m[3] && !m[1]!.includes(',') && (m[2] ?? '').length !== 4) problems.push(`${r.template}: "${m[0]}" in "${t}" has not three decimals`);
          }
        }
        for (const f of r.formats) if (f.unit === 'currency' && f.currency !== 'CHF') problems.push(`${r.template}: chart format in ${String(f.currency)}`);
      }
      expect(problems).toEqual([]);
      expect(francs).toBeGreaterThan(20);
    });
  }

  it('locale: with de-DE every franc amount is written the German way (the code after the number)', () => {
    const problems: string[] = [];
    let francs = 0;
    for (const r of presentAll('de-DE', 'managers')) {
      for (const t of r.texts) {
        if (/CHF\s?[\d−+-]/.test(t)) problems.push(`${r.template}: English-style "${t}"`);
        francs += [...t.matchAll(/\d\s?(?:Mio\.\s)?CHF/g)].length;
      }
      for (const f of r.formats) if (f.locale !== 'de-DE') problems.push(`${r.template}: chart format in ${String(f.locale)}`);
    }
    expect(problems).toEqual([]);
    expect(francs).toBeGreaterThan(20);
  });

  it('unit label: every chart format of a count carries its unit’s name, and the captions of count answers name it', () => {
    const problems: string[] = [];
    let counted = 0;
    const all = presentAll('en-IE', 'managers');
    for (const r of all) {
      for (const f of r.formats) {
        if (f.unit !== 'count') continue;
        counted++;
        if (!f.label) problems.push(`${r.template}: count format without its label`);
      }
    }
    expect(problems).toEqual([]);
    // segment_trend draws growth rates (percent) since issue 17 item 9, so two count charts remain.
    expect(counted).toBeGreaterThanOrEqual(2);
    // Captions that state a count's value name its unit: bookings' trend and summary, passengers' seasonality by day.
    for (const [template, label] of [['trend_test', 'bookings_u'], ['growth_series', 'bookings_u']] as const) {
      const r = all.find((x) => x.template === template)!;
      expect(r.texts.slice(0, 2).join(' ')).toContain(label);
    }
  });
});
