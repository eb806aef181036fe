// A correction to the brief card, in free words or from a click: "for leadership, weekly, only
// 2024, add channel, drop 3". Read with the same reader as a request (its slots), plus the verbs
// that change a plan ("add", "drop", "no breakdown", "instead"). Clicking a card's control sends
// the same words, so clicking and typing are one path.
import type { DateWindow, Grain, SegmentFilter } from '../../analysis/types.js';
import { isBreakdownDimension } from '../../analysis/catalog.js';
import type { Audience, Brief } from '../brief.js';
import { fullWindow, impossibleDate, readDeadlineAnswer } from './answers.js';
import { AGREE, CANCEL } from './lexicon.js';
import { saysAsap } from './deadline.js';
import { type DatasetFacts, readRequest } from './read-request.js';

export interface Correction {
  agree: boolean;
  cancel: boolean;
  audience?: Audience;
  deadline?: string;
  /** The new deadline was "as soon as possible". */
  deadlineAsap?: true;
  grain?: Grain;
  window?: { window: DateWindow; compareWindow?: DateWindow } | { all: true };
  /** Replace the measures ("use bookings instead"), or add to them ("also passengers"). */
  metrics?: { replace: string[] } | { add: string[] };
  addDimensions: string[];
  removeDimensions: string[];
  /** `null`: no breakdown at all. */
  clearDimensions: boolean;
  filters: SegmentFilter[];
  /** Dimensions whose filter is lifted ("all channels"). */
  clearFilters: string[];
  /** Plan items by number ("drop 3"), or by the words of their line ("drop the seasonality one"). */
  drop: (number | string)[];
  /** Words that were read as none of the above, said back. */
  unread: string[];
  /** Personal-data columns named: refused. */
  personalData: string[];
  /** What was wrong with a date or period, said back. */
  problems: string[];
}

export function emptyCorrection(): Correction {
  return { agree: false, cancel: false, addDimensions: [], removeDimensions: [], clearDimensions: false, filters: [], clearFilters: [], drop: [], unread: [], personalData: [], problems: [] };
}

/** Whether a correction changes anything. */
export function changesSomething(c: Correction): boolean {
  return !!(c.audience || c.deadline || c.grain || c.window || c.metrics || c.addDimensions.length || c.removeDimensions.length || c.clearDimensions || c.filters.length || c.clearFilters.length || c.drop.length);
}

/**
 * `current`: the brief being changed. A value that more than one breakdown holds ("same for ORD",
 * origin or destination) takes the breakdown the brief already restricts, when only one of them
 * is: the follow-up swaps that value for this one.
 */
export function readCorrection(text: string, facts: DatasetFacts, now: Date, locale?: string, current?: Brief): Correction {
  const c = emptyCorrection();
  const t = text.trim();
  if (AGREE.test(t)) return { ...c, agree: true };
  if (CANCEL.test(t) && !/\b(?:drop|remove)\b/i.test(t)) return { ...c, cancel: true };
  const ds = facts.dataset;
  const lower = t.toLowerCase();
  // Verbs on the plan first; what they name is taken out of the text read for slots.
  let rest = lower;
  for (const m of lower.matchAll(/\b(?:drop|remove|delete|skip|lose|without)\s+(?:items?\s+|numbers?\s+|answers?\s+|#)?((?:\d{1,2})(?:\s*(?:,|and|&|\+)\s*\d{1,2})*)\b/g)) {
    for (const n of m[1]!.matchAll(/\d{1,2}/g)) c.drop.push(Number(n[0]));
    rest = rest.replace(m[0], ' ');
  }
  for (const m of lower.matchAll(/\b(?:drop|remove|skip|lose)\s+the\s+([a-z ]+?)\s+(?:one|item|answer|chart)\b/g)) {
    c.drop.push(m[1]!.trim());
    rest = rest.replace(m[0], ' ');
  }
  if (/\b(?:no|without\s+a|without\s+any|drop\s+the|remove\s+the)\s+breakdowns?\b|\bno\s+split\b/.test(rest)) {
    c.clearDimensions = true;
    rest = rest.replace(/\b(?:no|without\s+a|without\s+any|drop\s+the|remove\s+the)\s+breakdowns?\b|\bno\s+split\b/g, ' ');
  }
  if (/\b(?:all\s+the\s+data|all\s+data|everything|whole\s+history|all\s+time|no\s+date\s+limit)\b/.test(rest)) {
    c.window = { all: true };
    rest = rest.replace(/\b(?:all\s+the\s+data|all\s+data|everything|whole\s+history|all\s+time|no\s+date\s+limit)\b/g, ' ');
  }
  if (/\b(?:no|without\s+a|drop\s+the)\s+deadline\b|\bno\s+rush\b(?!.*\bby\b)/.test(rest)) c.deadline = 'none';
  // "use 2025", "switch to weekly", "make it March 2024 to May 2025 instead": the verb only says a change follows.
  rest = rest.replace(/^\s*(?:(?:please|pls|ok|okay|and|then|now)[\s,]+)*(?:use|using|switch\s+to|change\s+(?:it\s+)?to|make\s+it|go\s+with)\b|\binstead\b/g, ' ');
  // "add channel", "also by route", "split by channel": breakdowns to add; "without route": to drop.
  const read = readRequest(rest, facts, { now, ...(locale ? { locale } : {}) });
  c.personalData = read.personalData ?? [];
  const filters = read.questions.flatMap((q) => q.filters);
  const restricted = new Set((current?.questions ?? []).flatMap((q) => q.filters.map((f) => f.dimension)));
  for (const a of read.ambiguousValues ?? []) {
    const fits = a.candidates.filter((x) => restricted.has(x.dimension));
    if (fits.length === 1) filters.push({ dimension: fits[0]!.dimension, values: [fits[0]!.value] });
  }
  const addedDims = new Set(read.dimensions);
  for (const m of rest.matchAll(/\b(?:add|include|also|plus|and|split\s+by|break\s+(?:it\s+)?down\s+by)\s+(?:a\s+)?(?:breakdown\s+(?:by|of)\s+)?(?:by\s+)?(?:the\s+)?([a-z][a-z ]*?)(?=\s*(?:,|;|$|\band\b|\bplus\b))/g)) {
    const words = m[1]!;
    const byRead = readRequest(`by ${words}`, facts, { now });
    for (const d of byRead.dimensions) if (isBreakdownDimension(ds, d)) addedDims.add(d);
    if (byRead.dimensions.length === 0 && byRead.metrics.length > 0) {
      c.metrics = { add: [...new Set([...('add' in (c.metrics ?? {}) ? (c.metrics as { add: string[] }).add : []), ...byRead.metrics])] };
    }
  }
  for (const m of rest.matchAll(/\b(?:without|drop|remove|not\s+by|no)\s+(?:the\s+)?([a-z][a-z ]*?)(?:\s+breakdown)?(?=\s*(?:,|;|$|\band\b))/g)) {
    const byRead = readRequest(`by ${m[1]!}`, facts, { now });
    for (const d of byRead.dimensions) {
      c.removeDimensions.push(d);
      addedDims.delete(d);
    }
  }
  c.addDimensions = [...addedDims].filter((d) => isBreakdownDimension(ds, d) && !c.removeDimensions.includes(d));
  // "all channels", "every route": lift that breakdown's filter.
  for (const m of rest.matchAll(/\b(?:all|every|any)\s+([a-z][a-z ]*?)(?=\s*(?:,|;|$|\band\b))/g)) {
    const byRead = readRequest(`by ${m[1]!}`, facts, { now });
    for (const d of byRead.dimensions) {
      c.clearFilters.push(d);
      c.addDimensions = c.addDimensions.filter((x) => x !== d);
    }
  }
  c.filters = filters;
  if (read.audience) c.audience = read.audience;
  if (read.grain) c.grain = read.grain;
  if (read.deadline) {
    c.deadline = read.deadline;
    if (read.deadlineAsap) c.deadlineAsap = true;
  } else if (/^\s*(?:deadline|due)\b/.test(rest) || /^\s*\d{4}-\d{2}-\d{2}\s*$/.test(rest) || (/^\s*by\b/.test(rest) && !readAsOtherThanDate(firstClause(rest), facts, now))) {
    const d = readDeadlineAnswer(rest.replace(/^\s*(?:deadline|due)\s*:?\s*/, ''), now, ds.timezone);
    if (d.ok) {
      c.deadline = d.value;
      if (saysAsap(rest)) c.deadlineAsap = true;
    }
    else c.problems.push(d.message);
  }
  const impossible = impossibleDate(rest);
  if (impossible) c.problems.push(impossible);
  if (read.window && !c.window && !impossible) {
    const full = fullWindow(facts.coverage);
    if (full && (read.window.end <= full.start || read.window.start >= full.end)) c.problems.push(`The data covers ${full.start} to ${full.end}; the period you asked for has no data.`);
    else c.window = { window: read.window, ...(read.compareWindow ? { compareWindow: read.compareWindow } : {}) };
  }
  if (read.metrics.length > 0 && !c.metrics) {
    const adding = /\b(?:also|add|plus|and)\b/.test(rest) && !/\binstead\b|\buse\b|\bswitch\b|\bnot\b/.test(rest);
    c.metrics = adding ? { add: read.metrics } : { replace: read.metrics };
  }
  for (const u of read.unknownTerms) c.unread.push(u.text);
  return c;
}

/** The words up to the first comma or semicolon: "by source" of "by source, only 2010 to 2017". */
function firstClause(text: string): string {
  return text.split(/[,;]/)[0]!;
}

/**
 * Whether a clause opening with "by" was read as something other than a date: a breakdown ("by
 * source"), a grain ("by month"), a measure, a period or an audience. Only a "by" that reads as
 * none of these is taken for a deadline (and complained about when it is not a date either).
 */
function readAsOtherThanDate(clause: string, facts: DatasetFacts, now: Date): boolean {
  const read = readRequest(clause, facts, { now });
  return read.dimensions.length > 0 || !!read.grain || read.metrics.length > 0 || !!read.window || !!read.audience || read.questions.some((q) => q.filters.length > 0);
}
