// Charts agree with their titles and their data (issue 17 item 9), over whole plans of every
// request kind, at a monthly and a quarterly grain, over the whole history, a calendar year that
// runs past the data and the last 12 months, on the Skerrywake demo and the two invented datasets
// of other trades (test/helpers/whole-plans.ts). Every chart is drawn and its geometry held to
// analysis/charts/chart-checks.ts; the checks are first shown to catch each fault they name.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { chartProblems, datesNamed } from '../../../analysis/charts/chart-checks.js';
import { renderChartWithGeometry } from '../../../analysis/charts/render.js';
import type { BarsSpec, ChartSpec, LineSpec } from '../../../analysis/charts/spec.js';
import { answerPlans, closeWorkspaces, openPlanWorkspaces, type NamedWorkspace } from '../../helpers/whole-plans.js';

const header = { chip: 'Revenue', footer: [], width: 1200, height: 675, scale: 1 as const };
const euros = { unit: 'currency' as const, currency: 'EUR', locale: 'en-IE' };

function quarterly(values: number[], partialLast: boolean): LineSpec {
  const periods = ['2024-04-01', '2024-07-01', '2024-10-01', '2025-01-01', '2025-04-01'].slice(0, values.length);
  return {
    kind: 'line',
    ...header,
    title: 'Revenue peaked in Q1 2025 at €362K',
    subtitle: 'Total fares · 1 Apr 2024 to 18 Jun 2025 · quarterly',
    seriesLabel: 'Revenue',
    grain: 'quarter',
    format: euros,
    points: values.map((value, i) => ({ label: `Q${((i + 1) % 4) + 1}`, period: periods[i]!, value, partial: partialLast && i === values.length - 1 })),
    marks: [],
  };
}

describe('the checks catch what they name', () => {
  it('a partial period marked as the high, and a title naming another peak', async () => {
    const spec = quarterly([300_000, 330_000, 340_000, 362_000, 508_000], true);
    spec.marks = [
      { role: 'high', index: 4, text: 'High: €508K, Q2 2025' },
      { role: 'low', index: 0, text: 'Low: €300K, Q2 2024' },
    ];
    const { geometry } = await renderChartWithGeometry(spec);
    const problems = chartProblems(spec, geometry, { lastDate: '2025-06-18' });
    expect(problems).toEqual(expect.arrayContaining([expect.stringMatching(/high mark .* on a partial period/), expect.stringMatching(/title names €362K as the high/)]));
  });

  it('a peak in the title with one complete period, the rest partial', async () => {
    const spec = quarterly([362_000, 508_000], true);
    const { geometry } = await renderChartWithGeometry(spec);
    expect(chartProblems(spec, geometry, { lastDate: '2025-06-18' })).toEqual(['title "Revenue peaked in Q1 2025 at €362K" names a peak the chart does not mark']);
  });

  it('a subtitle running past the data', async () => {
    const spec = { ...quarterly([300_000, 330_000, 340_000, 362_000], false), subtitle: 'Total fares · 1 Jan 2025 to 31 Dec 2025 · quarterly' };
    spec.marks = [
      { role: 'high', index: 3, text: 'High: €362K, Q1 2025' },
      { role: 'low', index: 0, text: 'Low: €300K, Q2 2024' },
    ];
    const { geometry } = await renderChartWithGeometry(spec);
    expect(chartProblems(spec, geometry, { lastDate: '2025-06-18' })).toEqual(['subtitle names 31 Dec 2025, after the data ends (2025-06-18)']);
    expect(datesNamed('Jan 1, 2024 to Jun 18, 2025 · Q3 2024 · May 2025').map((d) => d.start)).toEqual(['2024-01-01', '2025-06-18', '2025-05-01', '2024-07-01']);
  });

  it('bars off zero, a growth title over totals, and "fastest" on a tenth of a point', async () => {
    const totals: BarsSpec = {
      kind: 'bars',
      ...header,
      title: 'Saltreach grew fastest: +4.1% a year',
      subtitle: 'Total fares · 2022 to 2024',
      format: euros,
      bars: [
        { label: 'Saltreach', value: 508_000, text: '€508K', other: false },
        { label: 'Tern Holm', value: 480_000, text: '€480K', other: false },
      ],
    };
    const drawn = await renderChartWithGeometry(totals);
    const axisFrom300 = { ...drawn.geometry, valueAxis: { min: 300_000, max: 550_000 } };
    expect(chartProblems(totals, axisFrom300, { lastDate: '2025-06-18' })).toEqual(
      expect.arrayContaining(['bars start at 300000, not zero', expect.stringMatching(/about growth rates, the bars draw currency values/)]),
    );
    const rates: BarsSpec = {
      ...totals,
      format: { unit: 'percent', locale: 'en-IE', decimals: 1 },
      bars: [
        { label: 'Saltreach', value: 0.041, text: '+4.1%', other: false },
        { label: 'Tern Holm', value: 0.04, text: '+4.0%', other: false },
      ],
    };
    const { geometry } = await renderChartWithGeometry(rates);
    expect(chartProblems(rates, geometry, { lastDate: '2025-06-18' })).toEqual([expect.stringMatching(/"fastest" claimed on a margin of 0\.1/)]);
  });
});

describe('every chart of whole plans on three datasets', () => {
  let spaces: NamedWorkspace[] = [];
  beforeAll(async () => {
    spaces = await openPlanWorkspaces();
  }, 120_000);
  afterAll(async () => closeWorkspaces(spaces));

  it('agrees with its title and its data', async () => {
    const problems: string[] = [];
    const kinds = new Set<ChartSpec['kind']>();
    let drawn = 0;
    for (const s of spaces) {
      const seen = new Set<string>();
      for (const a of await answerPlans(s.ws)) {
        for (const audience of ['managers', 'leadership'] as const) {
          const chart = a.presented[audience].chart;
          if (!chart) continue;
          const key = JSON.stringify(chart);
          if (seen.has(key)) continue;
          seen.add(key);
          const { geometry } = await renderChartWithGeometry(chart);
          drawn++;
          kinds.add(chart.kind);
          for (const p of chartProblems(chart, geometry, { lastDate: s.ws.coverage.lastDate! })) {
            problems.push(`${s.name} · ${a.caseLabel} · ${a.answer.subQuestion.template} · ${audience}: ${p}`);
          }
        }
      }
    }
    expect(kinds).toEqual(expect.objectContaining({ size: expect.any(Number) }));
    expect([...kinds]).toEqual(expect.arrayContaining(['line', 'bars', 'pareto', 'growth_grid', 'kpi_card']));
    expect(drawn).toBeGreaterThan(100);
    expect(problems).toEqual([]);
  }, 1_200_000);
});
