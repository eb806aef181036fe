// Reads the YAML config once, validates it with zod, and checks the cross-references zod
// cannot see (a ratio naming an unknown metric...). Every error names the file, the line and the key.
import { readFileSync } from 'node:fs';
import { dirname, isAbsolute, resolve } from 'node:path';
import { LineCounter, parseDocument, isNode } from 'yaml';
import type { z } from 'zod';
import { configSchema, type Config, type DatasetConfig } from './schema.js';

export interface ConfigProblem {
  file: string;
  line: number | null;
  key: string;
  message: string;
}

export class ConfigError extends Error {
  readonly code = 'config_invalid';
  constructor(readonly problems: ConfigProblem[]) {
    super(problems.map(formatProblem).join('\n'));
    this.name = 'ConfigError';
  }
}

export function formatProblem(p: ConfigProblem): string {
  const where = p.line === null ? p.file : `${p.file}:${p.line}`;
  return `${where}: ${p.key || '(top level)'}: ${p.message}`;
}

/** A validated config plus where it came from (relative source paths resolve against its folder). */
export interface LoadedConfig extends Config {
  file: string;
  baseDir: string;
}

export function loadConfig(file: string): LoadedConfig {
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (err) {
    throw new ConfigError([{ file, line: null, key: '', message: `cannot read the file (${(err as NodeJS.ErrnoException).code ?? String(err)})` }]);
  }
  return parseConfigText(text, file);
}

export function parseConfigText(text: string, file: string): LoadedConfig {
  const { data, lineOf } = parseYamlWithSchema(text, file, configSchema);
  const problems = crossReferenceProblems(data).map(({ path, message }) => ({
    file,
    line: lineOf(path),
    key: keyPath(path),
    message,
  }));
  if (problems.length > 0) throw new ConfigError(problems);
  return { ...data, file, baseDir: dirname(resolve(file)) };
}

/** Parses YAML and validates it; problems carry the file, line and key path. */
export function parseYamlWithSchema<S extends z.ZodType>(
  text: string,
  file: string,
  schema: S,
): { data: z.output<S>; lineOf: (path: (string | number)[]) => number | null } {
  const lineCounter = new LineCounter();
  const doc = parseDocument(text, { lineCounter, prettyErrors: false, uniqueKeys: true });
  if (doc.errors.length > 0) {
    throw new ConfigError(
      doc.errors.map((e) => ({
        file,
        line: e.linePos?.[0]?.line ?? lineCounter.linePos(e.pos[0]).line,
        key: '',
        message: `YAML syntax: ${e.message.split('\n')[0]}`,
      })),
    );
  }
  const raw: unknown = doc.toJS();
  const lineOf = (path: (string | number)[]): number | null => {
    // Walk up to the nearest node that exists, so a missing key points at its parent.
    for (let n = path.length; n >= 0; n--) {
      const node = doc.getIn(path.slice(0, n), true);
      if (isNode(node) && node.range) return lineCounter.linePos(node.range[0]).line;
    }
    return null;
  };
  const parsed = schema.safeParse(raw ?? {});
  if (!parsed.success) {
    throw new ConfigError(
      parsed.error.issues.map((issue) => {
        const path = issue.path.filter((k): k is string | number => typeof k !== 'symbol');
        const extra = issue.code === 'unrecognized_keys' ? issue.keys : [];
        // An unknown key is reported at its own line, not its parent's.
        const at = extra.length === 1 ? [...path, extra[0]!] : path;
        return { file, line: lineOf(at), key: keyPath(at), message: issue.message };
      }),
    );
  }
  return { data: parsed.data, lineOf };
}

export function resolveSourcePath(config: LoadedConfig, path: string): string {
  return isAbsolute(path) ? path : resolve(config.baseDir, path);
}

function keyPath(path: (string | number)[]): string {
  return path.map((k, i) => (typeof k === 'number' ? `[${k}]` : i === 0 ? k : `.${k}`)).join('');
}

function crossReferenceProblems(config: Config): { path: (string | number)[]; message: string }[] {
  const out: { path: (string | number)[]; message: string }[] = [];
  const seenDatasets = new Set<string>();
  config.datasets.forEach((ds, d) => {
    if (seenDatasets.has(ds.name)) out.push({ path: ['datasets', d, 'name'], message: `dataset name "${ds.name}" is used twice` });
    seenDatasets.add(ds.name);
    out.push(...datasetProblems(ds).map((p) => ({ ...p, path: ['datasets', d, ...p.path] })));
  });
  // Access rules may only name datasets the file defines.
  const unknown = (name: string) => `names dataset "${name}", which is not in this file's datasets (${[...seenDatasets].join(', ')})`;
  config.access?.channels.forEach((rule, r) =>
    rule.datasets.forEach((name, i) => {
      if (!seenDatasets.has(name)) out.push({ path: ['access', 'channels', r, 'datasets', i], message: unknown(name) });
    }),
  );
  config.access?.default_datasets.forEach((name, i) => {
    if (!seenDatasets.has(name)) out.push({ path: ['access', 'default_datasets', i], message: unknown(name) });
  });
  return out;
}

function datasetProblems(ds: DatasetConfig): { path: (string | number)[]; message: string }[] {
  const out: { path: (string | number)[]; message: string }[] = [];
  const names = new Map<string, string>();
  const claim = (name: string, what: string, path: (string | number)[]) => {
    const prior = names.get(name);
    if (prior) out.push({ path, message: `"${name}" is already the name of a ${prior}` });
    else names.set(name, what);
  };
  ds.metrics.forEach((m, i) => claim(m.name, 'metric', ['metrics', i, 'name']));
  ds.dimensions.forEach((d, i) => claim(d.name, 'dimension', ['dimensions', i, 'name']));
  ds.comparison_groups.forEach((g, i) => claim(g.name, 'comparison group', ['comparison_groups', i, 'name']));

  const metricByName = new Map(ds.metrics.map((m) => [m.name, m]));
  ds.metrics.forEach((m, i) => {
    const def = m.definition;
    const refs: [string, string][] =
      def.type === 'ratio' ? [['numerator', def.numerator], ['denominator', def.denominator]] : def.type === 'rate' && def.of ? [['of', def.of]] : [];
    for (const [key, ref] of refs) {
      const target = metricByName.get(ref);
      if (!target) out.push({ path: ['metrics', i, 'definition', key], message: `names metric "${ref}", which is not in this dataset's metrics` });
      else if (target.definition.type === 'ratio' || target.definition.type === 'rate')
        out.push({ path: ['metrics', i, 'definition', key], message: `"${ref}" is itself a ratio or rate; name a sum, count, distinct count or average` });
    }
    if (m.unit === 'currency' && !m.currency) out.push({ path: ['metrics', i, 'currency'], message: 'a currency metric needs a three-letter currency code (e.g. EUR)' });
  });
  return out;
}
