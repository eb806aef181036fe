// `threadcount check` and serve's start-up on broken configs over vega-datasets' co2-concentration.csv:
// a missing column and a wrong type each give one message naming the file, the line and the key,
// exit 2, and serve refuses to start (no conversation is ever opened).
import { mkdtempSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { runCli } from '../helpers/run-cli.js';

const csv = join(dirname(dirname(createRequire(import.meta.url).resolve('vega-datasets'))), 'data', 'co2-concentration.csv');
afterEach(() => vi.restoreAllMocks());

function configWith(metric: string): { file: string; text: string } {
  const dir = mkdtempSync(join(tmpdir(), 'tc-check-'));
  const file = join(dir, 'co2.yaml');
  const text = `version: 1
datasets:
  - name: co2
    label: CO2
    source: { kind: csv, path: "${csv}" }
    time_column: Date
    timezone: UTC
    metrics:
      - name: readings
        label: Readings
        count: rows
        unit: count
        higher_is_better: true
${metric}`;
  writeFileSync(file, text);
  return { file, text };
}

const run = runCli;

const lineOf = (text: string, needle: string) => text.split('\n').findIndex((l) => l.includes(needle)) + 1;

describe('threadcount check on broken configs', () => {
  it('names a missing column by file, line and key, with the names the table has; serve refuses it', async () => {
    const { file, text } = configWith('      - { name: co3, label: CO3, average: CO3, unit: number, higher_is_better: false, kind: level }\n');
    const r = await run(['check', '--config', file]);
    expect(r.code).toBe(2);
    const problems = r.out.split('\n').filter((l) => l.startsWith('problem: '));
    expect(problems).toEqual([`problem: ${file}:${lineOf(text, 'average: CO3')}: datasets[0].metrics[1].average: column CO3 is missing from the table co2 (it has Date, CO2, adjusted CO2)`]);
    const s = await run(['serve', '--config', file]);
    expect(s.code).toBe(2);
    expect(s.err).toContain(`${file}:${lineOf(text, 'average: CO3')}: datasets[0].metrics[1].average: column CO3 is missing`);
  });

  it('names a column of the wrong type', async () => {
    const { file, text } = configWith('      - { name: dated, label: Dated, sum: Date, unit: number, higher_is_better: false }\n');
    const r = await run(['check', '--config', file]);
    expect(r.code).toBe(2);
    expect(r.out).toContain(`problem: ${file}:${lineOf(text, 'sum: Date')}: datasets[0].metrics[1].sum: column Date is DATE, but this needs a number`);
  });

  it('names an expression that does not run on the table (text added to a number)', async () => {
    const { file, text } = configWith(`      - { name: odd, label: Odd, sum: "CO2 + lower('x')", unit: number, higher_is_better: false }\n`);
    const r = await run(['check', '--config', file]);
    expect(r.code).toBe(2);
    expect(r.out).toMatch(new RegExp(`problem: ${file.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}:${lineOf(text, 'sum: "CO2')}: datasets\\[0\\]\\.metrics\\[1\\]\\.sum: the expression CO2 \\+ lower\\('x'\\) does not run on the table`));
  });

  it('prints rows, dates, stamps and kinds for a good config', async () => {
    const { file } = configWith('      - { name: co2, label: CO2, average: CO2, unit: number, higher_is_better: false, kind: level }\n');
    const r = await run(['check', '--config', file]);
    expect(r.code).toBe(0);
    // The file holds Mauna Loa monthly means from March 1958 (NOAA, via vega-datasets).
    expect(r.out).toMatch(/dataset co2: [\d,]+ rows, 1958-03-01 to \d{4}-\d{2}-01, stamped monthly/);
    expect(r.out).toMatch(/co2: level, average of CO2/);
  });
});

// Issue 15's acceptance: each kind of broken config gives exactly one message naming the file,
// line and key, through `check` and through `serve`, which refuses to start (no conversation).
describe('broken configs: one message each, and serve refuses', () => {
  const personal = `    dimensions:
      - { name: note, label: Note, column: adjusted CO2, personal_data: true }
`;
  const cases: { what: string; metric: string; key: string; at: string; says: RegExp; extra?: string }[] = [
    { what: 'a missing column', metric: '      - { name: co3, label: CO3, average: CO3, unit: number, higher_is_better: false }\n', key: 'datasets[0].metrics[1].average', at: 'average: CO3', says: /column CO3 is missing from the table co2/ },
    { what: 'a column of the wrong type', metric: '      - { name: dated, label: Dated, sum: Date, unit: number, higher_is_better: false }\n', key: 'datasets[0].metrics[1].sum', at: 'sum: Date', says: /column Date is DATE, but this needs a number/ },
    { what: 'an expression that does not parse', metric: '      - { name: half, label: Half, sum: "CO2 / ", unit: number, higher_is_better: false }\n', key: 'datasets[0].metrics[1].sum', at: 'sum: "CO2 / "', says: /is not a valid expression/ },
    { what: 'an unknown function', metric: '      - { name: slept, label: Slept, sum: "pg_sleep(CO2)", unit: number, higher_is_better: false }\n', key: 'datasets[0].metrics[1].sum', at: 'sum: "pg_sleep', says: /function pg_sleep, which is not allowed/ },
    { what: 'a personal column used as a metric', metric: '      - { name: noted, label: Noted, sum: "\\"adjusted CO2\\"", unit: number, higher_is_better: false }\n', key: 'datasets[0].metrics[1].sum', at: 'sum: "\\"adjusted', says: /adjusted CO2, which is marked personal data/, extra: personal },
  ];
  for (const c of cases) {
    it(c.what, async () => {
      const { file, text } = configWith(c.metric + (c.extra ?? ''));
      const where = `${file}:${lineOf(text, c.at)}: ${c.key}: `;
      const r = await run(['check', '--config', file]);
      expect(r.code).toBe(2);
      const said = `${r.out}${r.err}`.split('\n').filter((l) => l.includes(file));
      expect(said).toHaveLength(1);
      expect(said[0]).toContain(where);
      expect(said[0]).toMatch(c.says);
      const s = await run(['serve', '--config', file]);
      expect(s.code).toBe(2);
      const refused = `${s.out}${s.err}`.split('\n').filter((l) => l.includes(file));
      expect(refused).toHaveLength(1);
      expect(refused[0]).toContain(where);
      // Nothing was opened to talk in: no local channel address announced.
      expect(s.out).not.toMatch(/http:\/\//);
    });
  }
});
