// Clarifying prompts: what to ask next, with a recommended default and its reason, and how to
// read a typed (or clicked) answer. A prompt is never asked when the brief already holds it.
import { focusShares } from './reading/share-focus.js';
import { anchorToOwnStart } from './reading/own-start.js';
import type { DatasetConfig } from '../config/schema.js';
import type { Coverage } from '../analysis/coverage.js';
import { inSentence } from '../analysis/captions/grammar.js';
import { formatPeriod } from '../analysis/format.js';
import { seasonOf } from './reading/calendar.js';
import { shortWindow } from '../analysis/window-words.js';
import { addDays, addMonths, periodStart } from '../analysis/periods.js';
import { finestGrain, isFinerGrain } from '../analysis/grains.js';
import { GRAINS, type DateWindow, type Grain, type SegmentFilter } from '../analysis/types.js';
import { type AmbiguousValue, type Brief, type BriefSlot, type Question, type UnknownTerm, wholeRequestQuestion } from './brief.js';
import { distance } from 'fastest-levenshtein';
import { fullWindow, readDeadlineAnswer, readWindowAnswer } from './reading/answers.js';
import { saysAsap } from './reading/deadline.js';
import { ACCEPT_DEFAULT, AUDIENCE_LABELS, audienceNamedBy, GRAIN_WORDS, grainNamedBy } from './reading/lexicon.js';
import { type DatasetFacts, isOutsideDataNote, readRequest, rowCountMetric } from './reading/read-request.js';
import { phraseWords } from './reading/text.js';
import { COUNTING, rankMetrics } from './reading/metric-ranking.js';

export { fullWindow } from './reading/answers.js';

export const PROMPT_TOPICS = ['dataset', 'metrics', 'values', 'audience', 'deadline', 'grain', 'window', 'dimensions'] as const;
export type PromptTopic = (typeof PROMPT_TOPICS)[number];

export interface PromptOption {
  value: string;
  label: string;
}

export interface Prompt {
  topic: PromptTopic;
  question: string;
  options: PromptOption[];
  recommended: PromptOption & { reason: string };
  /** More than one option may be chosen (comma separated when typed). */
  many: boolean;
}

export interface PromptContext {
  dataset: DatasetConfig;
  coverage: Coverage;
  /** What the reader knows of the data (catalog, coverage, values). */
  facts: DatasetFacts;
  now: Date;
  locale: string;
}

/**
 * The one thing that must be asked before the brief card, or null. Only what has no safe default
 * is asked: no measure at all, a measure the catalog lacks, a word matching several values.
 * Audience, deadline, grain, period and breakdowns are defaulted on the card (bot/brief-defaults.ts).
 */
export function nextPrompt(brief: Brief, ctx: PromptContext): Prompt | null {
  const noMeasure = brief.questions.length === 0 || brief.questions.every((q) => q.metrics.length === 0 && !q.frequency);
  if (brief.unknownTerms.some((u) => u.role === 'metric') || noMeasure) return metricsPrompt(brief, ctx);
  if ((brief.ambiguousValues ?? []).length > 0) return valuesPrompt(brief, ctx);
  if ((brief.toAsk ?? []).includes('window')) return windowPrompt(brief, ctx);
  if (unplacedBreakdown(brief)) return dimensionsPrompt(brief, ctx);
  return null;
}

/**
 * A breakdown word the catalog does not have ("by studio"), in a request whose change would
 * otherwise be explained by the catalog's first breakdown: asked, never put in its place.
 */
export function unplacedBreakdown(brief: Brief): UnknownTerm | undefined {
  if (brief.dimensionsAsked) return undefined;
  const open = brief.questions.some((q) => q.kind === 'growth' && q.dimensions.length === 0 && !q.contrast);
  return open ? brief.unknownTerms.find((u) => u.role === 'dimension') : undefined;
}

function dimensionsPrompt(brief: Brief, ctx: PromptContext): Prompt {
  const term = unplacedBreakdown(brief)!;
  const dims = ctx.dataset.dimensions.filter((d) => !d.personal_data);
  const options: PromptOption[] = [...dims.map((d) => ({ value: d.name, label: d.label })), NO_BREAKDOWN];
  // The closest is recommended only when it is the word asked, mistyped ("genra" for Genre); a
  // breakdown merely near in spelling answers another question.
  const asked = phraseWords(term.text);
  const kin = term.closest.map((name) => dims.find((d) => d.name === name)).find((d) => d && [d.name.replaceAll('_', ' '), d.label, ...d.synonyms].flatMap((n) => phraseWords(n)).some((w) => asked.some((a) => a.length >= 4 && w.length >= 4 && distance(a, w) <= 1)));
  const near = term.closest.map((name) => dims.find((d) => d.name === name)?.label).filter((l): l is string => !!l);
  return {
    topic: 'dimensions',
    question: `I found no breakdown called "${term.text}" in ${ctx.dataset.label}${near.length > 0 ? `; the closest I have: ${near.join(', ')}` : ''}. Which should explain the change?`,
    options,
    recommended: kin
      ? { value: kin.name, label: kin.label, reason: `closest match to "${term.text}"` }
      : { ...NO_BREAKDOWN, reason: `nothing in ${ctx.dataset.label} is a breakdown by "${term.text}"` },
    many: true,
  };
}

const NO_BREAKDOWN: PromptOption = { value: 'none', label: 'No breakdown' };

/**
 * A period named outside the data ("sales in 2031"): the data's range said, and periods inside it
 * offered, the whole of it recommended. Nothing runs on another period unasked.
 */
function windowPrompt(brief: Brief, ctx: PromptContext): Prompt {
  const full = fullWindow(ctx.coverage)!;
  const last = addDays(full.end, -1);
  // Said in the data's own stamps: yearly data "2001 to 2017", daily data "1 Jan 2001 to 31 Dec 2017".
  const range = shortWindow(full, ctx.coverage.stamps, ctx.locale);
  const all: PromptOption = { value: 'all', label: `All the data (${range})` };
  const options: PromptOption[] = [all];
  // The last full calendar year in the data, and the data's last 12 months, as periods named outright.
  // (The window's end is the day after the data's last: the year before it is the last full one.)
  const year = Number(full.end.slice(0, 4)) - 1;
  if (`${year}-01-01` >= full.start) options.push({ value: String(year), label: String(year) });
  const twelveStart = addMonths(periodStart(full.end, 'month'), -12);
  // On data stamped yearly the last 12 months are the last year, already offered.
  if (twelveStart > full.start && twelveStart !== `${year}-01-01`) {
    const lastMonth = addMonths(periodStart(full.end, 'month'), -1);
    options.push({ value: `${twelveStart.slice(0, 7)} to ${lastMonth.slice(0, 7)}`, label: `The last 12 full months of the data (${formatPeriod(twelveStart, 'month', ctx.locale)} to ${formatPeriod(lastMonth, 'month', ctx.locale)})` });
  }
  const outside = (brief.saidBack ?? []).filter(isOutsideDataNote);
  // "in the recession": an event the data holds no dates for, asked by name; its dates are the answer.
  const event = !brief.window ? brief.undatedEvents?.[0] : undefined;
  if (event && outside.length === 0) return eventPrompt(event, brief, options, range, ctx);
  const question = `${outside.length > 0 ? `${outside.join(' ')} ` : ''}Which period should I use instead? Choose one, or name a period inside the data.`;
  // "this year vs last year" after data that ended years ago: the same periods counted back from
  // the data's end, as the card says relative periods are, recommended first.
  const instead = brief.latestInstead;
  if (instead) {
    // A season is said and typed by its name and label year ("summer 2015"; a northern winter by its January's year).
    const seasonWords = (w: DateWindow) => {
      const s = seasonOf(w.start, ctx.dataset.hemisphere ?? 'north');
      return `${s.season} ${s.year}`;
    };
    const said = (w: DateWindow) => (instead.unit === 'season' ? seasonWords(w) : formatPeriod(w.start, instead.unit, ctx.locale));
    const unitWord = instead.unit === 'season' ? seasonWords(instead.window).split(' ')[0]! : instead.unit;
    const typed = (w: DateWindow) => (instead.unit === 'season' ? seasonWords(w) : instead.unit === 'year' ? w.start.slice(0, 4) : instead.unit === 'quarter' ? `Q${Math.floor(Number(w.start.slice(5, 7)) / 3) + 1} ${w.start.slice(0, 4)}` : w.start.slice(0, 7));
    const latest: PromptOption = {
      value: instead.compareWindow ? `${typed(instead.window)} vs ${typed(instead.compareWindow)}` : typed(instead.window),
      label: instead.compareWindow
        ? `${capitalise(said(instead.window))} against ${said(instead.compareWindow)} (the data's latest ${unitWord} and the one before)`
        : `${capitalise(said(instead.window))} (the data's latest ${unitWord})`,
    };
    const rest = options.filter((o) => o.value !== latest.value);
    return {
      topic: 'window',
      question,
      options: [latest, ...rest],
      recommended: { ...latest, reason: `the data ends in ${formatPeriod(last, instead.unit === 'season' ? 'month' : instead.unit, ctx.locale)}, and periods like "this ${unitWord}" count back from there` },
      many: false,
    };
  }
  return {
    topic: 'window',
    question,
    options,
    recommended: { ...all, reason: `the data runs from ${range}` },
    many: false,
  };
}

/**
 * The dates of an event the data cannot date ("the recession"). Beside a period it is compared
 * with ("vs 2007"), the recommended answer is the stretch after that period to the data's end
 * (what "since then" would be); otherwise all the data. Either way the card says what was used.
 */
function eventPrompt(event: string, brief: Brief, options: PromptOption[], range: string, ctx: PromptContext): Prompt {
  const full = fullWindow(ctx.coverage)!;
  const compare = brief.compareWindow;
  const after = compare && compare.end < full.end ? { start: compare.end, end: full.end } : null;
  const monthOf = (iso: string) => iso.slice(0, 7);
  const afterOption = after ? { value: `${monthOf(after.start)} to ${monthOf(addDays(after.end, -1))}`, label: `After the period compared: ${shortWindow(after, ctx.coverage.stamps, ctx.locale)}` } : null;
  const all = options[0]!;
  return {
    topic: 'window',
    question: `I can't tell the dates of "${event}" from the data: nothing in ${ctx.dataset.label} says when it was. Which dates should it cover? Type them ("Dec 2007 to Jun 2009", "2008-03 to 2009-06"), or choose one.`,
    options: afterOption ? [afterOption, ...options] : options,
    recommended: afterOption
      ? { ...afterOption, reason: `"${event}" is set against ${describeWindowShort(compare!, ctx)}, so the stretch after it, to the data's end, stands in for it until you give its dates` }
      : { ...all, reason: `the data runs from ${range}; "${event}" has no dates in it` },
    many: false,
  };
}

function describeWindowShort(w: DateWindow, ctx: PromptContext): string {
  return shortWindow(w, ctx.coverage.stamps, ctx.locale);
}

/** Questions that still need a metric (frequency questions count the group's own unit). */
export function questionsWithoutMetric(brief: Brief) {
  return brief.questions.filter((q) => q.metrics.length === 0 && !q.frequency);
}


/** A word that matches several values: which was meant, with the candidates as options. */
function valuesPrompt(brief: Brief, ctx: PromptContext): Prompt {
  const a = brief.ambiguousValues![0]!;
  const label = (c: { dimension: string; value: string }) => {
    const dim = ctx.dataset.dimensions.find((d) => d.name === c.dimension)?.label ?? c.dimension;
    return `${c.value} (${dim.toLowerCase()})`;
  };
  const options = a.candidates.map((c) => ({ value: JSON.stringify(c), label: label(c) }));
  return {
    topic: 'values',
    question: `"${a.text}" matches more than one value in the data. Which did you mean?`,
    options,
    recommended: { ...options[0]!, reason: 'the most common of them in the data' },
    many: true,
  };
}

/**
 * Which dataset a request is about, when the channel may use several and the request's words do
 * not settle it. `ranked` is best first; the first is recommended.
 */
export function datasetPrompt(ranked: readonly DatasetConfig[], matched: boolean): Prompt {
  const first = ranked[0]!;
  return {
    topic: 'dataset',
    question: 'This channel may use several datasets. Which one is the request about?',
    options: ranked.map((d) => ({ value: d.name, label: d.label })),
    recommended: {
      value: first.name,
      label: first.label,
      reason: matched ? 'its catalog has the most of the terms in your request' : 'the first dataset this channel may use',
    },
    many: false,
  };
}

/** A typed or clicked answer to the dataset prompt: a dataset's name or label (or "ok" for the recommendation). */
export function readDatasetAnswer(prompt: Prompt, text: string): { ok: true; dataset: string } | { ok: false; message: string } {
  const typed = ACCEPT_DEFAULT.test(text) ? prompt.recommended.value : text.trim();
  const words = normaliseWords(typed).join(' ');
  const hit =
    prompt.options.find((o) => o.value === typed) ??
    prompt.options.find((o) => normaliseWords(o.label).join(' ') === words || normaliseWords(o.value).join(' ') === words) ??
    prompt.options.find((o) => words.length > 0 && normaliseWords(o.label).join(' ').includes(words));
  if (!hit) return { ok: false, message: `I couldn't match "${clip(typed)}" to a dataset. Choose one of: ${prompt.options.map((o) => o.label).join(', ')}.` };
  return { ok: true, dataset: hit.value };
}

/** The refusal for personal-data dimensions a request or an answer names: the rule, not silence. */
export function personalDataRefusal(ds: DatasetConfig, names: readonly string[]): string {
  const labels = names.map((n) => ds.dimensions.find((d) => d.name === n)?.label ?? n);
  const what = labels.length === 1 ? labels[0]! : `${labels.slice(0, -1).join(', ')} and ${labels[labels.length - 1]!}`;
  return `I can't break anything down by, filter on or show ${what}: the catalog marks ${labels.length === 1 ? 'it' : 'them'} as personal data, and personal data is never grouped by, filtered on or shown in any answer, table or SQL.`;
}


/**
 * The one-click choice when nothing in the data measures what was asked: stopping, not a stand-in
 * (a row count is no answer to "trading volume"). Sent as "cancel", read as the cancel command.
 */
export const STOP_HERE: PromptOption = { value: 'cancel', label: 'Stop here' };
/** The same, when the request also names measures the data has: go on with those alone. */
const LEAVE_OUT: PromptOption = { value: 'leave it out', label: 'Leave it out' };
const LEAVES_OUT = /^\s*(?:leave\s+it\s+out|leave\s+out|skip(?:\s+it)?|without\s+it|none|drop\s+it)\s*[.!]?\s*$/i;

function metricsPrompt(brief: Brief, ctx: PromptContext): Prompt {
  const ds = ctx.dataset;
  const unknown = brief.unknownTerms.find((u) => u.role === 'metric');
  const label = (name: string) => ds.metrics.find((m) => m.name === name)?.label ?? name;
  const options = ds.metrics.map((m) => ({ value: m.name, label: m.label }));
  if (unknown?.several) {
    // A word the data could measure several ways (a bare "volume", "gross" of US and Worldwide
    // Gross): those ways first, none taken unasked; the request's other words recommend one.
    const counts = unknown.closest.every((name) => { const m = ds.metrics.find((x) => x.name === name); return m?.definition.type === 'count' || (m?.definition.type === 'sum' && m.unit === 'count'); });
    // Counts keep the catalog's order (the first count recommended); measures go by the ranking.
    const ranked = counts ? unknown.closest.map((name) => ({ name, reason: '' })) : rankMetrics(ds, brief.requestText, unknown.text, unknown.closest);
    const ways = ranked.map((r) => ({ value: r.name, label: label(r.name) }));
    const what = ways.map((w) => (counts ? inSentence(w.label) : w.label));
    return {
      topic: 'metrics',
      question: `"${unknown.text}" could be ${counts ? 'counted' : 'measured'} as ${what.slice(0, -1).join(', ')} or ${what[what.length - 1]} in ${ds.label}. Which did you mean?`,
      options: [...ways, ...options.filter((o) => !unknown.closest.includes(o.value))],
      recommended: { ...ways[0]!, reason: ranked[0]!.reason.startsWith('closest match') ? ranked[0]!.reason.replace(/^closest match to "[^"]*", and /, '') : counts ? 'the first count of this dataset' : 'the first of them in the catalog' },
      many: true,
    };
  }
  if (unknown) {
    // A measure is recommended only when it answers the words asked: it shares a word with them
    // ("generation" -> Net generation), or money words ask for an amount ("money" -> a gross);
    // otherwise nothing in the data stands in for it.
    const ranked = rankMetrics(ds, brief.requestText, unknown.text);
    const fit = ranked.find((r) => r.fits);
    const closest = ranked.filter((r) => r.fits).concat(ranked.filter((r) => !r.fits)).slice(0, 3).map((r) => r.name);
    const nearest = closest.length > 0 ? ` The closest I can measure: ${closest.map(label).join(', ')}.` : '';
    return {
      topic: 'metrics',
      question: `I don't have a metric called "${unknown.text}": nothing in ${ds.label} measures it.${nearest} Choose one only if it answers your question instead, or stop here.`,
      options,
      recommended: fit
        ? { value: fit.name, label: label(fit.name), reason: fit.reason }
        : questionsWithoutMetric(brief).length === 0 && brief.questions.length > 0
          ? { ...LEAVE_OUT, reason: `the data has no measure of "${unknown.text}"; the rest of the request can be answered without it` }
          : { ...STOP_HERE, reason: `the data has no measure of "${unknown.text}", and none of these is one` },
      many: true,
    };
  }
  const first = rankMetrics(ds, brief.requestText)[0]!;
  const missing = questionsWithoutMetric(brief)[0];
  return {
    topic: 'metrics',
    question: missing ? `Which metric should I use for "${clip(missing.text)}"?` : 'Which metric should I look at?',
    options,
    recommended: { value: first.name, label: label(first.name), reason: first.reason },
    many: true,
  };
}



export function recommendedGrain(coverage: Coverage): { grain: Grain; reason: string } {
  const finest = finestGrain(coverage.stamps);
  const byLength = recommendedByLength(coverage);
  // Data stamped once a quarter is shown quarterly however short it is.
  return isFinerGrain(byLength.grain, finest) ? { grain: finest, reason: `the data is stamped ${coverage.stamps}` } : byLength;
}

function recommendedByLength(coverage: Coverage): { grain: Grain; reason: string } {
  if (!coverage.firstDate || !coverage.lastDate) return { grain: 'month', reason: 'the usual grain for a business review' };
  const days = (Date.parse(coverage.lastDate) - Date.parse(coverage.firstDate)) / 86_400_000;
  if (days > 366) return { grain: 'month', reason: 'the data spans more than a year, so months show the pattern without daily noise' };
  if (days > 90) return { grain: 'week', reason: 'the data spans a few months, so weeks give enough points' };
  return { grain: 'day', reason: 'the data spans under three months' };
}


const GRAIN_LABEL = Object.fromEntries(GRAINS.map((g) => [g, capitalise(GRAIN_WORDS[g].adjective)])) as Record<Grain, string>;

function capitalise(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}


/** A reading of an answer; a refused one names the personal-data dimensions it asked for, for the audit log. */
export type AnswerReading = { ok: true; brief: Brief; /** The answer takes the recommendation to stop (STOP_HERE): the request ends here. */ stop?: true } | { ok: false; message: string; personal?: string[] };

/** Reads a typed (or clicked) answer to `prompt` into the brief, or explains what was wrong. */
export function readAnswer(prompt: Prompt, text: string, brief: Brief, ctx: PromptContext): AnswerReading {
  const read = readAnswerInto(prompt, text, brief, ctx);
  // What an answer set is marked as answered, so the card does not credit it to the request.
  const slot = ANSWERED_SLOT[prompt.topic];
  // Leaving out a measure the data lacks sets none: what the request named stays credited to it.
  if (!read.ok || !slot || read.brief === brief || (prompt.topic === 'metrics' && LEAVES_OUT.test(text))) return read;
  return { ok: true, brief: { ...read.brief, evidence: { ...(read.brief.evidence ?? {}), [slot]: { words: text.trim(), how: 'answered' as const } } } };
}

const ANSWERED_SLOT: Partial<Record<Prompt['topic'], BriefSlot>> = { metrics: 'metrics', audience: 'audience', deadline: 'deadline', grain: 'grain', window: 'window', values: 'filters', dimensions: 'dimensions' };

function readAnswerInto(prompt: Prompt, text: string, brief: Brief, ctx: PromptContext): AnswerReading {
  const typed = ACCEPT_DEFAULT.test(text) ? prompt.recommended.value : text.trim();
  const facts = ctx.facts;
  switch (prompt.topic) {
    case 'metrics': {
      if (typed === STOP_HERE.value && prompt.recommended.value === STOP_HERE.value) return { ok: true, brief, stop: true };
      if (LEAVES_OUT.test(typed) && questionsWithoutMetric(brief).length === 0 && brief.questions.length > 0) {
        return { ok: true, brief: { ...brief, unknownTerms: brief.unknownTerms.filter((u) => u.role !== 'metric'), toAsk: (brief.toAsk ?? []).filter((t) => t !== 'metrics') } };
      }
      const named = ctx.dataset.metrics.filter((m) => typed.split(/\s*,\s*/).includes(m.name)).map((m) => m.name);
      const found = named.length > 0 ? named : readRequest(typed, facts, { now: ctx.now }).metrics;
      if (found.length === 0) {
        return { ok: false, message: `I couldn't match "${clip(typed)}" to a metric. I can measure: ${ctx.dataset.metrics.map((m) => m.label).join(', ')}.` };
      }
      // The answer wins over words read before it: the question that holds the word asked about
      // takes the measure chosen, and a row count read from its noun ("films") goes unless it counts.
      const asked = brief.unknownTerms.find((u) => u.role === 'metric')?.text.toLowerCase();
      const rows = rowCountMetric(ctx.dataset)?.name;
      const questions: Question[] = brief.questions.length > 0
        ? brief.questions.map((q) => {
          if (q.metrics.length === 0 && !q.frequency) return { ...q, metrics: found };
          if (!asked || !q.text.toLowerCase().includes(asked)) return q;
          const kept = q.metrics.filter((m) => m !== rows || COUNTING.test(q.text));
          return { ...q, metrics: [...new Set([...found, ...kept])] };
        })
        : [wholeRequestQuestion(brief, found)];
      const unknownTerms = brief.unknownTerms.filter((u) => u.role !== 'metric');
      return { ok: true, brief: { ...brief, questions, metrics: [...new Set(questions.flatMap((q) => q.metrics))], unknownTerms, toAsk: (brief.toAsk ?? []).filter((t) => t !== 'metrics') } };
    }
    case 'audience': {
      const a = audienceNamedBy(typed);
      if (!a) return { ok: false, message: `Please choose one of: leadership, managers, analysts.` };
      return { ok: true, brief: { ...brief, audience: a } };
    }
    case 'deadline': {
      const d = readDeadlineAnswer(typed, ctx.now, ctx.dataset.timezone);
      if (!d.ok) return d;
      const { deadlineAsap: _before, ...rest } = brief;
      return { ok: true, brief: { ...rest, deadline: d.value, ...(saysAsap(typed) ? { deadlineAsap: true as const } : {}) } };
    }
    case 'grain': {
      const g = grainNamedBy(typed);
      if (!g) return { ok: false, message: `Please choose a grain: ${GRAINS.join(', ')}.` };
      return { ok: true, brief: { ...brief, grain: g } };
    }
    case 'window': {
      const w = readWindowAnswer(typed, facts, ctx.now);
      if (!w.ok) return w;
      // The period chosen is every question's that lost its own to a period outside the data.
      const questions = brief.questions.map((q) => (q.window ? q : { ...q, window: w.value.window, ...(w.value.compareWindow ? { compareWindow: w.value.compareWindow } : {}) }));
      // The periods outside the data were said in the question just answered; the card shows the answer instead.
      const saidBack = (brief.saidBack ?? []).filter((l) => !isOutsideDataNote(l));
      // "the recession" answered with its dates: the card says which dates stand for it.
      if (!brief.window && brief.undatedEvents?.length) saidBack.push(`"${brief.undatedEvents[0]}" read as ${shortWindow(w.value.window, ctx.coverage.stamps, ctx.locale)}, the period given in reply: the data holds no dates for it.`);
      return { ok: true, brief: { ...brief, questions, window: w.value.window, ...(w.value.compareWindow ? { compareWindow: w.value.compareWindow } : {}), saidBack, toAsk: (brief.toAsk ?? []).filter((t) => t !== 'window') } };
    }
    case 'dataset': {
      // The bot reads this one itself (readDatasetAnswer): the brief waits for the dataset.
      return { ok: false, message: `Choose one of: ${prompt.options.map((o) => o.label).join(', ')}.` };
    }
    case 'values': {
      const ambiguous = brief.ambiguousValues?.[0];
      if (!ambiguous) return { ok: true, brief };
      const chosen = prompt.options.filter((o) => typed.split(/\s*,\s*/).includes(o.value) || o.value === typed || normaliseWords(o.label).join(' ') === normaliseWords(typed).join(' '));
      const byWords = chosen.length > 0 ? chosen : prompt.options.filter((o) => normaliseWords(typed).some((w) => w.length > 3 && normaliseWords(o.label).includes(w)));
      if (byWords.length === 0) return { ok: false, message: `Choose one of: ${prompt.options.map((o) => o.label).join(', ')}.` };
      const picks = byWords.map((o) => JSON.parse(o.value) as { dimension: string; value: string });
      const asked = brief.questions.length > 0 ? brief.questions : [wholeRequestQuestion(brief)];
      const questions = asked.map((q, i) => (i === 0 ? withVersus({ ...q, filters: addValues(q.filters, picks) }, ambiguous, picks) : q));
      // "What share of flights does ATL have" answered "origin": ATL is the share's focus, not a filter.
      const shareNotes = [...focusShares(questions, ctx.dataset), ...anchorToOwnStart(questions, facts)];
      const saidBack = shareNotes.length > 0 ? { saidBack: [...(brief.saidBack ?? []), ...shareNotes] } : {};
      const rest = (brief.ambiguousValues ?? []).slice(1);
      const anchored = questions.find((q) => q.ownStart && q.window);
      return { ok: true, brief: { ...brief, questions, ...saidBack, ...(anchored && !brief.window ? { window: anchored.window } : {}), ambiguousValues: rest, toAsk: rest.length > 0 ? brief.toAsk ?? [] : (brief.toAsk ?? []).filter((t) => t !== 'values') } };
    }
    case 'dimensions': {
      if (/^\s*(?:none|no|no breakdown|nothing)\s*[.!]?\s*$/i.test(typed)) return { ok: true, brief: { ...brief, dimensions: [], dimensionsAsked: true } };
      const read = readRequest(`by ${typed}`, facts, { now: ctx.now });
      if ((read.personalData ?? []).length > 0) return { ok: false, message: personalDataRefusal(ctx.dataset, read.personalData!), personal: read.personalData! };
      const named = ctx.dataset.dimensions.filter((d) => !d.personal_data && typed.split(/\s*,\s*/).includes(d.name)).map((d) => d.name);
      const found = named.length > 0 ? named : read.dimensions;
      if (found.length === 0) {
        const offered = ctx.dataset.dimensions.filter((d) => !d.personal_data).map((d) => d.label);
        return { ok: false, message: `I couldn't match "${clip(typed)}" to a breakdown. I can break down by: ${offered.join(', ')}.` };
      }
      return { ok: true, brief: { ...brief, dimensions: found, dimensionsAsked: true, unknownTerms: brief.unknownTerms.filter((u) => u.role !== 'dimension'), toAsk: (brief.toAsk ?? []).filter((t) => t !== 'dimensions') } };
    }
  }
}

/**
 * A value asked about that was named against another ("Serie A vs Bundesliga", "Barcelona vs Real
 * Madrid"): once the breakdown's filter holds both, they are compared side by side (the question's
 * contrast) rather than read as one filter of either.
 */
function withVersus(q: Question, ambiguous: AmbiguousValue, picks: { dimension: string; value: string }[]): Question {
  if (!ambiguous.versus || q.contrast) return q;
  const f = q.filters.find((x) => !x.exclude && picks.some((p) => p.dimension === x.dimension) && x.values.length >= 2);
  return f ? { ...q, contrast: { dimension: f.dimension, values: f.values.map(String) } } : q;
}

function addValues(filters: SegmentFilter[], picks: { dimension: string; value: string }[]): SegmentFilter[] {
  const out = filters.map((f) => ({ ...f, values: [...f.values] }));
  for (const p of picks) {
    const f = out.find((x) => x.dimension === p.dimension && !x.exclude);
    if (f) {
      if (!f.values.includes(p.value)) f.values.push(p.value);
    } else out.push({ dimension: p.dimension, values: [p.value] });
  }
  return out;
}

function normaliseWords(text: string): string[] {
  return phraseWords(text);
}

function clip(s: string): string {
  return s.length > 60 ? `${s.slice(0, 57)}...` : s;
}
