// `npm run eval:reading`: reads the labelled corpus, prints accuracy per slot (all, tuned on, held
// back) and every miss, and writes READING.md. The demo's data is generated into out/eval-data once.
import { existsSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { DEMO_CONFIG_FILE, DEMO_DATABASE_FILE, generateDemo } from '../config/demo/generate-demo.js';
import { accuracy, evaluate, FRESH_DIR, loadCorpus, readingReport, repoRoot, SLOTS } from './reading-eval.js';

const root = repoRoot(process.cwd());
const demoDir = resolve(root, 'out', 'eval-data');
if (!existsSync(join(demoDir, DEMO_DATABASE_FILE))) {
  process.stdout.write('Generating the demo data once (out/eval-data)...\n');
  await generateDemo({ outDir: demoDir });
}
const report = await evaluate([...loadCorpus(root), ...loadCorpus(root, FRESH_DIR)], root, (config) => (config.endsWith('skerrywake.yaml') ? join(demoDir, DEMO_CONFIG_FILE) : resolve(root, config)));
const text = readingReport(report);
writeFileSync(resolve(root, 'READING.md'), text);
const all = accuracy(report.results);
const held = accuracy(report.results.filter((r) => r.request.split === 'held'));
const fresh = accuracy(report.results.filter((r) => r.request.split === 'fresh'));
const row = (label: string, a: number, h: number, f: number) => `${label.padEnd(16)} ${(100 * a).toFixed(1).padStart(5)}%   held ${(100 * h).toFixed(1).padStart(5)}%   fresh ${(100 * f).toFixed(1).padStart(5)}%\n`;
for (const s of SLOTS) process.stdout.write(row(s, all.perSlot[s], held.perSlot[s], fresh.perSlot[s]));
process.stdout.write(row('whole request', all.wholeRequest, held.wholeRequest, fresh.wholeRequest));
const misses = report.results.filter((r) => r.misses.length > 0);
for (const r of misses) {
  process.stdout.write(`\n${r.request.id} (${r.request.split}): ${r.request.text.replace(/\s+/g, ' ').slice(0, 220)}\n`);
  for (const m of r.misses) process.stdout.write(`  ${m.slot}: expected ${m.expected}  read ${m.got}\n`);
}
process.stdout.write(`\n${misses.length} of ${report.results.length} requests have a miss. READING.md written.\n`);
