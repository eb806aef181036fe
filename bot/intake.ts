// Reads a free-text request into a brief: the kinds of question it holds, the catalog terms it
// names (tolerating typos), phrases that look like metrics but match nothing, the grain, the
// audience, the deadline and the purpose. What it cannot read is left for the prompts.
import * as chrono from 'chrono-node';
import type { DatasetConfig } from '../config/schema.js';
import type { Grain, RequestKind } from '../analysis/types.js';
import type { Audience, Brief, Question, UnknownTerm } from './brief.js';
import { type CatalogTerm, closestTerms, findTerms, normaliseWords, type TermHit } from './term-match.js';

// One list per dataset config (configs are not changed once loaded), so term matching can keep
// its prepared form of the list between requests.
const catalogTermLists = new WeakMap<DatasetConfig, readonly CatalogTerm[]>();

export function catalogTerms(ds: DatasetConfig): readonly CatalogTerm[] {
  let terms = catalogTermLists.get(ds);
  if (!terms) {
    terms = Object.freeze(buildCatalogTerms(ds));
    catalogTermLists.set(ds, terms);
  }
  return terms;
}

function buildCatalogTerms(ds: DatasetConfig): CatalogTerm[] {
  const out: CatalogTerm[] = [];
  const add = (name: string, kind: CatalogTerm['kind'], phrases: string[]) => {
    for (const phrase of new Set([name.replaceAll('_', ' '), ...phrases])) out.push({ name, kind, phrase });
  };
  for (const m of ds.metrics) add(m.name, 'metric', [m.label, ...m.synonyms]);
  // Personal data is matched too, so its words are not read as another term ("customer email"
  // is not the customers metric) and the request can be told it is refused.
  for (const d of ds.dimensions) add(d.name, d.personal_data ? 'personal' : 'dimension', [d.label, ...d.synonyms]);
  for (const g of ds.comparison_groups) add(g.name, 'group', [g.label, g.members_label, ...g.synonyms]);
  return out;
}

const KIND_CUES: Record<RequestKind, RegExp> = {
  trend: /\b(trends?|trending|over time|moved|movement|history|historic\w*|pattern|seasonal\w*|month by month|how has|how have|evolv\w*|peak\w*)\b/i,
  growth: /\b(grow\w*|growth|beat|beaten|year over year|yoy|vs\.? last|versus last|compared (to|with) last|increase\w*|decline\w*|fell|drop\w*|up or down|than last)\b/i,
  performance: /\b(program\w*|programme\w*|launch\w*|since it launched|doing well|working|worth keeping|keep it|should we keep|travel more|effect|impact|pilot|holders?)\b/i,
  kpi: /\b(where does|where do|stand\w*|right now|currently|this month|last full month|latest|kpi|snapshot|current)\b/i,
};

const GRAIN_CUES: [RegExp, Grain][] = [
  [/\b(daily|per day|by day|each day|day by day)\b/i, 'day'],
  [/\b(weekly|per week|by week|each week|week by week)\b/i, 'week'],
  [/\b(monthly|per month|by month|each month|month by month)\b/i, 'month'],
  [/\b(quarterly|per quarter|by quarter|each quarter)\b/i, 'quarter'],
  [/\b(yearly|annually|annual|per year|by year|each year)\b/i, 'year'],
];

const AUDIENCE_CUES: [RegExp, Audience][] = [
  [/\b(leadership|executives?|exec|board|ceo|cfo|coo|senior management|leaders)\b/i, 'leadership'],
  [/\b(analysts?|data team|for the data|technical)\b/i, 'analysts'],
  [/\b(ops review|operations review|my team|managers?|team meeting|finance review)\b/i, 'managers'],
];

// Phrases a person uses to name the thing they want measured; what they capture is checked
// against the catalog, and an unmatched capture becomes an unknown term.
const METRIC_SLOTS: RegExp[] = [
  /\b(?:trends?|growth|history|pattern|level|evolution|value)\s+(?:of|in|for)\s+(?:our\s+|the\s+|my\s+)?([\p{L}][\p{L} ]{1,40}?)(?=\s+(?:over|by|per|since|for|in|from|this|last|during|across|and)\b|[?.!,;]|$)/iu,
  /\bhow\s+(?:has|have|did|do|does|is|are)\s+(?:our\s+|the\s+|my\s+)?([\p{L}][\p{L} ]{1,40}?)\s+(?:moved|changed|developed|evolved|trended|grown|done|performed|looked|gone)\b/iu,
  /\b(?:show|chart|plot|graph)\s+(?:me\s+|us\s+)?(?:our\s+|the\s+)?([\p{L}][\p{L} ]{1,40}?)\s+(?:over time|by month|by week|monthly|weekly|trend)\b/iu,
];
const FILLER = new Set(['total', 'overall', 'our', 'the', 'monthly', 'weekly', 'daily', 'average', 'number', 'of', 'all']);

export interface IntakeOptions {
  now: Date;
  timeZone: string;
}

/**
 * How many characters of a request intake reads. Chat platforms keep a message to a few thousand
 * characters (Slack advises at most 4,000 in a message's text; Discord allows 2,000), so a longer
 * request is nearly always a pasted document, and matching catalog terms over all of it takes
 * seconds for nothing. The rest is not read, and the thread is told so; the whole text stays in
 * the brief and in the audit log.
 */
export const REQUEST_READ_LIMIT = 4_000;

/** The part of a request intake reads: all of it up to the limit, else the start, cut between words. */
export function readablePart(text: string, limit = REQUEST_READ_LIMIT): string {
  if (text.length <= limit) return text;
  let cut = limit;
  // Never split a UTF-16 surrogate pair (an emoji or other character outside the BMP).
  if (/[\uD800-\uDBFF]/.test(text[cut - 1]!)) cut--;
  // Back off to the last space in the final 200 characters, so no word is half read.
  const space = text.slice(cut - 200, cut).search(/\s\S*$/);
  if (space >= 0) cut = cut - 200 + space;
  return text.slice(0, cut);
}

/** Whether intake read only part of the request. */
export function requestWasCut(text: string): boolean {
  return readablePart(text).length < text.length;
}

export function readRequest(fullText: string, ds: DatasetConfig, opts: IntakeOptions): Brief {
  const text = readablePart(fullText);
  const terms = catalogTerms(ds);
  const hits = findTerms(text, terms);
  const metrics = unique(hits.filter((h) => h.term.kind === 'metric').map((h) => h.term.name));
  const dimensions = unique(hits.filter((h) => h.term.kind === 'dimension').map((h) => h.term.name));
  const group = groupNamed(hits, ds);
  const questions = splitQuestions(text, ds, terms);
  const kinds = unique(questions.map((q) => q.kind));
  const brief: Brief = {
    // The whole request is kept (it is re-read when the dataset changes, and only its readable part is read).
    requestText: fullText,
    questions,
    kinds: kinds.length > 0 ? kinds : ['trend'],
    metrics,
    dimensions,
    unknownTerms: unknownMetricPhrases(text, terms),
  };
  if (group) brief.comparisonGroup = group;
  const personal = unique(hits.filter((h) => h.term.kind === 'personal').map((h) => h.term.name));
  if (personal.length > 0) brief.personalData = personal;
  const grain = GRAIN_CUES.find(([re]) => re.test(text))?.[1];
  if (grain) brief.grain = grain;
  const audience = AUDIENCE_CUES.find(([re]) => re.test(text))?.[1];
  if (audience) brief.audience = audience;
  const deadline = readDeadline(text, opts);
  if (deadline) brief.deadline = deadline;
  const purpose = /\b(?:for|ahead of|before)\s+(?:the|our|my)\s+([\p{L} ]{2,40}?(?:review|meeting|board|report|update|presentation|offsite))\b/iu.exec(text)?.[1];
  if (purpose) brief.purpose = purpose.trim();
  return brief;
}

/** A comparison group named directly, or through a dimension on the group's column. */
function groupNamed(hits: TermHit[], ds: DatasetConfig): string | undefined {
  const direct = hits.find((h) => h.term.kind === 'group')?.term.name;
  if (direct) return direct;
  // A dimension on a comparison group's column ("SkerryPass holders") names the group too.
  return ds.comparison_groups.find((g) =>
    hits.some((h) => h.term.kind === 'dimension' && ds.dimensions.find((d) => d.name === h.term.name)?.column === g.column),
  )?.name;
}

// Where one question ends and the next begins: sentence ends, and the joins people use to
// list questions in one breath ("..., whether ...", "..., and where ...").
const QUESTION_BREAK = /[?!;]|\.(?=\s|$)|,?\s+and\s+(?=(?:whether|where|which|how|what|why)\b)|,\s+(?=(?:whether|where|which|how|what|why)\b)/i;
const FREQUENCY = /\b(more often|how often|frequency|frequently|travel more|book more|repeat|per customer)\b/i;
// Clauses naming only a breakdown ("which routes drove it") refine the question before them.
const REFINES_PREVIOUS = /^\s*(which|what)\b.*\b(drove|drive|driving|behind|explain|caused|contributed)\b/i;

export function splitQuestions(text: string, ds: DatasetConfig, terms = catalogTerms(ds)): Question[] {
  const clauses = text.split(QUESTION_BREAK).map((c) => c.trim()).filter((c) => c.length > 0);
  const questions: Question[] = [];
  for (const clause of clauses) {
    const hits = findTerms(clause, terms);
    const metrics = unique(hits.filter((h) => h.term.kind === 'metric').map((h) => h.term.name));
    const dimensions = unique(hits.filter((h) => h.term.kind === 'dimension').map((h) => h.term.name)).filter(
      (d) => !ds.comparison_groups.some((g) => g.column === ds.dimensions.find((x) => x.name === d)?.column),
    );
    const group = groupNamed(hits, ds);
    const kind = clauseKind(clause, group !== undefined);
    const previous = questions[questions.length - 1];
    if ((kind === null || REFINES_PREVIOUS.test(clause)) && previous) {
      previous.metrics = unique([...previous.metrics, ...metrics]);
      previous.dimensions = unique([...previous.dimensions, ...dimensions]);
      continue;
    }
    if (kind === null && metrics.length === 0) continue; // context, such as "Ops review is on the 15th"
    const frequency = FREQUENCY.test(clause);
    // "more often than other customers": the customers are the unit counted, not the metric.
    const asked = frequency ? metrics.filter((m) => ds.metrics.find((x) => x.name === m)?.definition.type !== 'distinct_count') : metrics;
    const q: Question = { text: withoutPreamble(clause), kind: kind ?? 'trend', metrics: asked, dimensions, frequency };
    if (group) q.comparisonGroup = group;
    questions.push(q);
  }
  return questions;
}

/** "Could the data team tell us whether X" -> "X": the question without its polite wrapping. */
function withoutPreamble(clause: string): string {
  const stripped = clause
    .replace(/^(?:(?:could|can|would|will)\s+(?:you|someone|the data team|the team|we)\s+(?:please\s+)?(?:tell|show|let)\s+(?:us|me)\s+(?:know\s+)?)?(?:whether|if)\s+/i, '')
    .replace(/^(?:and|also|plus)\s+/i, '');
  return stripped.length > 0 ? stripped : clause;
}

/** The one kind a clause asks; the most specific cue wins. */
function clauseKind(clause: string, namesGroup: boolean): RequestKind | null {
  if (KIND_CUES.performance.test(clause) && (namesGroup || /\b(program|programme|launch|pilot|feature)/i.test(clause))) return 'performance';
  if (KIND_CUES.kpi.test(clause)) return 'kpi';
  if (KIND_CUES.growth.test(clause)) return 'growth';
  if (KIND_CUES.trend.test(clause)) return 'trend';
  return null;
}

function unknownMetricPhrases(text: string, terms: readonly CatalogTerm[]): UnknownTerm[] {
  const out: UnknownTerm[] = [];
  for (const re of METRIC_SLOTS) {
    const m = re.exec(text);
    const phrase = m?.[1]?.trim();
    if (!phrase) continue;
    if (findTerms(phrase, terms).length > 0) continue;
    const words = normaliseWords(phrase).filter((w) => !FILLER.has(w));
    if (words.length === 0) continue;
    const cleaned = words.join(' ');
    if (out.some((u) => u.text === cleaned)) continue;
    out.push({ text: cleaned, closest: closestTerms(cleaned, terms, 'metric') });
  }
  return out;
}

/** A date the requester needs the answer by: "by the 15th", "before Friday", "asap". */
export function readDeadline(text: string, opts: IntakeOptions): string | undefined {
  if (/\b(asap|as soon as possible|urgent\w*|today)\b/i.test(text)) return isoDateIn(opts.now, opts.timeZone);
  // chrono-node reads "Friday" or "end of next month" but not a bare day of the month.
  const dayOfMonth = /\b(?:by|on|before|due|until)\s+(?:the\s+)?(\d{1,2})(?:st|nd|rd|th)\b(?!\s+(?:of\s+)?[a-z]{3})/i.exec(text);
  if (dayOfMonth) {
    const day = Number(dayOfMonth[1]);
    const today = isoDateIn(opts.now, opts.timeZone);
    const [y, m] = today.split('-').map(Number) as [number, number];
    for (let ahead = 0; ahead < 3; ahead++) {
      const d = new Date(Date.UTC(y, m - 1 + ahead, day));
      const iso = d.toISOString().slice(0, 10);
      if (d.getUTCDate() === day && iso >= today) return iso;
    }
  }
  const results = chrono.parse(text, { instant: opts.now, timezone: zoneOffsetMinutes(opts.now, opts.timeZone) }, { forwardDate: true });
  for (const r of results) {
    const before = text.slice(Math.max(0, r.index - 24), r.index).toLowerCase();
    if (!/\b(by|before|due|until|deadline|is on|on|for)\s*(the\s*)?$/.test(before)) continue;
    const d = r.start.date();
    return isoDateIn(d, opts.timeZone);
  }
  return undefined;
}

export function readDeadlineAnswer(text: string, opts: IntakeOptions): string | undefined {
  if (/\b(asap|as soon as possible|urgent\w*|today)\b/i.test(text)) return isoDateIn(opts.now, opts.timeZone);
  if (/^\s*\d{4}-\d{2}-\d{2}\s*$/.test(text)) return isValidIsoDate(text.trim()) ? text.trim() : undefined;
  const r = chrono.parseDate(text, { instant: opts.now, timezone: zoneOffsetMinutes(opts.now, opts.timeZone) }, { forwardDate: true });
  return r ? isoDateIn(r, opts.timeZone) : undefined;
}

export function isValidIsoDate(iso: string): boolean {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(iso);
  if (!m) return false;
  const d = new Date(Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3])));
  return d.toISOString().slice(0, 10) === iso;
}

// Building an Intl formatter costs far more than using one; intake formats dates for every request.
const isoDateFormats = new Map<string, Intl.DateTimeFormat>();
const wallClockFormats = new Map<string, Intl.DateTimeFormat>();

function formatFor(cache: Map<string, Intl.DateTimeFormat>, timeZone: string, make: () => Intl.DateTimeFormat): Intl.DateTimeFormat {
  let f = cache.get(timeZone);
  if (!f) {
    f = make();
    cache.set(timeZone, f);
  }
  return f;
}

export function isoDateIn(d: Date, timeZone: string): string {
  // en-CA formats as YYYY-MM-DD.
  return formatFor(isoDateFormats, timeZone, () => new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' })).format(d);
}

function zoneOffsetMinutes(d: Date, timeZone: string): number {
  const parts = formatFor(wallClockFormats, timeZone, () => new Intl.DateTimeFormat('en-US', { timeZone, hourCycle: 'h23', year: 'numeric', month: 'numeric', day: 'numeric', hour: 'numeric', minute: 'numeric' }))
    .formatToParts(d)
    .reduce<Record<string, number>>((acc, p) => (p.type === 'literal' ? acc : { ...acc, [p.type]: Number(p.value) }), {});
  const asUtc = Date.UTC(parts.year!, parts.month! - 1, parts.day!, parts.hour!, parts.minute!);
  return Math.round((asUtc - d.getTime()) / 60_000);
}

function unique<T>(xs: T[]): T[] {
  return [...new Set(xs)];
}
