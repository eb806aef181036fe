// Reads the YAML config once, validates the file's shape with zod (config/file-schema.ts), and
// turns it into the typed config (config/normalise.ts), which also checks the cross-references zod
// cannot see (a ratio naming an unknown metric...). Every error and warning names the file, the
// line and the key.
import { readFileSync } from 'node:fs';
import { dirname, isAbsolute, resolve } from 'node:path';
import { LineCounter, parseDocument, isNode, visit } from 'yaml';
import type { z } from 'zod';
import { configFileSchema } from './file-schema.js';
import { keyPath, normaliseConfig } from './normalise.js';
import type { Config } from './schema.js';

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
  /** Keys that still load but are on their way out (the earlier metric and filter shapes). */
  warnings?: ConfigProblem[];
  /** The line and key of a path in the file, for problems found later (threadcount check). */
  locate?: (path: (string | number)[]) => { line: number | null; key: string };
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
  const { data, lineOf } = parseYamlWithSchema(text, file, configFileSchema);
  const normalised = normaliseConfig(data);
  const located = ({ path, message }: { path: (string | number)[]; message: string }): ConfigProblem => ({ file, line: lineOf(path), key: keyPath(path), message });
  if (normalised.problems.length > 0) throw new ConfigError(normalised.problems.map(located));
  const loaded: LoadedConfig = { ...normalised.config, file, baseDir: dirname(resolve(file)), warnings: normalised.warnings.map(located) };
  // Not enumerable: the config stays plain data for anything that copies or clones it.
  Object.defineProperty(loaded, 'locate', { value: (path: (string | number)[]) => ({ line: lineOf(path), key: keyPath(path) }), enumerable: false });
  return loaded;
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
  const raw: unknown = toPlainData(doc, file, lineCounter);
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

/**
 * The document as plain data. The YAML library refuses aliases that expand past its limit (an
 * "alias bomb": a few lines that would grow to millions of values); that is reported at the first
 * alias that refers to other aliases, with the file and line, like any other problem.
 */
function toPlainData(doc: ReturnType<typeof parseDocument>, file: string, lineCounter: LineCounter): unknown {
  try {
    return doc.toJS();
  } catch (err) {
    if (!(err instanceof ReferenceError) || !/alias/i.test(err.message)) throw err;
    let at: number | null = null;
    let first: number | null = null;
    visit(doc, {
      Alias(_key, node) {
        const line = node.range ? lineCounter.linePos(node.range[0]).line : null;
        first ??= line;
        const target = node.resolve(doc);
        if (target && at === null && hasAlias(target)) {
          at = line;
          return visit.BREAK;
        }
        return undefined;
      },
    });
    throw new ConfigError([{ file, line: at ?? first, key: '', message: 'YAML aliases here expand to more values than a config can hold (aliases of aliases); write the values out instead' }]);
  }
}

function hasAlias(node: unknown): boolean {
  let found = false;
  visit(node as Parameters<typeof visit>[0], {
    Alias() {
      found = true;
      return visit.BREAK;
    },
  });
  return found;
}

export function resolveSourcePath(config: LoadedConfig, path: string): string {
  return isAbsolute(path) ? path : resolve(config.baseDir, path);
}
