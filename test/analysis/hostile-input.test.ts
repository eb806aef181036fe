// Hostile chat input (SQL, quotes, control characters, odd Unicode, huge messages) through every
// pure step between a chat message and SQL: intake, typed answers to the prompts, plan building,
// and the compilation of every planned sub-question for both dialects. Nothing may throw, no
// fragment of the input may reach the SQL text (values travel only as bound parameters), and the
// SQL may use no identifier, word or literal that the templates do not produce for benign input.
// Pure functions only (no database), so the generated inputs run in seconds.
import fc from 'fast-check';
import { beforeAll, describe, expect, it } from 'vitest';
import type { CompileContext } from '../../analysis/compile-context.js';
import type { Coverage } from '../../analysis/coverage.js';
import { duckdbDialect, type Dialect, type TimeColumnType } from '../../analysis/sql/dialect.js';
import { postgresDialect } from '../../analysis/sql/postgres-dialect.js';
import { SUB_QUESTIONS, TEMPLATE_NAMES } from '../../analysis/sub-questions/registry.js';
import { AUDIENCES, GRAINS, type CompiledQuery, type Grain, type SubQuestion } from '../../analysis/types.js';
import type { Brief } from '../../bot/brief.js';
import { readRequest } from '../../bot/reading/read-request.js';
import { isValidDate } from '../../bot/reading/calendar.js';
import { exampleValues } from '../helpers/example-facts.js';
import { buildPlan } from '../../bot/plan.js';
import { applyCorrection, planFor } from '../../bot/card-edits.js';
import { changesSomething, readCorrection } from '../../bot/reading/corrections.js';
import { nextPrompt, PROMPT_TOPICS, readAnswer, type Prompt, type PromptContext, type PromptTopic } from '../../bot/prompts.js';
import { exampleDataset as ds } from '../helpers/example-config.js';
import { dayFilter, WEEKEND } from '../../analysis/day-of-week.js';

// ---- the numbers of generated inputs ---------------------------------------------------------
// 2,000 conversations (a request and six typed answers each) + 6,000 direct compilations with
// hostile segment values + 2,500 hostile answers, each given to the six brief prompts + 4 pairs of
// huge messages: 10,504 generated inputs in all (each fast-check run draws one input).
const RUNS = { conversations: 2_000, compilations: 6_000, answers: 2_500, huge: 4 } as const;

const coverage: Coverage = { firstDate: '2022-01-01', lastDate: '2025-06-18', rows: 200_000 };
const now = new Date('2025-06-20T09:00:00Z');
const promptContext: PromptContext = { dataset: ds, coverage, facts: { dataset: ds, coverage, values: exampleValues }, now, locale: 'en-IE' };
const DIALECTS: Dialect[] = [duckdbDialect, postgresDialect];
const TIME_TYPES: TimeColumnType[] = ['date', 'timestamp', 'timestamptz'];
const ctxOf = (dialect: Dialect, timeColumnType: TimeColumnType): CompileContext => ({ dataset: ds, dialect, timeColumnType, coverage });

// ---- what the SQL may contain ----------------------------------------------------------------

/** SQL split into delimited identifiers ("..." as quoteIdentifier writes them), string literals, and bare words. */
function sqlTokens(sql: string): { identifiers: string[]; literals: string[]; words: string[]; placeholders: number[] } {
  const identifiers = [...sql.matchAll(/"((?:[^"]|"")*)"/g)].map((m) => m[1]!.replaceAll('""', '"'));
  const withoutIdents = sql.replace(/"(?:[^"]|"")*"/g, ' ');
  const literals = [...withoutIdents.matchAll(/'((?:[^']|'')*)'/g)].map((m) => m[1]!);
  const bare = withoutIdents.replace(/'(?:[^']|'')*'/g, ' ');
  const placeholders = [...bare.matchAll(/\$(\d+)/g)].map((m) => Number(m[1]));
  const words = [...bare.replace(/\$\d+/g, ' ').matchAll(/[A-Za-z_][A-Za-z0-9_]*/g)].map((m) => m[0].toLowerCase());
  return { identifiers, literals, words, placeholders };
}

/** Every name the catalog lets into SQL: the table, its columns, and the metric and dimension names. */
function catalogIdentifiers(): Set<string> {
  const out = new Set<string>([ds.table, ds.time_column]);
  if (ds.key_column) out.add(ds.key_column);
  for (const c of ds.amount_columns) out.add(c);
  for (const m of ds.metrics) {
    out.add(m.name);
    const def = m.definition;
    if ('column' in def) out.add(def.column);
    if ('where' in def && def.where) out.add(def.where.column);
  }
  for (const d of ds.dimensions) if (!d.personal_data) out.add(d.column).add(d.name);
  for (const g of ds.comparison_groups) {
    out.add(g.column);
    if (g.unit_column) out.add(g.unit_column);
  }
  return out;
}

interface Vocabulary {
  /** Quoted identifiers that are not catalog names: the templates' own aliases. */
  aliases: Set<string>;
  words: Set<string>;
  literals: Set<string>;
  /** Every benign SQL text, joined: a fragment found here is the templates' own text. */
  corpus: string;
  /** (template, metric, dimension) combinations that compile: the fuzz draws from these. */
  shapes: Pick<SubQuestion, 'template' | 'metrics' | 'dimension' | 'comparisonGroup' | 'kind' | 'lens' | 'contrast'>[];
}

const groupable = ds.dimensions.filter((d) => !d.personal_data).map((d) => d.name);
const BENIGN_WINDOWS = [
  { start: '2022-01-01', end: '2025-06-19' },
  { start: '2024-06-01', end: '2024-09-01' },
];
const BENIGN_FILTERS = [
  { dimension: 'channel', values: ['web', 'app'] },
  { dimension: 'fare_class', values: [] },
  // "on weekends": the days of the week a request may keep (analysis/day-of-week.ts).
  dayFilter(WEEKEND),
];

/** The vocabulary of the templates, from compiling every template for benign sub-questions. */
function benignVocabulary(): Vocabulary {
  const catalog = catalogIdentifiers();
  const aliases = new Set<string>();
  const words = new Set<string>();
  const literals = new Set<string>();
  const texts = new Set<string>();
  const shapes: Vocabulary['shapes'] = [];
  const take = (q: CompiledQuery) => {
    texts.add(q.sql);
    const t = sqlTokens(q.sql);
    for (const id of t.identifiers) if (!catalog.has(id)) aliases.add(id);
    for (const w of t.words) words.add(w);
    for (const l of t.literals) literals.add(l);
  };
  for (const name of TEMPLATE_NAMES) {
    const template = SUB_QUESTIONS[name].template;
    for (const metric of ds.metrics.map((m) => m.name)) {
      for (const dimension of [undefined, ...groupable]) {
        // A value-against-value question names its two values (bound, like every segment value).
        const contrast = name === 'value_compare' && dimension ? { contrast: { dimension, values: ['web', 'app'] as [string, string] } } : {};
        const shape = { template: name, metrics: [metric], kind: 'trend' as const, lens: 'time_pattern' as const, comparisonGroup: 'skerrypass', ...(dimension ? { dimension } : {}), ...contrast };
        let ok = false;
        for (const grain of GRAINS) {
          // Dates and segment values are bound, so one window and one filtered form per grain show
          // the vocabulary; the month grain also gets a short window and every time column type.
          for (const window of grain === 'month' ? BENIGN_WINDOWS : BENIGN_WINDOWS.slice(0, 1)) {
            for (const filters of grain === 'month' ? [[], BENIGN_FILTERS] : [BENIGN_FILTERS]) {
              const sq: SubQuestion = { id: 'b', ...shape, grain, window, filters };
              for (const dialect of DIALECTS) {
                for (const timeType of grain === 'month' && filters.length === 0 && window === BENIGN_WINDOWS[0] ? TIME_TYPES : (['date'] as const)) {
                  try {
                    template.compile(sq, ctxOf(dialect, timeType)).forEach(take);
                    ok = true;
                  } catch {
                    // Not every template takes every metric or needs a dimension; those shapes are not drawn.
                  }
                }
              }
            }
          }
        }
        if (ok) shapes.push(shape);
      }
    }
  }
  return { aliases, words, literals, corpus: [...texts].join('\n'), shapes };
}

let vocab: Vocabulary;
const catalog = catalogIdentifiers();
const benignFragment = new Map<string, boolean>();

beforeAll(() => {
  vocab = benignVocabulary();
});

/** Whitespace-separated pieces of the input, 4 characters or longer: what could leak if a value were pasted into SQL. */
function fragmentsOf(texts: readonly string[]): Set<string> {
  const out = new Set<string>();
  for (const t of texts) for (const piece of t.split(/[\s\u0000-\u001f\u2028\u2029]+/)) if (piece.length >= 4) out.add(piece);
  return out;
}

/** Throws (with the offending piece named) unless the SQL is made only of the templates' own vocabulary. */
function checkSql(q: CompiledQuery, fragments: Set<string>, where: string): void {
  const t = sqlTokens(q.sql);
  for (const id of t.identifiers) {
    if (!catalog.has(id) && !vocab.aliases.has(id)) throw new Error(`${where}: identifier "${id}" is neither in the catalog nor a template alias`);
  }
  for (const w of t.words) if (!vocab.words.has(w)) throw new Error(`${where}: word ${w} never appears in benign SQL`);
  for (const l of t.literals) if (!vocab.literals.has(l)) throw new Error(`${where}: literal '${l}' never appears in benign SQL`);
  for (const p of t.placeholders) if (p < 1 || p > q.params.length) throw new Error(`${where}: placeholder $${p} with ${q.params.length} parameters`);
  for (const p of q.params) if (!['string', 'number', 'boolean'].includes(typeof p)) throw new Error(`${where}: parameter of type ${typeof p}`);
  if (q.sql.includes('customer_email')) throw new Error(`${where}: personal data column in SQL`);
  for (const f of fragments) {
    if (!q.sql.includes(f)) continue;
    let benign = benignFragment.get(f);
    if (benign === undefined) {
      benign = vocab.corpus.includes(f);
      benignFragment.set(f, benign);
    }
    if (!benign) throw new Error(`${where}: the input fragment ${JSON.stringify(f)} is in the SQL`);
  }
}

function compileEverywhere(sq: SubQuestion, fragments: Set<string>, timeType: TimeColumnType): CompiledQuery[][] {
  const out: CompiledQuery[][] = [];
  for (const dialect of DIALECTS) {
    const queries = SUB_QUESTIONS[sq.template].template.compile(sq, ctxOf(dialect, timeType));
    for (const q of queries) checkSql(q, fragments, `${sq.template} (${dialect.name})`);
    out.push(queries);
  }
  return out;
}

// ---- hostile text --------------------------------------------------------------------------

const SQL_PAYLOADS = [
  "'; DROP TABLE bookings; --",
  '" OR 1=1 --',
  'revenue"); DELETE FROM bookings; --',
  "\\' OR '1'='1",
  "route = 'x' OR TRUE",
  'UNION SELECT customer_email FROM bookings',
  '$1',
  '$$ SELECT pg_sleep(10) $$',
  '/* zq9canary */',
  "E'\\x00'",
  '"fare_total"',
  '"customer_email"',
  'sail_date"; --',
  '`bookings`',
  '%s %d ${x} {{y}} ? :name @p1',
  "COPY bookings TO '/tmp/x'",
  "1'; SELECT set_config('statement_timeout','0',false); --",
  'zq9canary',
];
const ODD_UNICODE = [
  '\u0000',
  '\u200F', // right-to-left mark
  '\u202E', // right-to-left override
  '\u202A', // left-to-right embedding
  '\u200D', // zero-width joiner
  '\u200C', // zero-width non-joiner
  '\u200B', // zero-width space
  '\uFEFF', // byte-order mark
  '\u2028', // line separator
  '\uD800', // lone high surrogate
  '\uDC00', // lone low surrogate
  '\u{1D518}', // a surrogate pair
  '\u{1F469}\u200D\u{1F469}\u200D\u{1F467}', // a family emoji joined by ZWJs
  'e\u0301', // combining acute accent
  '\uFF02\uFF07', // fullwidth quotation marks
  'ı\u0130', // dotless i, dotted capital I
  '\uFB01', // ligature fi
  '\u0645\u0627\u0644', // Arabic letters
];
const CONTROL = fc.integer({ min: 0, max: 31 }).map((c) => String.fromCharCode(c));
const CATALOG_WORDS = [
  'revenue', 'bookings', 'passengers', 'customers', 'refund rate', 'average fare', 'fare per passenger', 'share of revenue refunded',
  'by route', 'per channel', 'fare class', 'booking channel', 'pass holders', 'SkerryPass', 'customer email',
  'since launch', 'since it launched', 'this summer vs last summer', 'last full month', 'month by month', 'weekly', 'quarterly',
  'for leadership', 'for the analysts', 'ops review', 'by Friday', 'by the 15th', 'asap', 'growth', 'trend', 'latest', 'KPI', 'snapshot',
  'which routes drove it', 'how often', 'travel more', 'is the program working', 'How has revenue moved over time?',
  '2023-04 to 2024-03', '2024-02-30', '2024-13', 'last 12 months', 'all', 'none', 'ok', '3', '2026-12-15',
];

const piece = fc.oneof(
  { weight: 4, arbitrary: fc.constantFrom(...CATALOG_WORDS) },
  { weight: 3, arbitrary: fc.constantFrom(...SQL_PAYLOADS) },
  { weight: 2, arbitrary: fc.constantFrom(...ODD_UNICODE) },
  { weight: 1, arbitrary: CONTROL },
  { weight: 2, arbitrary: fc.string({ unit: 'binary', maxLength: 40 }) },
  { weight: 1, arbitrary: fc.string({ unit: 'grapheme', maxLength: 20 }) },
  { weight: 1, arbitrary: fc.string({ unit: 'binary-ascii', maxLength: 30 }) },
);
const separator = fc.constantFrom(' ', '', ', ', '? ', '. ', ' and ', '\n', '\t', '\u00A0', ' vs ');
/** A message: pieces of catalog words, SQL, odd Unicode and noise, up to a couple of thousand characters. */
const message = fc
  .array(fc.tuple(piece, separator), { maxLength: 14 })
  .map((parts) => parts.map(([p, s]) => p + s).join(''));
/** A huge message: a hostile message repeated to between 20k and 100k characters. */
const hugeMessage = fc
  .tuple(message.filter((m) => m.length > 0), fc.integer({ min: 20_000, max: 100_000 }))
  .map(([m, n]) => m.repeat(Math.ceil(n / m.length)).slice(0, n));

// ---- one conversation, as the bot holds it, without the chat platform ----------------------

/**
 * Intake, then every prompt answered with a typed answer (falling back to "ok" when it is
 * refused), then every answer typed on the brief card as a correction, then the plan.
 */
function converse(request: string, answers: readonly string[]): { brief: Brief; refusals: string[] } {
  let brief = readRequest(request, promptContext.facts, { now });
  const refusals: string[] = [];
  for (let step = 0; step < 20; step++) {
    const prompt = nextPrompt(brief, promptContext);
    if (!prompt) return { brief: corrected(brief, answers, refusals), refusals };
    const reading = readAnswer(prompt, answers[step % answers.length]!, brief, promptContext);
    if (reading.ok) {
      brief = reading.brief;
      continue;
    }
    refusals.push(reading.message);
    const fallback = readAnswer(prompt, 'ok', brief, promptContext);
    if (!fallback.ok) throw new Error(`the recommended answer to the ${prompt.topic} prompt was refused: ${fallback.message}`);
    // The recommendation may be to stop (a measure the data lacks): the conversation ends there.
    if (fallback.stop) return { brief: fallback.brief, refusals };
    brief = fallback.brief;
  }
  throw new Error('the conversation did not reach a plan in 20 prompts');
}

/** The answers typed on the card, one correction each, as the conversation applies them. */
function corrected(start: Brief, answers: readonly string[], refusals: string[]): Brief {
  let brief = start;
  let dropped: string[] = [];
  for (const text of answers) {
    const c = readCorrection(text, promptContext.facts, now);
    if (!changesSomething(c)) continue;
    const edit = applyCorrection(brief, c, planFor(brief, ds, coverage, dropped).plan, dropped, { dataset: ds, coverage, locale: 'en-IE', words: text });
    refusals.push(...edit.problems);
    brief = edit.brief;
    dropped = edit.dropped;
  }
  return brief;
}

function planAndCompile(request: string, answers: readonly string[], timeType: TimeColumnType): number {
  const { brief, refusals } = converse(request, answers);
  // A refusal quotes at most a short clip of what was typed, however long the input.
  for (const r of refusals) if (r.length > 1_000) throw new Error(`a refusal of ${r.length} characters`);
  const plan = planFor(brief, ds, coverage, []).plan;
  const fragments = fragmentsOf([request, ...answers]);
  let compiled = 0;
  for (const sq of [...plan.items, ...plan.leftOut]) {
    compileEverywhere(sq, fragments, timeType);
    compiled++;
  }
  return compiled;
}

// ---- the properties --------------------------------------------------------------------------

describe('hostile chat input', () => {
  it('derives the allowed vocabulary from benign compilation of every template', () => {
    expect(vocab.shapes.map((s) => s.template)).toEqual(expect.arrayContaining([...TEMPLATE_NAMES]));
    // The aliases are the templates' own names, never a column the catalog does not expose.
    expect([...vocab.aliases].some((a) => a.includes('customer_email'))).toBe(false);
    // The checker itself rejects what it should.
    const fragments = fragmentsOf(["'; DROP TABLE bookings; --"]);
    expect(() => checkSql({ sql: 'SELECT "route" FROM "bookings"', params: [] }, fragments, 'ok')).not.toThrow();
    expect(() => checkSql({ sql: 'SELECT "nope" FROM "bookings"', params: [] }, fragments, 'x')).toThrow(/identifier "nope"/);
    expect(() => checkSql({ sql: "SELECT 1 FROM \"bookings\" WHERE x = ''; DROP TABLE bookings; --'", params: [] }, fragments, 'x')).toThrow();
    expect(() => checkSql({ sql: 'SELECT $2', params: [1] }, fragments, 'x')).toThrow(/placeholder/);
  });

  // Two thousand whole conversations take about a minute alone and several under a loaded CI
  // machine: the limit is generous so load never fails it (its speed is not what it checks).
  it(`conversations: ${RUNS.conversations} hostile requests with hostile typed answers reach a plan whose SQL holds none of it`, () => {
    let compiled = 0;
    fc.assert(
      fc.property(message, fc.array(message, { minLength: 6, maxLength: 6 }), fc.constantFrom(...TIME_TYPES), (request, answers, timeType) => {
        compiled += planAndCompile(request, answers, timeType);
      }),
      { numRuns: RUNS.conversations, seed: 20_250_618 },
    );
    // Not vacuous: catalog words in the messages give real plans to compile.
    expect(compiled).toBeGreaterThan(RUNS.conversations);
  }, 600_000);

  it(`compilation: ${RUNS.compilations} sub-questions with hostile segment values bind every value and paste none`, () => {
    const shape = fc.constantFrom(...vocab.shapes);
    const day = fc.integer({ min: 0, max: 6 * 365 }).map((n) => new Date(Date.UTC(2020, 0, 1) + n * 86_400_000).toISOString().slice(0, 10));
    const value = fc.oneof(message, fc.constantFrom(...SQL_PAYLOADS, ...ODD_UNICODE), fc.integer(), fc.boolean(), fc.double({ noNaN: true, noDefaultInfinity: true }));
    const filter = fc.record({ dimension: fc.constantFrom(...groupable), values: fc.array(value, { maxLength: 4 }) });
    fc.assert(
      fc.property(shape, fc.constantFrom(...GRAINS), day, day, fc.array(filter, { maxLength: 3 }), fc.constantFrom(...TIME_TYPES), (s, grain, a, b, filters, timeType) => {
        if (a === b) return;
        const window = a < b ? { start: a, end: b } : { start: b, end: a };
        const sq: SubQuestion = { id: 'f', ...s, grain: grain as Grain, window, filters };
        const texts = filters.flatMap((f) => f.values.filter((v): v is string => typeof v === 'string'));
        for (const queries of compileEverywhere(sq, fragmentsOf(texts), timeType)) {
          // Each value is a parameter, exactly as given, in some query of the sub-question.
          for (const v of filters.flatMap((f) => f.values)) {
            // (A query that reads no period at all, WHERE FALSE, has no use for the filters.)
            const bound = queries.some((q) => q.params.some((p) => Object.is(p, v)));
            if (!bound && !queries.every((q) => /\bWHERE FALSE\b/.test(q.sql))) throw new Error(`${sq.template}: the value ${JSON.stringify(v)} is not bound`);
          }
        }
      }),
      { numRuns: RUNS.compilations, seed: 4021 },
    );
  }, 120_000);

  it(`typed answers: ${RUNS.answers} hostile answers to each prompt are read into a well-formed brief or refused briefly`, () => {
    const prompts = promptsByTopic();
    expect(Object.keys(prompts).sort()).toEqual([...BRIEF_TOPICS].sort());
    expect(PROMPT_TOPICS).toEqual(expect.arrayContaining([...BRIEF_TOPICS]));
    const metricNames = new Set(ds.metrics.map((m) => m.name));
    fc.assert(
      fc.property(message, (typed) => {
        const briefs: Brief[] = [];
        for (const topic of BRIEF_TOPICS) {
          const { prompt, brief } = prompts[topic];
          const r = readAnswer(prompt, typed, brief, promptContext);
          if (!r.ok) {
            if (typeof r.message !== 'string' || r.message.length === 0 || r.message.length > 1_000) throw new Error(`${topic}: refusal of ${r.message.length} characters`);
            continue;
          }
          briefs.push(r.brief);
        }
        // Typed on the brief card: a correction to a complete brief.
        const base = cardBrief();
        const c = readCorrection(typed, promptContext.facts, now);
        const edit = applyCorrection(base, c, planFor(base, ds, coverage, []).plan, [], { dataset: ds, coverage, locale: 'en-IE', words: typed });
        for (const p of edit.problems) if (p.length > 1_000) throw new Error(`card: a problem of ${p.length} characters`);
        briefs.push(edit.brief);
        for (const b of briefs) {
          if (b.audience !== undefined && !AUDIENCES.includes(b.audience)) throw new Error(`audience ${b.audience}`);
          if (b.grain !== undefined && !GRAINS.includes(b.grain)) throw new Error(`grain ${b.grain}`);
          if (b.deadline !== undefined && b.deadline !== 'none' && !isoOk(b.deadline)) throw new Error(`deadline ${b.deadline}`);
          if (b.window && !(isoOk(b.window.start) && isoOk(b.window.end) && b.window.start < b.window.end)) throw new Error(`window ${JSON.stringify(b.window)}`);
          for (const m of [...b.metrics, ...b.questions.flatMap((q) => q.metrics)]) if (!metricNames.has(m)) throw new Error(`metric ${m}`);
          for (const d of b.dimensions) if (!groupable.includes(d)) throw new Error(`dimension ${d}`);
        }
      }),
      { numRuns: RUNS.answers, seed: 7 },
    );
  }, 120_000);

  it(`huge messages: ${RUNS.huge} requests and answers of 20k to 100k characters`, () => {
    fc.assert(
      fc.property(hugeMessage, hugeMessage, (request, answer) => {
        planAndCompile(request, [answer, 'ok', answer, 'ok', answer, 'ok'], 'timestamptz');
      }),
      { numRuns: RUNS.huge, seed: 99 },
    );
  }, 120_000);
});

/** The prompt asked before the card (nextPrompt asks only what cannot be defaulted); it reads its answer with readAnswer. */
const BRIEF_TOPICS = ['metrics'] as const satisfies readonly PromptTopic[];

/** A complete brief, as the card shows it, for corrections. */
function cardBrief(): Brief {
  const question = { text: 'How has revenue grown', kind: 'growth' as const, metrics: ['revenue'], dimensions: [], filters: [], frequency: false };
  return { requestText: 'x', questions: [question], kinds: ['growth'], metrics: ['revenue'], dimensions: [], unknownTerms: [], audience: 'managers', deadline: 'none', grain: 'month' };
}
type BriefTopic = (typeof BRIEF_TOPICS)[number];

/** One prompt of each topic, with a brief that is waiting on exactly that prompt. */
function promptsByTopic(): Record<BriefTopic, { prompt: Prompt; brief: Brief }> {
  const briefs: Record<BriefTopic, Brief> = {
    metrics: { requestText: 'x', questions: [], kinds: ['trend'], metrics: [], dimensions: [], unknownTerms: [] },
  };
  const out = {} as Record<BriefTopic, { prompt: Prompt; brief: Brief }>;
  for (const topic of BRIEF_TOPICS) {
    const prompt = nextPrompt(briefs[topic], promptContext);
    if (prompt?.topic !== topic) throw new Error(`expected a ${topic} prompt, got ${prompt?.topic}`);
    out[topic] = { prompt, brief: briefs[topic] };
  }
  return out;
}

function isoOk(iso: string): boolean {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(iso);
  return !!m && isValidDate(Number(m[1]), Number(m[2]), Number(m[3]));
}
