// A YAML "alias bomb" (anchors whose aliases nest, a few lines growing to millions of values) in
// the config or in an answers file is refused like any other problem: file, line and what to do.
// The yaml library stops resolving past maxAliasCount (100 by default, per its documentation).
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadScriptedAnswers } from '../../bot/scripted-answers.js';
import { ConfigError, loadConfig } from '../../config/load.js';

const BOMB = [
  'a: &a ["x", "x", "x", "x", "x", "x", "x", "x", "x"]',
  'b: &b [*a, *a, *a, *a, *a, *a, *a, *a, *a]',
  'c: &c [*b, *b, *b, *b, *b, *b, *b, *b, *b]',
  'd: &d [*c, *c, *c, *c, *c, *c, *c, *c, *c]',
  'e: &e [*d, *d, *d, *d, *d, *d, *d, *d, *d]',
  'f: &f [*e, *e, *e, *e, *e, *e, *e, *e, *e]',
].join('\n');

function problemOf(load: () => unknown) {
  try {
    load();
  } catch (err) {
    expect(err).toBeInstanceOf(ConfigError);
    return (err as ConfigError).problems[0]!;
  }
  throw new Error('expected the file to be refused');
}

describe('a YAML alias bomb', () => {
  const dir = mkdtempSync(join(tmpdir(), 'tc-alias-'));

  it('in the config: refused with the file and the line of the first alias of aliases', () => {
    const file = join(dir, 'threadcount.yaml');
    writeFileSync(file, `version: 1\n${BOMB}\n`);
    const p = problemOf(() => loadConfig(file));
    expect(p.file).toBe(file);
    // Line 4: "c: &c [*b, ...]", where *b is itself a list of aliases.
    expect(p.line).toBe(4);
    expect(p.message).toMatch(/aliases .* expand to more values than .* write the values out instead/);
  });

  it('in an answers file: the same', () => {
    const file = join(dir, 'answers.yaml');
    writeFileSync(file, `audience: managers\n${BOMB.replace('a: &a', 'metrics: &a')}\n`);
    const p = problemOf(() => loadScriptedAnswers(file));
    expect(p.file).toBe(file);
    expect(p.line).toBe(4);
  });

  it('a few plain aliases are still fine', () => {
    const file = join(dir, 'answers-ok.yaml');
    writeFileSync(file, 'audience: &who managers\nmetrics: revenue\nplan: [go]\ndataset: *who\n');
    expect(loadScriptedAnswers(file)).toMatchObject({ audience: 'managers', dataset: 'managers' });
  });
});
