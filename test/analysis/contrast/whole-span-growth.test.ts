// "Which source grew fastest?" with no period named: the card says "all the data, 2001 to 2017",
// so the segments' growth is measured over that span, its first whole year against its last (as
// "since 2001" is), not 2017 against 2016. On open data the project was never built around:
// vega-datasets' iowa-electricity.csv (US EIA net generation in Iowa by source, one row per source
// per year, 2001–2017), with net generation summed as init drafts it. Every figure is checked
// against the test's own SQL on the CSV.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { GrowthDriversFinding } from '../../../analysis/findings/growth.js';
import { SUB_QUESTIONS } from '../../../analysis/sub-questions/registry.js';
import { datasetFacts, openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { briefDefaults, withDefaults } from '../../../bot/brief-defaults.js';
import { buildPlan } from '../../../bot/plan.js';
import { readRequest, type DatasetFacts } from '../../../bot/reading/read-request.js';
import { planLines } from '../../../bot/replies.js';
import { presentContext } from '../../../bot/present-answer.js';
import { loadConfig } from '../../../config/load.js';
import { captionProblems } from '../../helpers/caption-checks.js';
import { vegaDataFile } from '../../helpers/open-data.js';

let ws: Workspace;
let facts: DatasetFacts;
const NOW = new Date('2026-12-05T09:00:00Z');
beforeAll(async () => {
  const file = join(mkdtempSync(join(tmpdir(), 'tc-whole-span-')), 'iowa.yaml');
  writeFileSync(file, `version: 1
datasets:
  - name: iowa_electricity
    label: Iowa electricity
    source: { kind: csv, paths: [${vegaDataFile('iowa-electricity.csv')}] }
    time_column: year
    timezone: UTC
    metrics:
      - { name: net_generation, label: Net generation, sum: net_generation, unit: number, unit_label: GWh, kind: flow }
    dimensions:
      - { name: source, label: Energy source, column: source, also_called: [fuel, fuel type] }
`);
  ws = await openWorkspace(loadConfig(file));
  facts = datasetFacts(ws);
}, 60_000);
afterAll(async () => {
  await ws?.source.close();
});

/** Net generation by source and year, as plain SQL on the CSV reads it. */
async function generation(): Promise<Map<string, number>> {
  const db = await DuckDBInstance.create(':memory:');
  const conn = await db.connect();
  try {
    const rows = (await conn.runAndReadAll(`SELECT source, year(CAST("year" AS DATE)) AS y, SUM(net_generation)::DOUBLE AS v
      FROM read_csv_auto('${vegaDataFile('iowa-electricity.csv')}') GROUP BY 1, 2`)).getRowObjectsJson();
    return new Map(rows.map((r) => [`${String(r.source)} ${String(r.y)}`, Number(r.v)]));
  } finally {
    conn.closeSync();
    db.closeSync();
  }
}

const planOf = (text: string) => {
  const brief = readRequest(text, facts, { now: NOW, locale: 'en-GB' });
  const full = withDefaults(brief, briefDefaults(brief, ws.dataset, ws.coverage));
  return { brief: full, plan: buildPlan(full, ws.dataset, ws.coverage) };
};

describe('growth by segment with no period named', () => {
  it.each([
    'Which source grew fastest?',
    'which fuel type has grown the most over the years',
    'What drove the growth in net generation by source?',
    'which energy source is growing slowest',
  ])('"%s": the breakdown\'s growth runs over the whole span the card names', (text) => {
    const { brief, plan } = planOf(text);
    expect(brief.window).toBeUndefined();
    const drivers = plan.items.find((x) => x.template === 'growth_drivers');
    expect(drivers, 'a growth answer by source').toBeDefined();
    for (const sq of plan.items.filter((x) => x.template === 'growth_drivers' || x.template === 'growth_share_shift')) expect(sq.spanEnds).toBe('year');
    // The plan line says the comparison the answer makes: the span's ends, not its last two years.
    const lines = planLines(plan, ws.dataset, 'en-GB').join('\n');
    expect(lines).toMatch(/first whole year of January 2001 to December 2017 against the last/);
    expect(lines).not.toMatch(/last complete year/);
  });

  it('a period named keeps its own comparison ("in 2016" is 2016 against 2015)', () => {
    const { plan } = planOf('Which source grew fastest in 2016?');
    const sq = plan.items.find((x) => x.template === 'growth_drivers')!;
    expect(sq.spanEnds).toBeUndefined();
    expect(sq.window).toEqual({ start: '2016-01-01', end: '2017-01-01' });
  });

  it('answers 2017 against 2001, each source\'s figures as the SQL has them, fastest first', async () => {
    const truth = await generation();
    const sq = planOf('Which source grew fastest?').plan.items.find((x) => x.template === 'growth_drivers')!;
    const answer = await answerSubQuestion(sq, ws);
    const f = answer.findings.find((x): x is GrowthDriversFinding => x.type === 'growth_drivers')!;
    expect(f.prior).toEqual({ start: '2001-01-01', end: '2002-01-01' });
    expect(f.current).toEqual({ start: '2017-01-01', end: '2018-01-01' });
    for (const source of ['Renewables', 'Fossil Fuels', 'Nuclear Energy']) {
      const s = f.segments.find((x) => x.segment === source)!;
      expect(s.before).toBeCloseTo(truth.get(`${source} 2001`)!, 6);
      expect(s.after).toBeCloseTo(truth.get(`${source} 2017`)!, 6);
    }
    // Plain SQL: Renewables 1,437 → 21,933 (×15), Nuclear 3,853 → 5,214, Fossil Fuels 35,361 → 29,329.
    const ratio = (s: string) => truth.get(`${s} 2017`)! / truth.get(`${s} 2001`)!;
    const bySql = ['Renewables', 'Fossil Fuels', 'Nuclear Energy'].sort((a, b) => ratio(b) - ratio(a));
    const p = SUB_QUESTIONS.growth_drivers.present(answer, presentContext(ws, 'managers'));
    expect(p.caption).toContain('2017 against 2001');
    expect(p.caption).not.toContain('2017 against 2016');
    // The caption's list runs fastest first, in the SQL's order of growth ratios.
    const at = bySql.map((s) => p.caption.indexOf(s));
    expect(at.every((i) => i >= 0)).toBe(true);
    expect([...at].sort((a, b) => a - b)).toEqual(at);
    expect(captionProblems(answer, p)).toEqual([]);
  });
});
