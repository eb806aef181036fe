// Config loading: the shipped example is valid, and broken files produce messages that name
// the file, the line and the key (never a stack trace or a bare zod dump).
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { ConfigError, parseConfigText } from '../../config/load.js';

const examplePath = fileURLToPath(new URL('../../config/examples/skerrywake.yaml', import.meta.url));
const example = readFileSync(examplePath, 'utf8');

function problemsOf(text: string) {
  try {
    parseConfigText(text, 'broken.yaml');
  } catch (err) {
    expect(err).toBeInstanceOf(ConfigError);
    return (err as ConfigError).problems;
  }
  throw new Error('expected a ConfigError');
}

function lineOf(text: string, needle: string): number {
  return text.split('\n').findIndex((l) => l.includes(needle)) + 1;
}

describe('config loading', () => {
  it('accepts the shipped example and fills defaults', () => {
    const c = parseConfigText(example, examplePath);
    expect(c.datasets[0]!.metrics.map((m) => m.name)).toContain('revenue');
    expect(c.engine.max_result_rows).toBe(10_000);
    expect(c.charts.width).toBe(1200);
  });

  it('names the line and key of a wrong type', () => {
    const text = example.replace('higher_is_better: true', 'higher_is_better: "very"');
    const [p] = problemsOf(text);
    expect(p!.file).toBe('broken.yaml');
    expect(p!.key).toBe('datasets[0].metrics[0].higher_is_better');
    expect(p!.line).toBe(lineOf(text, 'higher_is_better: "very"'));
  });

  it('names an unknown key at its own line', () => {
    const text = example.replace('    table: bookings\n', '    table: bookings\n    tabel_typo: x\n');
    const problems = problemsOf(text);
    expect(problems.some((p) => p.key.endsWith('tabel_typo') && p.line === lineOf(text, 'tabel_typo'))).toBe(true);
  });

  it('reports a YAML syntax error with its line', () => {
    const text = example.replace('    table: bookings\n', '    table: [bookings\n');
    const [p] = problemsOf(text);
    expect(p!.message).toMatch(/YAML syntax/);
    expect(p!.line).toBeGreaterThan(0);
  });

  it('rejects a ratio that names a missing metric, at the reference', () => {
    const text = example.replace('ratio: { of: revenue, per: passengers }', 'ratio: { of: revenue, per: pasengers }');
    const problems = problemsOf(text);
    const p = problems.find((x) => x.key.endsWith('ratio.per'));
    expect(p?.message).toMatch(/pasengers/);
    expect(p?.line).toBe(lineOf(text, 'per: pasengers'));
  });

  it('refuses a unit label on a currency metric, at its line', () => {
    const text = example.replace('        currency: EUR\n        decimals: 2\n', '        currency: EUR\n        decimals: 2\n        unit_label: euro\n');
    const p = problemsOf(text).find((x) => x.key.endsWith('unit_label'));
    expect(p?.message).toMatch(/writes its own sign/);
    expect(p?.line).toBe(lineOf(text, 'unit_label: euro'));
  });

  it('rejects an unknown time zone', () => {
    const text = example.replace('timezone: Europe/Dublin', 'timezone: Europe/Atlantis');
    expect(problemsOf(text).map((p) => p.key)).toContain('datasets[0].timezone');
  });

  it('takes any column name as a name (it is quoted in SQL), never as SQL', () => {
    const text = example.replace('time_column: sail_date', 'time_column: "sail date; drop table x"');
    expect(parseConfigText(text, 'odd.yaml').datasets[0]!.time_column).toBe('sail date; drop table x');
  });

  it('rejects a duplicate metric name', () => {
    const text = example.replace('- name: passengers', '- name: bookings');
    expect(problemsOf(text).some((p) => /already the name/.test(p.message))).toBe(true);
  });

  it('formats problems as file:line: key: message', () => {
    const text = example.replace('version: 1', 'version: 2');
    try {
      parseConfigText(text, 'broken.yaml');
    } catch (err) {
      expect((err as Error).message).toMatch(/^broken\.yaml:\d+: version: /);
      return;
    }
    throw new Error('expected an error');
  });
});
