// performance_frequency reads bookings per customer from a tally (value, how many customers) rather
// than from every customer's value. Its median, p90, mean, variance and buckets must equal what
// DuckDB's own aggregates (percentile_cont, var_samp, AVG, COUNT) give over the per-customer values,
// on generated bookings (invented, seeded) whose shapes make the interpolation between ranks matter:
// groups of 1, 2 and 3 customers, a gap in the values, many ties, and a long tail.
import { mkdtemp, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { PerformanceFrequencyGroupFinding } from '../../../analysis/findings/performance.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../../analysis/workspace.js';
import { parseConfigText } from '../../../config/load.js';

const CONFIG = `version: 1
datasets:
  - name: trips
    label: Tally trips
    source: { kind: csv, paths: [trips.csv] }
    table: trips
    time_column: sail_date
    timezone: UTC
    metrics:
      - { name: bookings, label: Bookings, definition: { type: count }, unit: count, higher_is_better: true }
    comparison_groups:
      - { name: pass, label: Pass, column: pass_holder, members_label: Pass holders, others_label: Other customers, unit_column: customer_id }
`;

/** Bookings per customer for each case, members then others. */
const CASES: Record<string, { members: number[]; others: number[] }> = {
  tiny: { members: [4], others: [1, 9] },
  three: { members: [1, 2, 10], others: [3, 3, 7] },
  gap: { members: [1, 1, 1, 1, 40, 41], others: [2, 2, 5, 5, 5, 5, 6, 30] },
  ties: { members: Array.from({ length: 37 }, (_, i) => 1 + (i % 3)), others: Array.from({ length: 51 }, (_, i) => (i % 10 === 0 ? 12 : 2)) },
  tail: { members: seeded(400, 7), others: seeded(999, 11) },
};

/** Seeded counts with a long tail (a geometric-like spread), from a small linear congruential generator. */
function seeded(n: number, seed: number): number[] {
  let x = seed;
  const out: number[] = [];
  for (let i = 0; i < n; i++) {
    x = (x * 1103515245 + 12345) % 2 ** 31;
    const u = x / 2 ** 31;
    out.push(1 + Math.floor(-Math.log(1 - u) * 3));
  }
  return out;
}

function csv(c: { members: number[]; others: number[] }): string {
  const lines = ['sail_date,customer_id,pass_holder'];
  for (const [group, counts] of [['m', c.members], ['o', c.others]] as const) {
    counts.forEach((count, i) => {
      for (let k = 0; k < count; k++) lines.push(`2024-03-${String(1 + (k % 28)).padStart(2, '0')},${group}${i},${group === 'm'}`);
    });
  }
  return `${lines.join('\n')}\n`;
}

const SQ: SubQuestion = {
  id: 'freq',
  template: 'performance_frequency',
  kind: 'performance',
  lens: 'distribution',
  metrics: ['bookings'],
  grain: 'month',
  window: { start: '2024-01-01', end: '2024-06-01' },
  filters: [],
  comparisonGroup: 'pass',
};

for (const [name, c] of Object.entries(CASES)) {
  describe(`the tally gives DuckDB's own per-customer aggregates: ${name}`, () => {
    let ws: Workspace;
    beforeAll(async () => {
      const dir = await mkdtemp(join(tmpdir(), 'threadcount-tally-'));
      await writeFile(join(dir, 'trips.csv'), csv(c));
      await writeFile(join(dir, 'threadcount.yaml'), CONFIG);
      ws = await openWorkspace(parseConfigText(CONFIG, join(dir, 'threadcount.yaml')));
    });
    afterAll(async () => {
      await ws?.source.close();
    });

    it('median, p90, mean, standard deviation, total and buckets', async () => {
      const answer = await answerSubQuestion(SQ, ws);
      expect(answer.queries[0]!.sql).toContain('tc_tally');
      // The reference: DuckDB's built-in aggregates over the per-customer counts.
      const ref = await ws.source.run(
        {
          sql: `WITH u AS (SELECT customer_id, bool_or(pass_holder) AS member, COUNT(*) AS v FROM trips GROUP BY 1)
SELECT member, COUNT(*)::DOUBLE AS n, AVG(v)::DOUBLE AS mean, stddev_samp(v)::DOUBLE AS sd,
  percentile_cont(0.5) WITHIN GROUP (ORDER BY v)::DOUBLE AS median, percentile_cont(0.9) WITHIN GROUP (ORDER BY v)::DOUBLE AS p90,
  SUM(v)::DOUBLE AS total, (COUNT(*) FILTER (WHERE v = 1))::DOUBLE AS b0, (COUNT(*) FILTER (WHERE v BETWEEN 2 AND 5))::DOUBLE AS b1, (COUNT(*) FILTER (WHERE v >= 6))::DOUBLE AS b2
FROM u GROUP BY 1`,
          params: [],
        },
        ws.runOptions,
      );
      for (const role of ['members', 'others'] as const) {
        const f = answer.findings.find((x): x is PerformanceFrequencyGroupFinding => x.type === 'performance_frequency_group' && x.group === role)!;
        const r = ref.rows.find((x) => x.member === (role === 'members'))!;
        expect(f.units).toBe(r.n);
        expect(f.total).toBe(r.total);
        expect(f.median).toBeCloseTo(Number(r.median), 12);
        expect(f.p90).toBeCloseTo(Number(r.p90), 12);
        expect(f.mean).toBeCloseTo(Number(r.mean), 12);
        if (r.sd === null) expect(f.sd === null || f.sd === 0).toBe(true);
        else expect(f.sd!).toBeCloseTo(Number(r.sd), 10);
        expect(f.buckets.map((b) => b.units)).toEqual([r.b0, r.b1, r.b2]);
      }
    });
  });
}
