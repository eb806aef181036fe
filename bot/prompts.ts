// Clarifying prompts: what to ask next, with a recommended default and its reason, and how to
// read a typed (or clicked) answer. A prompt is never asked when the brief already holds it.
import type { DatasetConfig } from '../config/schema.js';
import type { Coverage } from '../analysis/coverage.js';
import { formatPeriod } from '../analysis/format.js';
import { addDays, addMonths, nextPeriod, periodStart } from '../analysis/periods.js';
import { GRAINS, type DateWindow, type Grain } from '../analysis/types.js';
import { AUDIENCES, type Audience, type Brief } from './brief.js';
import { catalogTerms, isValidIsoDate, readDeadlineAnswer } from './intake.js';
import { readPeriodPhrase } from './period-phrases.js';
import { findTerms, normaliseWords } from './term-match.js';

export const PROMPT_TOPICS = ['dataset', 'metrics', 'audience', 'deadline', 'grain', 'window', 'dimensions'] as const;
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
  now: Date;
  locale: string;
}

/** The next thing to ask, or null when the brief is complete enough to propose a plan. */
export function nextPrompt(brief: Brief, ctx: PromptContext): Prompt | null {
  if (brief.unknownTerms.length > 0 || brief.questions.length === 0 || questionsWithoutMetric(brief).length > 0) return metricsPrompt(brief, ctx);
  if (!brief.audience) return audiencePrompt();
  if (!brief.deadline) return deadlinePrompt(ctx);
  if (!brief.grain) return grainPrompt(ctx);
  if (!brief.window && needsWindow(brief, ctx)) return windowPrompt(brief, ctx);
  if (brief.dimensions.length === 0 && brief.questions.some((q) => q.kind === 'growth' && q.dimensions.length === 0) && !brief.dimensionsAsked) {
    return dimensionsPrompt(ctx);
  }
  return null;
}

/** Questions that still need a metric (frequency questions count the group's own unit). */
export function questionsWithoutMetric(brief: Brief) {
  return brief.questions.filter((q) => q.metrics.length === 0 && !q.frequency);
}

/** A window is asked only for questions whose text names no period of its own. */
function needsWindow(brief: Brief, ctx: PromptContext): boolean {
  return brief.questions.some((q) => {
    const launch = ctx.dataset.comparison_groups.find((g) => g.name === q.comparisonGroup)?.launch_date;
    return !readPeriodPhrase(q.text, ctx.coverage, launch);
  });
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

function dimensionsPrompt(ctx: PromptContext): Prompt {
  const dims = ctx.dataset.dimensions.filter((d) => !d.personal_data && !ctx.dataset.comparison_groups.some((g) => g.column === d.column));
  const first = dims[0];
  return {
    topic: 'dimensions',
    question: 'Which breakdown should explain the change?',
    options: [...dims.map((d) => ({ value: d.name, label: d.label })), { value: 'none', label: 'No breakdown' }],
    recommended: first
      ? { value: first.name, label: first.label, reason: 'the first breakdown in the catalog' }
      : { value: 'none', label: 'No breakdown', reason: 'the dataset has no dimensions' },
    many: true,
  };
}

function metricsPrompt(brief: Brief, ctx: PromptContext): Prompt {
  const ds = ctx.dataset;
  const unknown = brief.unknownTerms[0];
  const suggested = unknown?.closest[0] ?? ds.metrics[0]!.name;
  const label = (name: string) => ds.metrics.find((m) => m.name === name)?.label ?? name;
  const missing = questionsWithoutMetric(brief)[0];
  const question = unknown
    ? `I don't have a metric called "${unknown.text}". The closest I can measure: ${unknown.closest.map(label).join(', ')}. Which metric should I use?`
    : missing
      ? `Which metric should I use for "${clip(missing.text)}"?`
      : 'Which metric should I look at?';
  return {
    topic: 'metrics',
    question,
    options: ds.metrics.map((m) => ({ value: m.name, label: m.label })),
    recommended: {
      value: suggested,
      label: label(suggested),
      reason: unknown ? `closest match to "${unknown.text}"` : 'the headline metric of this dataset',
    },
    many: true,
  };
}

function audiencePrompt(): Prompt {
  return {
    topic: 'audience',
    question: 'Who will read this?',
    options: [
      { value: 'leadership', label: 'Leadership (plain words, headline first)' },
      { value: 'managers', label: 'Managers (plain words with the detail)' },
      { value: 'analysts', label: 'Analysts (tests, p-values and intervals)' },
    ],
    recommended: { value: 'managers', label: 'Managers', reason: 'plain words with enough detail to act on' },
    many: false,
  };
}

function deadlinePrompt(ctx: PromptContext): Prompt {
  const inAWeek = addDays(ctx.now.toISOString().slice(0, 10), 7);
  return {
    topic: 'deadline',
    question: 'When do you need it by?',
    options: [
      { value: 'asap', label: 'As soon as possible' },
      { value: inAWeek, label: 'Within a week' },
      { value: 'none', label: 'No deadline' },
    ],
    recommended: { value: 'asap', label: 'As soon as possible', reason: 'the run takes a minute or two once the plan is agreed' },
    many: false,
  };
}

export function recommendedGrain(coverage: Coverage): { grain: Grain; reason: string } {
  if (!coverage.firstDate || !coverage.lastDate) return { grain: 'month', reason: 'the usual grain for a business review' };
  const days = (Date.parse(coverage.lastDate) - Date.parse(coverage.firstDate)) / 86_400_000;
  if (days > 366) return { grain: 'month', reason: 'the data spans more than a year, so months show the pattern without daily noise' };
  if (days > 90) return { grain: 'week', reason: 'the data spans a few months, so weeks give enough points' };
  return { grain: 'day', reason: 'the data spans under three months' };
}

function grainPrompt(ctx: PromptContext): Prompt {
  const rec = recommendedGrain(ctx.coverage);
  return {
    topic: 'grain',
    question: 'At what time grain?',
    options: GRAINS.map((g) => ({ value: g, label: GRAIN_LABEL[g] })),
    recommended: { value: rec.grain, label: GRAIN_LABEL[rec.grain], reason: rec.reason },
    many: false,
  };
}

const GRAIN_LABEL: Record<Grain, string> = { day: 'Daily', week: 'Weekly', month: 'Monthly', quarter: 'Quarterly', year: 'Yearly' };

/** All the data there is: its first day to the day after its last. */
export function fullWindow(coverage: Coverage): DateWindow | null {
  if (!coverage.firstDate || !coverage.lastDate) return null;
  return { start: coverage.firstDate, end: addDays(coverage.lastDate, 1) };
}

function windowPrompt(brief: Brief, ctx: PromptContext): Prompt {
  const full = fullWindow(ctx.coverage);
  const grain = brief.grain ?? 'month';
  const describe = (w: DateWindow) =>
    `${formatPeriod(w.start, 'month', ctx.locale, 'long')} to ${formatPeriod(addDays(w.end, -1), 'month', ctx.locale, 'long')}`;
  const fullLabel = full ? `All available data (${describe(full)})` : 'All available data';
  const options: PromptOption[] = [{ value: 'all', label: fullLabel }];
  if (ctx.coverage.lastDate) {
    const end = periodStart(addDays(ctx.coverage.lastDate, 1), 'month');
    options.push({ value: 'last 12 months', label: `The last 12 full months (to ${formatPeriod(addMonths(end, -1), 'month', ctx.locale, 'long')})` });
    options.push({ value: 'last 24 months', label: 'The last 24 full months' });
  }
  return {
    topic: 'window',
    question: 'Over what period?',
    options,
    recommended: {
      value: 'all',
      label: fullLabel,
      reason: `the whole history shows the ${GRAIN_LABEL[grain].toLowerCase()} pattern best; a partial last period is marked and kept out of the highs and lows`,
    },
    many: false,
  };
}

export type AnswerReading = { ok: true; brief: Brief } | { ok: false; message: string };

const ACCEPT_DEFAULT = /^\s*(|ok|okay|yes|y|sure|fine|default|recommended|go with (that|the default|your suggestion)|sounds good|whatever you (think|recommend))\s*[.!]?\s*$/i;

/** Reads a typed or clicked answer to `prompt` into the brief, or explains what was wrong. */
export function readAnswer(prompt: Prompt, text: string, brief: Brief, ctx: PromptContext): AnswerReading {
  const typed = ACCEPT_DEFAULT.test(text) ? prompt.recommended.value : text.trim();
  switch (prompt.topic) {
    case 'metrics': {
      const terms = catalogTerms(ctx.dataset).filter((t) => t.kind === 'metric');
      const exact = ctx.dataset.metrics.filter((m) => typed.split(/\s*,\s*/).includes(m.name)).map((m) => m.name);
      const found = exact.length > 0 ? exact : [...new Set(findTerms(typed, terms).map((h) => h.term.name))];
      if (found.length === 0) {
        return { ok: false, message: `I couldn't match "${clip(typed)}" to a metric. I can measure: ${ctx.dataset.metrics.map((m) => m.label).join(', ')}.` };
      }
      const questions = brief.questions.length > 0
        ? brief.questions.map((q) => (q.metrics.length === 0 && !q.frequency ? { ...q, metrics: found } : q))
        : [{ text: brief.requestText, kind: brief.kinds[0] ?? 'trend', metrics: found, dimensions: brief.dimensions, frequency: false }];
      return { ok: true, brief: { ...brief, questions, metrics: [...new Set([...brief.metrics, ...found])], unknownTerms: [] } };
    }
    case 'audience': {
      const a = AUDIENCES.find((x) => new RegExp(`\\b${x.slice(0, -1)}`, 'i').test(typed)) ?? audienceFromWords(typed);
      if (!a) return { ok: false, message: `Please choose one of: leadership, managers, analysts.` };
      return { ok: true, brief: { ...brief, audience: a } };
    }
    case 'deadline': {
      if (/^\s*(none|no deadline|no rush|whenever|n\/a)\s*$/i.test(typed)) return { ok: true, brief: { ...brief, deadline: 'none' } };
      if (/^\d{4}-\d{2}-\d{2}$/.test(typed) && !isValidIsoDate(typed)) return { ok: false, message: `${typed} is not a real date. Try a date like 2026-12-15, "Friday" or "asap".` };
      const d = readDeadlineAnswer(typed, { now: ctx.now, timeZone: ctx.dataset.timezone });
      if (!d) return { ok: false, message: `I couldn't read "${clip(typed)}" as a date. Try a date like 2026-12-15, "next Friday", "asap" or "none".` };
      return { ok: true, brief: { ...brief, deadline: d } };
    }
    case 'grain': {
      const words: Record<Grain, RegExp> = {
        day: /\b(days?|daily)\b/i,
        week: /\b(weeks?|weekly)\b/i,
        month: /\b(months?|monthly)\b/i,
        quarter: /\b(quarters?|quarterly|q)\b/i,
        year: /\b(years?|yearly|annual(ly)?)\b/i,
      };
      const g = GRAINS.find((x) => words[x].test(typed));
      if (!g) return { ok: false, message: `Please choose a grain: ${GRAINS.join(', ')}.` };
      return { ok: true, brief: { ...brief, grain: g } };
    }
    case 'window': {
      const w = readWindow(typed, ctx.coverage);
      if ('error' in w) return { ok: false, message: w.error };
      return { ok: true, brief: { ...brief, window: w.window } };
    }
    case 'dataset': {
      // The bot reads this one itself (readDatasetAnswer): the brief waits for the dataset.
      return { ok: false, message: `Choose one of: ${prompt.options.map((o) => o.label).join(', ')}.` };
    }
    case 'dimensions': {
      const all = catalogTerms(ctx.dataset);
      const hits = findTerms(typed, all.filter((t) => t.kind === 'dimension' || t.kind === 'personal'));
      const personal = [...new Set(hits.filter((h) => h.term.kind === 'personal').map((h) => h.term.name))];
      if (personal.length > 0) return { ok: false, message: personalDataRefusal(ctx.dataset, personal) };
      const terms = all.filter((t) => t.kind === 'dimension');
      const found = [...new Set(hits.filter((h) => h.term.kind === 'dimension').map((h) => h.term.name))];
      if (found.length === 0 && !/^\s*none\s*$/i.test(typed)) {
        return { ok: false, message: `I couldn't match "${clip(typed)}" to a dimension. I can break down by: ${terms.map((t) => t.phrase).join(', ')}.` };
      }
      return { ok: true, brief: { ...brief, dimensions: found, dimensionsAsked: true } };
    }
  }
}

function audienceFromWords(text: string): Audience | undefined {
  if (/\b(exec|board|ceo|senior|leader)/i.test(text)) return 'leadership';
  if (/\b(data|technical|analyst)/i.test(text)) return 'analysts';
  if (/\b(manager|ops|team)/i.test(text)) return 'managers';
  return undefined;
}

/** "all", "2024", "2023-04 to 2024-03", "since 2023-04-01", "last 12 months". */
export function readWindow(text: string, coverage: Coverage): { window: DateWindow } | { error: string } {
  const full = fullWindow(coverage);
  if (!full) return { error: 'The dataset has no rows, so there is no period to choose.' };
  const t = text.trim().toLowerCase();
  if (/^(all|all data|all history|everything|all available data)$/.test(t)) return { window: full };
  const last = /^(?:the\s+)?last\s+(\d{1,3})\s+(?:full\s+)?months?$/.exec(t);
  if (last) {
    const end = periodStart(full.end, 'month');
    return { window: { start: addMonths(end, -Number(last[1])), end } };
  }
  const dates = [...t.matchAll(/\d{4}(?:-\d{1,2}(?:-\d{1,2})?)?/g)].map((m) => m[0]);
  for (const d of dates) {
    const bad = impossibleDate(d);
    if (bad) return { error: bad };
  }
  const startOf = (d: string) => (d.length === 4 ? `${d}-01-01` : d.length <= 7 ? `${pad(d)}-01` : pad(d));
  const endAfter = (d: string): string =>
    d.length === 4 ? `${Number(d) + 1}-01-01` : d.length <= 7 ? nextPeriod(`${pad(d)}-01`, 'month') : addDays(pad(d), 1);
  let window: DateWindow | null = null;
  if (dates.length === 1 && /^since\b|^from\b/.test(t)) window = { start: startOf(dates[0]!), end: full.end };
  else if (dates.length === 1) window = { start: startOf(dates[0]!), end: endAfter(dates[0]!) };
  else if (dates.length === 2) window = { start: startOf(dates[0]!), end: endAfter(dates[1]!) };
  if (!window) return { error: `I couldn't read "${clip(text)}" as a period. Try "all", "2024", "2023-04 to 2024-03", "since 2023-04" or "last 12 months".` };
  if (window.start >= window.end) return { error: `The period ${window.start} to ${window.end} ends before it starts.` };
  if (window.end <= full.start || window.start >= full.end) {
    return { error: `The data covers ${full.start} to ${addDays(full.end, -1)}; the period you asked for has no data. Pick a period inside it.` };
  }
  return { window };
}

function pad(d: string): string {
  return d
    .split('-')
    .map((p, i) => (i === 0 ? p : p.padStart(2, '0')))
    .join('-');
}

function impossibleDate(d: string): string | null {
  const parts = d.split('-').map(Number);
  if (parts[1] !== undefined && (parts[1] < 1 || parts[1] > 12)) return `${d} is not a real date: there is no month ${parts[1]}.`;
  if (parts[2] !== undefined && !isValidIsoDate(pad(d))) return `${d} is not a real date.`;
  return null;
}

function clip(s: string): string {
  return s.length > 60 ? `${s.slice(0, 57)}...` : s;
}
