// The config file (config/file-schema.ts) turned into the typed objects the code reads
// (config/schema.ts): expressions parsed and checked, computed columns collected, conditions in
// words turned into filters, earlier keys read with a warning naming the new ones, and the
// cross-references zod cannot see checked (a ratio naming an unknown metric, a metric reading
// personal data...). Every problem and warning carries the path of the key it is about.
import { bareColumn, expressionColumns, expressionText, ExpressionError, parseExpression, type Expr } from './expression.js';
import type { ConfigFile, FileComparisonGroup, FileCondition, FileDataset, FileDimension, FileFilter, FileMetric, LegacyDefinition } from './file-schema.js';
import type { ColumnFilter, ComparisonGroup, Config, DatasetConfig, DerivedColumn, Dimension, Metric, MetricDefinition, SourceConfig } from './schema.js';

export type Path = (string | number)[];
export interface PathMessage {
  path: Path;
  message: string;
}

export interface Normalised {
  config: Config;
  problems: PathMessage[];
  warnings: PathMessage[];
}

export function normaliseConfig(file: ConfigFile): Normalised {
  const problems: PathMessage[] = [];
  const warnings: PathMessage[] = [];
  const datasets = file.datasets.map((ds, d) => new DatasetNormaliser(ds, ['datasets', d], problems, warnings).run());
  const seen = new Set<string>();
  file.datasets.forEach((ds, d) => {
    if (seen.has(ds.name)) problems.push({ path: ['datasets', d, 'name'], message: `dataset name "${ds.name}" is used twice` });
    seen.add(ds.name);
  });
  // Access rules may only name datasets the file defines.
  const unknown = (name: string) => `names dataset "${name}", which is not in this file's datasets (${[...seen].join(', ')})`;
  file.access?.channels.forEach((rule, r) =>
    rule.datasets.forEach((name, i) => {
      if (!seen.has(name)) problems.push({ path: ['access', 'channels', r, 'datasets', i], message: unknown(name) });
    }),
  );
  file.access?.default_datasets.forEach((name, i) => {
    if (!seen.has(name)) problems.push({ path: ['access', 'default_datasets', i], message: unknown(name) });
  });
  const { datasets: _files, ...rest } = file;
  return { config: { ...rest, datasets }, problems, warnings };
}

const FILTER_WORDS = ['is', 'is_not', 'one_of', 'above', 'at_least', 'below', 'at_most'] as const;
const LEGACY_OP_WORD: Record<NonNullable<FileFilter['op']>, string> = {
  eq: 'is',
  ne: 'is_not',
  in: 'one_of',
  gt: 'above',
  gte: 'at_least',
  lt: 'below',
  lte: 'at_most',
  is_true: 'is: true',
  is_false: 'is: false',
};
const HOW_KEYS = ['sum', 'count', 'count_distinct', 'average', 'ratio', 'rate'] as const;

class DatasetNormaliser {
  private readonly derived = new Map<string, DerivedColumn>();

  constructor(
    private readonly ds: FileDataset,
    private readonly at: Path,
    private readonly problems: PathMessage[],
    private readonly warnings: PathMessage[],
  ) {}

  private problem(path: Path, message: string): void {
    this.problems.push({ path: [...this.at, ...path], message });
  }

  private warn(path: Path, message: string): void {
    this.warnings.push({ path: [...this.at, ...path], message });
  }

  run(): DatasetConfig {
    const ds = this.ds;
    const source = this.source();
    const table = ds.table ?? (source.kind === 'duckdb' || source.kind === 'postgres' ? undefined : ds.name);
    if (table === undefined) this.problem(['source'], `a ${source.kind} source needs the dataset's \`table\`: the table or view to read`);
    const time_column = this.timeColumn();
    const dimensions = ds.dimensions.map((x, i) => this.dimension(x, i));
    const comparison_groups = ds.comparison_groups.map((x, i) => this.group(x, i));
    const metrics = ds.metrics.map((x, i) => this.metric(x, i));
    const out: DatasetConfig = {
      name: ds.name,
      label: ds.label,
      source,
      table: table ?? ds.name,
      time_column,
      timezone: ds.timezone,
      ...(ds.key_column !== undefined ? { key_column: ds.key_column } : {}),
      amount_columns: ds.amount_columns,
      metrics,
      dimensions,
      comparison_groups,
      ...(ds.min_group_size !== undefined ? { min_group_size: ds.min_group_size } : {}),
      ...(ds.quality !== undefined ? { quality: ds.quality } : {}),
      events: ds.events.map((e) => ({ name: e.name, from: e.from, to: e.to, synonyms: e.also_called ?? [] })),
      hemisphere: ds.hemisphere,
      ...(this.derived.size > 0 ? { derived: [...this.derived.values()] } : {}),
    };
    this.crossReferences(out);
    return out;
  }

  private source(): SourceConfig {
    const s = this.ds.source;
    if ('path' in s && (s.kind === 'csv' || s.kind === 'parquet' || s.kind === 'json') && !('paths' in s)) {
      // date_order reads dates in CSV and JSON files only (a Parquet file stores them typed).
      return { kind: s.kind, paths: [s.path], ...(s.memory_limit ? { memory_limit: s.memory_limit } : {}), ...(s.date_order && s.kind !== 'parquet' ? { date_order: s.date_order } : {}) } as SourceConfig;
    }
    return s as SourceConfig;
  }

  /** A column for the expression: the column itself when it is one, else a computed column. */
  private columnFor(expr: Expr, key: Path): string {
    const bare = bareColumn(expr);
    if (bare !== null) return bare;
    const name = expressionText(expr);
    if (!this.derived.has(name)) this.derived.set(name, { name, expr, key: keyPath([...this.at, ...key]) });
    return name;
  }

  private parse(text: string, key: Path): Expr | null {
    try {
      return parseExpression(text);
    } catch (err) {
      if (!(err instanceof ExpressionError)) throw err;
      this.problem(key, `the expression "${text}" ${err.message}`);
      return null;
    }
  }

  private timeColumn(): string {
    const t = this.ds.time_column;
    if (typeof t === 'string') return t;
    if ('expr' in t) {
      const e = this.parse(t.expr, ['time_column', 'expr']);
      if (!e) return t.expr;
      return bareColumn(e) ?? this.columnFor({ type: 'cast', operand: e, to: 'date' }, ['time_column', 'expr']);
    }
    // A date from parts; a missing month or day is the first.
    const part = (name: string | undefined): Expr => (name === undefined ? { type: 'number', value: 1, text: '1' } : { type: 'column', name });
    return this.columnFor({ type: 'call', fn: 'make_date', args: [part(t.year), part(t.month), part(t.day)] }, ['time_column']);
  }

  private synonyms(x: { also_called?: string[] | undefined; synonyms?: string[] | undefined }, path: Path): string[] {
    if (x.synonyms !== undefined) {
      this.warn([...path, 'synonyms'], '`synonyms` is the earlier key and will stop loading in the next release: write `also_called`');
      if (x.also_called !== undefined) this.problem([...path, 'synonyms'], 'has both `synonyms` and `also_called`: keep `also_called`');
    }
    return x.also_called ?? x.synonyms ?? [];
  }

  private dimension(x: FileDimension, i: number): Dimension {
    const path = ['dimensions', i];
    let column = x.column ?? '';
    if ((x.column === undefined) === (x.expr === undefined)) {
      this.problem(path, 'needs either `column` (a column of the table) or `expr` (an expression over columns), not both and not neither');
    } else if (x.expr !== undefined) {
      const e = this.parse(x.expr, [...path, 'expr']);
      column = e ? this.columnFor(e, [...path, 'expr']) : x.expr;
    }
    return { name: x.name, column, label: x.label, synonyms: this.synonyms(x, path), personal_data: x.personal_data, ...(x.value_names ? { value_names: x.value_names } : {}) };
  }

  private group(x: FileComparisonGroup, i: number): ComparisonGroup {
    const path = ['comparison_groups', i];
    let column = x.column ?? '';
    if ((x.column === undefined) === (x.when === undefined)) {
      this.problem(path, 'needs either `column` (a true/false column) or `when` (who the members are, e.g. {column: site, one_of: [A, B]}), not both and not neither');
    } else if (x.when !== undefined) {
      const e = this.conditionExpr(x.when, [...path, 'when']);
      column = e ? this.columnFor(e, [...path, 'when']) : '';
    }
    return {
      name: x.name,
      label: x.label,
      synonyms: this.synonyms(x, path),
      column,
      members_label: x.members_label,
      others_label: x.others_label,
      ...(x.launch_date !== undefined ? { launch_date: x.launch_date } : {}),
      ...(x.unit_column !== undefined ? { unit_column: x.unit_column } : {}),
    };
  }

  private metric(x: FileMetric, i: number): Metric {
    const path: Path = ['metrics', i];
    const hows = [...HOW_KEYS.filter((k) => x[k] !== undefined), ...(x.definition ? ['definition' as const] : [])];
    let definition: MetricDefinition = { type: 'count' };
    if (hows.length === 0) this.problem(path, 'needs one key saying how it adds up: sum, count: rows, count_distinct, average, ratio: {of, per} or rate: {when, of}');
    else if (hows.length > 1) this.problem([...path, hows[1]!], `says how it adds up twice (${hows.join(' and ')}): keep one`);
    else definition = x.definition ? this.legacyDefinition(x.definition, [...path, 'definition']) : this.definition(x, path);
    if (x.when !== undefined && (x.ratio || x.rate || x.definition)) this.problem([...path, 'when'], '`when` narrows a sum, count, count_distinct or average; a ratio or rate has its own');
    if (x.definition) this.warn([...path, 'definition'], `\`definition\` is the earlier form and will stop loading in the next release: write ${legacyAdvice(x.definition)}`);
    return {
      name: x.name,
      label: x.label,
      synonyms: this.synonyms(x, path),
      ...(x.description !== undefined ? { description: x.description } : {}),
      definition,
      unit: x.unit,
      ...(x.currency !== undefined ? { currency: x.currency } : {}),
      ...(x.decimals !== undefined ? { decimals: x.decimals } : {}),
      ...(x.unit_label !== undefined ? { unit_label: x.unit_label } : {}),
      higher_is_better: x.higher_is_better,
      ...(x.kind !== undefined ? { kind: x.kind } : {}),
    };
  }

  private definition(x: FileMetric, path: Path): MetricDefinition {
    const where = x.when !== undefined ? this.filter(x.when, [...path, 'when']) : undefined;
    const withWhere = where ? { where } : {};
    const column = (text: string, key: string) => {
      const e = this.parse(text, [...path, key]);
      return e ? this.columnFor(e, [...path, key]) : text;
    };
    if (x.sum !== undefined) return { type: 'sum', column: column(x.sum, 'sum'), ...withWhere };
    if (x.count !== undefined) return { type: 'count', ...withWhere };
    if (x.count_distinct !== undefined) return { type: 'distinct_count', column: column(x.count_distinct, 'count_distinct'), ...withWhere };
    if (x.average !== undefined) return { type: 'average', column: column(x.average, 'average'), ...withWhere };
    if (x.ratio) return { type: 'ratio', numerator: x.ratio.of, denominator: x.ratio.per };
    const rate = x.rate!;
    const when = this.filter(rate.when, [...path, 'rate', 'when']) ?? { column: '', op: 'is_true' };
    return { type: 'rate', where: when, ...(rate.of !== undefined ? { of: rate.of } : {}) };
  }

  private legacyDefinition(d: LegacyDefinition, path: Path): MetricDefinition {
    const where = (f: FileFilter | undefined, key: string) => (f ? { where: this.filter(f, [...path, key]) ?? { column: f.column, op: 'is_true' as const } } : {});
    switch (d.type) {
      case 'sum':
      case 'distinct_count':
      case 'average':
        return { type: d.type, column: d.column, ...where(d.where, 'where') };
      case 'count':
        return { type: 'count', ...where(d.where, 'where') };
      case 'ratio':
        return d;
      case 'rate':
        return { type: 'rate', where: this.filter(d.where, [...path, 'where']) ?? { column: d.where.column, op: 'is_true' }, ...(d.of ? { of: d.of } : {}) };
    }
  }

  /** A condition as the filter metrics carry: a test on a column, or a computed true/false column. */
  private filter(c: FileCondition, path: Path): ColumnFilter | undefined {
    if (typeof c === 'string') {
      const e = this.parse(c, path);
      return e ? { column: this.columnFor(e, path), op: 'is_true' } : undefined;
    }
    return this.wordsFilter(c, path);
  }

  private wordsFilter(f: FileFilter, path: Path): ColumnFilter | undefined {
    const words = FILTER_WORDS.filter((w) => f[w] !== undefined);
    if (f.op !== undefined) {
      this.warn([...path, 'op'], `\`op: ${f.op}\` is the earlier form and will stop loading in the next release: write \`${LEGACY_OP_WORD[f.op]}${f.op.startsWith('is_') ? '' : ': …'}\``);
      if (words.length > 0) {
        this.problem([...path, 'op'], `has both \`op\` and \`${words[0]}\`: keep \`${words[0]}\``);
        return undefined;
      }
      return { column: f.column, op: f.op, ...(f.value !== undefined ? { value: f.value } : {}) };
    }
    if (f.value !== undefined) this.problem([...path, 'value'], '`value` goes with the earlier `op`; write the test in words: {column, is | is_not | one_of | above | at_least | below | at_most}');
    if (words.length !== 1) {
      this.problem(path, `needs exactly one test on ${f.column}: is, is_not, one_of, above, at_least, below or at_most${words.length ? ` (it has ${words.join(' and ')})` : ''}`);
      return undefined;
    }
    const w = words[0]!;
    const v = f[w]!;
    switch (w) {
      case 'is':
        return v === true ? { column: f.column, op: 'is_true' } : v === false ? { column: f.column, op: 'is_false' } : { column: f.column, op: 'eq', value: v as string | number };
      case 'is_not':
        return { column: f.column, op: 'ne', value: v as string | number | boolean };
      case 'one_of':
        return { column: f.column, op: 'in', value: v as (string | number)[] };
      case 'above':
        return { column: f.column, op: 'gt', value: v as number };
      case 'at_least':
        return { column: f.column, op: 'gte', value: v as number };
      case 'below':
        return { column: f.column, op: 'lt', value: v as number };
      case 'at_most':
        return { column: f.column, op: 'lte', value: v as number };
    }
  }

  /** A condition as an expression (for a comparison group, which is a true/false column). */
  private conditionExpr(c: FileCondition, path: Path): Expr | null {
    if (typeof c === 'string') return this.parse(c, path);
    const f = this.wordsFilter(c, path);
    return f ? filterExpr(f) : null;
  }

  private crossReferences(ds: DatasetConfig): void {
    const names = new Map<string, string>();
    const claim = (name: string, what: string, path: Path) => {
      const prior = names.get(name);
      if (prior) this.problem(path, `"${name}" is already the name of a ${prior}`);
      else names.set(name, what);
    };
    ds.metrics.forEach((m, i) => claim(m.name, 'metric', ['metrics', i, 'name']));
    ds.dimensions.forEach((d, i) => claim(d.name, 'dimension', ['dimensions', i, 'name']));
    ds.comparison_groups.forEach((g, i) => claim(g.name, 'comparison group', ['comparison_groups', i, 'name']));

    const byName = new Map(ds.metrics.map((m) => [m.name, m]));
    const personal = personalColumns(ds);
    ds.metrics.forEach((m, i) => {
      const file = this.ds.metrics[i]!;
      const def = m.definition;
      const refs: [Path, string][] =
        def.type === 'ratio'
          ? file.definition
            ? [[['definition', 'numerator'], def.numerator], [['definition', 'denominator'], def.denominator]]
            : [[['ratio', 'of'], def.numerator], [['ratio', 'per'], def.denominator]]
          : def.type === 'rate' && def.of
            ? [[file.definition ? ['definition', 'of'] : ['rate', 'of'], def.of]]
            : [];
      for (const [key, ref] of refs) {
        const target = byName.get(ref);
        if (!target) this.problem(['metrics', i, ...key], `names metric "${ref}", which is not in this dataset's metrics`);
        else if (target.definition.type === 'ratio' || target.definition.type === 'rate')
          this.problem(['metrics', i, ...key], `"${ref}" is itself a ratio or rate; name a sum, count, distinct count or average`);
      }
      if (m.unit === 'currency' && !m.currency) this.problem(['metrics', i, 'currency'], 'a currency metric needs a three-letter currency code (e.g. EUR)');
      if (m.unit_label !== undefined && (m.unit === 'currency' || m.unit === 'percent'))
        this.problem(['metrics', i, 'unit_label'], `a ${m.unit} metric writes its own sign; unit_label is for count and number metrics (e.g. ppm)`);
      const howKey = file.definition ? 'definition' : (HOW_KEYS.find((k) => file[k] !== undefined) ?? 'name');
      const read = 'column' in def ? this.sourceColumns(ds, def.column) : [];
      const hit = read.find((c) => personal.has(c));
      if (hit !== undefined) {
        this.problem(['metrics', i, howKey], `reads ${hit}, which is marked personal data (dimension "${personal.get(hit)}"): a metric may not add up personal data; count a key that is not personal instead`);
      }
    });
  }

  /** The table's own columns behind a column name (a computed column reads those of its expression). */
  private sourceColumns(ds: DatasetConfig, column: string): string[] {
    const d = ds.derived?.find((x) => x.name === column);
    return d ? expressionColumns(d.expr) : [column];
  }
}

/** Columns holding personal data, each with the dimension that says so. */
function personalColumns(ds: DatasetConfig): Map<string, string> {
  const out = new Map<string, string>();
  for (const d of ds.dimensions) {
    if (!d.personal_data) continue;
    const derived = ds.derived?.find((x) => x.name === d.column);
    for (const c of derived ? expressionColumns(derived.expr) : [d.column]) out.set(c, d.name);
  }
  return out;
}

/** A filter as an expression (for a group defined by values). */
export function filterExpr(f: ColumnFilter): Expr {
  const col: Expr = { type: 'column', name: f.column };
  const lit = (v: string | number | boolean): Expr =>
    typeof v === 'number' ? { type: 'number', value: v, text: String(v) } : typeof v === 'boolean' ? { type: 'boolean', value: v } : { type: 'string', value: v };
  const v = f.value;
  const one = Array.isArray(v) ? v[0] : v;
  switch (f.op) {
    case 'is_true':
      return { type: 'unary', op: 'IS TRUE', operand: col };
    case 'is_false':
      return { type: 'unary', op: 'IS FALSE', operand: col };
    case 'in':
      return { type: 'in', negated: false, value: col, list: (Array.isArray(v) ? v : v === undefined ? [] : [v]).map(lit) };
    default: {
      const op = ({ eq: '=', ne: '!=', gt: '>', gte: '>=', lt: '<', lte: '<=' } as const)[f.op];
      return { type: 'binary', op, left: col, right: lit(one ?? '') };
    }
  }
}

function legacyAdvice(d: LegacyDefinition): string {
  switch (d.type) {
    case 'sum':
      return `\`sum: ${d.column}\``;
    case 'count':
      return '`count: rows`';
    case 'distinct_count':
      return `\`count_distinct: ${d.column}\``;
    case 'average':
      return `\`average: ${d.column}\``;
    case 'ratio':
      return `\`ratio: { of: ${d.numerator}, per: ${d.denominator} }\``;
    case 'rate':
      return `\`rate: { when: …${d.of ? `, of: ${d.of}` : ''} }\``;
  }
}

export function keyPath(path: Path): string {
  return path.map((k, i) => (typeof k === 'number' ? `[${k}]` : i === 0 ? k : `.${k}`)).join('');
}
