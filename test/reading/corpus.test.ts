// The reader against the labelled corpus (test/reading/corpus/, labelled by hand from
// docs/reading.md): every slot must be right on at least 90% of the requests, on the whole corpus
// on the held-back fifth, and on the fresh set written apart from the reader
// (test/reading/corpus-fresh/). `npm run eval:reading` prints the same figures with every miss.
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { accuracy, evaluate, type EvalReport, FRESH_DIR, loadCorpus, repoRoot, SLOTS } from '../../bench/reading-eval.js';
import { demoFixture } from '../helpers/demo-fixture.js';

const root = repoRoot(fileURLToPath(new URL('.', import.meta.url)));
let report: EvalReport;

beforeAll(async () => {
  const demo = await demoFixture();
  // The demo's data is generated, not in git: its config is the one the generator writes.
  report = await evaluate([...loadCorpus(root), ...loadCorpus(root, FRESH_DIR)], root, (config) => (config.endsWith('skerrywake.yaml') ? demo.configPath : `${root}/${config}`));
}, 600_000);

describe('reading the labelled corpus', () => {
  it('reads at least 300 requests over three datasets', () => {
    expect(report.results.length).toBeGreaterThanOrEqual(300);
    expect(new Set(report.results.map((r) => r.request.dataset)).size).toBeGreaterThanOrEqual(3);
  });

  const named = { all: 'the corpus (tuned on and held back)', held: 'the held-back fifth', fresh: 'the fresh set' } as const;
  for (const split of ['all', 'held', 'fresh'] as const) {
    it(`gets every slot right on at least 90% of ${named[split]}`, () => {
      const results = split === 'all' ? report.results.filter((r) => r.request.split !== 'fresh') : report.results.filter((r) => r.request.split === split);
      expect(results.length).toBeGreaterThan(50);
      const a = accuracy(results);
      const low = SLOTS.filter((s) => a.perSlot[s] < 0.9).map((s) => `${s} ${(100 * a.perSlot[s]).toFixed(1)}%`);
      expect(low, `slots under 90% (${split})`).toEqual([]);
    });
  }
});
