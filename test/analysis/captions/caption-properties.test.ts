// Captions agree with their tables, on three datasets: the Skerrywake demo and the two invented
// fixture datasets of other trades (a support desk, a subscription app). Every registered
// sub-question runs on each, whole and filtered to one segment, and each presented answer passes
// the checks in test/helpers/caption-checks.ts. The checks themselves are shown to catch a
// flipped direction word and a dropped filter.
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import { isAdditive, isBreakdownDimension, metricByName, plainCountMetric } from '../../../analysis/catalog.js';
import { dataEnd } from '../../../analysis/coverage.js';
import type { SegmentSharesFinding } from '../../../analysis/findings/segments.js';
import { SUB_QUESTIONS, TEMPLATE_NAMES, type TemplateName } from '../../../analysis/sub-questions/registry.js';
import type { Answer, SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { loadConfig } from '../../../config/load.js';
import { presentContext } from '../../../bot/present-answer.js';
import { captionProblems, figuresIn } from '../../helpers/caption-checks.js';
import { demoFixture } from '../../helpers/demo-fixture.js';

const fixture = (path: string) => fileURLToPath(new URL(`../../fixtures/datasets/${path}`, import.meta.url));

const spaces: { name: string; ws: Workspace }[] = [];
beforeAll(async () => {
  const demo = await demoFixture();
  for (const [name, path] of [
    ['Skerrywake demo', demo.configPath],
    ['support desk', fixture('support-desk/ledgerlark.yaml')],
    ['subscription app', fixture('subscription-app/chatterwren.yaml')],
  ] as const) {
    spaces.push({ name, ws: await openWorkspace(loadConfig(path)) });
  }
}, 120_000);
afterAll(async () => {
  for (const s of spaces) await s.ws.source.close();
});

/** One sub-question per template on a dataset, with a metric, breakdown and group that suit it. */
function questionsFor(ws: Workspace): SubQuestion[] {
  const ds = ws.dataset;
  const flow = ds.metrics.find((m) => isAdditive(m)) ?? ds.metrics[0]!;
  const other = ds.metrics.find((m) => !isAdditive(m) && m.definition.type !== 'distinct_count') ?? flow;
  const count = plainCountMetric(ds) ?? flow;
  const dimension = ds.dimensions.find((d) => isBreakdownDimension(ds, d.name))!.name;
  const group = ds.comparison_groups[0]?.name;
  const window = { start: ws.coverage.firstDate!.slice(0, 8) + '01', end: dataEnd({ ...ws.coverage, lastDate: ws.coverage.lastDate! }) };
  const out: SubQuestion[] = [];
  for (const template of TEMPLATE_NAMES) {
    const def = SUB_QUESTIONS[template];
    if (def.kind === 'performance' && !group) continue;
    const metrics = template === 'performance_frequency' ? [count.name] : [flow.name];
    const base = { kind: def.kind, lens: def.lens, template, grain: 'month' as const, window, filters: [], dimension, ...(group ? { comparisonGroup: group } : {}) };
    out.push({ id: `${template}-${metrics[0]}`, ...base, metrics });
    if (other !== flow && template !== 'performance_frequency' && !(['segment_shares', 'growth_share_shift', 'kpi_mix'] as TemplateName[]).includes(template)) {
      out.push({ id: `${template}-${other.name}`, ...base, metrics: [other.name] });
    }
    // A ranking by value ("worst 5 by <an average>") states its values and its row floor: traced too.
    if (template === 'segment_shares') out.push({ id: `${template}-${other.name}-worst`, ...base, metrics: [other.name], rankLimit: 5, rankOrder: 'worst' });
    // Seasonality at day grain states each weekday's figure against an average day: traced too.
    if (template === 'trend_seasonality') out.push({ id: `${template}-${flow.name}-daily`, ...base, grain: 'day', metrics: [flow.name] });
  }
  return out;
}

/** The two largest values of a dimension, by rows. */
async function topValues(ws: Workspace, questions: SubQuestion[], dimension: string): Promise<string[]> {
  const ds = ws.dataset;
  const shares = await answerSubQuestion({ ...questions[0]!, id: 'top', template: 'segment_shares', kind: 'trend', lens: 'distribution', dimension, filters: [], metrics: [plainCountMetric(ds)?.name ?? ds.metrics[0]!.name] }, ws);
  const rows = shares.findings.find((f): f is SegmentSharesFinding => f.type === 'segment_shares')!.rows;
  return rows.filter((r) => r.segment !== null).map((r) => String(r.segment));
}

/** Value-against-value questions get the dimension's two largest values to compare. */
async function withContrasts(ws: Workspace, questions: SubQuestion[]): Promise<SubQuestion[]> {
  const out: SubQuestion[] = [];
  for (const q of questions) {
    if (q.template !== 'value_compare') {
      out.push(q);
      continue;
    }
    const [a, b] = await topValues(ws, questions, q.dimension!);
    out.push({ ...q, contrast: { dimension: q.dimension!, values: [a!, b!] } });
  }
  return out;
}

/** The largest value of a second breakdown dimension, to filter every sub-question to it. */
async function filterFor(ws: Workspace, questions: SubQuestion[]): Promise<SubQuestion['filters']> {
  const ds = ws.dataset;
  const dims = ds.dimensions.filter((d) => isBreakdownDimension(ds, d.name));
  const dim = dims[1] ?? dims[0]!;
  const shares = await answerSubQuestion({ ...questions[0]!, id: 'f', template: 'segment_shares', kind: 'trend', lens: 'distribution', dimension: dim.name, metrics: [plainCountMetric(ds)?.name ?? ds.metrics[0]!.name] }, ws);
  const top = shares.findings.find((f): f is SegmentSharesFinding => f.type === 'segment_shares')!.rows.find((r) => r.segment !== null)!;
  return [{ dimension: dim.name, values: [String(top.segment)] }];
}

describe('captions agree with their tables', () => {
  // One test per dataset, so each has its own time limit on a loaded machine (all three in one
  // had run past 600 s with eight engineers' tests on two cores).
  it.each(['Skerrywake demo', 'support desk', 'subscription app'])('on every template, whole and filtered, for every audience: %s', async (dataset) => {
    const problems: string[] = [];
    let answered = 0;
    for (const { name, ws } of spaces.filter((s) => s.name === dataset)) {
      const questions = await withContrasts(ws, questionsFor(ws));
      const filters = await filterFor(ws, questions);
      for (const sq of [...questions, ...questions.map((q) => ({ ...q, id: `${q.id}-filtered`, filters }))]) {
        const answer = await answerSubQuestion(sq, ws);
        for (const audience of ['leadership', 'managers', 'analysts'] as const) {
          const presented = SUB_QUESTIONS[sq.template].present(answer, presentContext(ws, audience));
          for (const p of captionProblems(answer, presented)) {
            problems.push(`${name} · ${sq.id} · ${audience}: ${p}`);
          }
        }
        answered++;
      }
    }
    expect(answered).toBeGreaterThan(TEMPLATE_NAMES.length);
    expect(problems).toEqual([]);
  }, 600_000);

  it('fails a caption whose direction word is flipped, whose filter is dropped, or a chart footer with a placeholder or code', async () => {
    const { ws } = spaces[0]!;
    const sq: SubQuestion = { id: 'g', kind: 'growth', lens: 'time_pattern', template: 'growth_series', metrics: ['revenue'], grain: 'month', window: { start: '2022-01-01', end: '2025-07-01' }, filters: [{ dimension: 'channel', values: ['web'] }] };
    const answer: Answer = await answerSubQuestion(sq, ws);
    const presented = SUB_QUESTIONS.growth_series.present(answer, presentContext(ws, 'managers'));
    expect(captionProblems(answer, presented)).toEqual([]);
    // A signed figure beside a direction word, with the word flipped.
    // A signed figure the caption states, said again beside the wrong direction word.
    const figure = figuresIn(presented.caption).find((f) => f.signed && f.value !== 0)!;
    expect(figure).toBeDefined();
    const flipped = { ...presented, caption: `${presented.caption} It ${figure.value > 0 ? 'fell' : 'rose'} ${figure.text} on the year before.` };
    expect(captionProblems(answer, flipped).some((p) => p.startsWith('direction word'))).toBe(true);
    // The filter dropped from the words.
    const unfiltered = { ...presented, title: presented.title.replace(/ \([^()]*: web\)$/, ''), caption: presented.caption.replace(/^Filtered to [^.]*: web\. /, '') };
    expect(captionProblems(answer, unfiltered)).toEqual(expect.arrayContaining([expect.stringMatching(/filter value "web" missing/)]));
    // A chart footer carrying a placeholder or a caveat's code instead of words.
    const chart = presented.chart!;
    for (const footer of ['Caveats: undefined growth', 'Caveats: base_zero', 'Data as of n/a']) {
      const leaked = { ...presented, chart: { ...chart, footer: [...chart.footer, footer] } };
      expect(captionProblems(answer, leaked).some((p) => p.startsWith('placeholder'))).toBe(true);
    }
  });
});
