// A brief: what a request asks for, as data, with the words each part was read from. Written by
// the reader (bot/reading/), completed by the requester's answers and corrections, and turned
// into a plan. `threadcount read` prints it (bot/reading/brief-json.ts).
import type { Audience, DateWindow, SpanEndsUnit, Grain, GrowthRank, RankOrder, RequestKind, SegmentFilter } from '../analysis/types.js';

export { AUDIENCES, type Audience } from '../analysis/types.js';

/** The one value of a breakdown whose share of the total a question asks about. */
export interface ShareFocus {
  dimension: string;
  value: string;
}

/** A word or phrase that names something the catalog and the data do not know. */
export interface UnknownTerm {
  text: string;
  closest: string[];
  /** What it seemed to name: a measure, a breakdown, or a value of the data. */
  role?: 'metric' | 'dimension' | 'value' | 'other';
  /** A word the data could measure several ways (a bare "volume": bookings or passengers): `closest` are those ways. */
  several?: true;
}

/** A word that matches several values (or values of several breakdowns): asked, never guessed. */
export interface AmbiguousValue {
  text: string;
  candidates: { dimension: string; value: string }[];
  /**
   * Named against another value ("Serie A vs Bundesliga"): once answered, the two values of one
   * breakdown are compared side by side (the question's contrast), not merged into one filter.
   */
  versus?: boolean;
}

/** One question inside a request; a message may hold several. */
export interface Question {
  text: string;
  kind: RequestKind;
  metrics: string[];
  dimensions: string[];
  /** Values of the data the question is restricted to ("phone bookings", "app vs web"). */
  filters: SegmentFilter[];
  comparisonGroup?: string;
  /** The date a before/after turns on, stated or the group's launch date when the text refers to it. */
  launchDate?: string;
  /** Asks how often each customer (the group's unit) does something, not a metric total. */
  frequency: boolean;
  /**
   * A season named as a guess to test ("I suspect winter is our worst season"), not as the period:
   * answered by the month-of-year pattern over all the data, the season set against the rest
   * (bot/reading/hypothesis-seasons.ts).
   */
  seasonTested?: string;
  /** The question's own period and the period it is compared with, when it names them. */
  window?: DateWindow;
  compareWindow?: DateWindow;
  /** The period named runs past the data's last day, so the window stops there ("this summer" so far). */
  windowSoFar?: boolean;
  /** "since 2001", "over the last 10 years": a change is measured from the window's first whole period of this unit to its last. */
  spanEnds?: SpanEndsUnit;
  /** Two values of one dimension set against each other ("did phone grow faster than kiosk"). */
  contrast?: { dimension: string; values: string[] };
  /** "top 5 routes": how many to rank. */
  rankLimit?: number;
  /** "worst 10", "lowest 5": rank by the metric's value in this direction. */
  rankOrder?: RankOrder;
  /** "which channel is growing fastest": its breakdown ranked by each segment's own growth rate. */
  growthRank?: GrowthRank;
  /** Asks which segments of its breakdown come first ("which species cause the most cost", "top 5 busiest airports"): the ranking is its answer. */
  ranking?: boolean;
  /** "per decade", "a year": the unit a rate of change is stated in. */
  rateUnit?: 'year' | 'decade';
  /** "bookings per day by month": a per-day average at the grain asked. */
  perDay?: boolean;
  /** "gross per film" of a sum with no per-row average in the catalog: compare its mean (and median) per row. */
  perRow?: string;
  /** "the numbers by month", "side by side": a table of the metrics by period. */
  table?: boolean;
  /** The metric the question took from the one before ("how has that moved"). */
  metricsFromPrevious?: boolean;
  /** Asks a part of a whole ("what share of flights", "what percentage of", lexicon SHARE_ASK). */
  shareAsked?: boolean;
  /**
   * "What share of flights does ATL have": the one value whose share of the total is asked. It is
   * not a filter: the total counts every value, and the answer leads with this one's share.
   */
  shareOf?: ShareFocus;
  /**
   * "How has LWB done since it opened?": the window starts on the named value's first day in the
   * data (bot/reading/own-start.ts), and the plan sets it against everything else over the same days.
   */
  ownStart?: { dimension: string; value: string; first: string; entered: boolean };
  /** "median delay", "p90 delay": a quantile of an averaged metric instead of its mean (analysis/statistic.ts), with the words it was read from. */
  statistic?: { quantile: number; words: string };
}

/** How a slot of the brief got its value. */
/** `answered`: from the requester's answer to a prompt, not the request's words. */
export type EvidenceHow = 'stated' | 'inferred' | 'default' | 'answered';

export interface Evidence {
  /** The words the value was read from (empty for a default). */
  words: string;
  how: EvidenceHow;
  /** For a default: the value it takes and why. */
  value?: string;
  reason?: string;
}

export const BRIEF_SLOTS = ['dataset', 'kinds', 'metrics', 'dimensions', 'filters', 'comparisonGroup', 'launchDate', 'window', 'compareWindow', 'grain', 'audience', 'deadline'] as const;
export type BriefSlot = (typeof BRIEF_SLOTS)[number];

/** What cannot be defaulted, asked before anything runs. */
/** `window`: the period named lies outside the data ("sales in 2031"); nothing runs on another period in its place. */
export const ASKABLE = ['metrics', 'values', 'dimensions', 'dataset', 'window'] as const;
export type Askable = (typeof ASKABLE)[number];

export interface Brief {
  requestText: string;
  questions: Question[];
  /** Unions over the questions, for what needs the whole request at once. */
  kinds: RequestKind[];
  metrics: string[];
  dimensions: string[];
  comparisonGroup?: string;
  unknownTerms: UnknownTerm[];
  ambiguousValues?: AmbiguousValue[];
  window?: DateWindow;
  compareWindow?: DateWindow;
  grain?: Grain;
  deadline?: string;
  /** The deadline was "as soon as possible": it is today by choice, so no warning that it is close follows. */
  deadlineAsap?: true;
  audience?: Audience;
  purpose?: string;
  /** The breakdown was answered or corrected (possibly with "none"). */
  dimensionsAsked?: boolean;
  /** Personal-data dimensions the request named: refused, never grouped by, filtered on or shown. */
  personalData?: string[];
  /** Values that look like a person's contact or id ("someone@example.com"): refused as filters. */
  personalValues?: string[];
  /**
   * Relative periods ("this year vs last year") that fell after data which ended years ago, asked
   * about: the same periods counted back from the data's end (2017 against 2016), which the period
   * prompt recommends, as relative periods count back from there.
   */
  latestInstead?: { unit: 'year' | 'quarter' | 'month' | 'season'; window: DateWindow; compareWindow?: DateWindow };
  /**
   * Events named as a time that the data cannot date ("in the recession", "during the strike"),
   * as written: asked about when no other period was named, else said back on the card with the
   * period that runs instead (bot/reading/undated-events.ts).
   */
  undatedEvents?: string[];
  /** What relative periods were counted from. */
  anchor?: { today: string; why: string };
  /** How each slot was read. */
  evidence?: Partial<Record<BriefSlot, Evidence>>;
  /** What the reader could not settle and must ask. */
  toAsk?: Askable[];
  /** A deadline that was named but is already past, said back. */
  pastDeadline?: string;
  /** Readings said back on the card: periods read otherwise than written or outside the data ("30 February 2008 is not a real date…"), a bare "volume" read as the one count of the data. */
  saidBack?: string[];
}

/**
 * The whole request as one question, for a brief that holds none (every reader makes at least
 * one; a brief built elsewhere may not): it keeps the brief's period, comparison and group, so
 * an answer to a prompt or a plan never widens what was asked.
 */
export function wholeRequestQuestion(brief: Brief, metrics: string[] = brief.metrics): Question {
  return {
    text: brief.requestText,
    kind: brief.kinds[0] ?? 'trend',
    metrics,
    dimensions: brief.dimensions,
    filters: [],
    frequency: false,
    ...(brief.window ? { window: brief.window } : {}),
    ...(brief.compareWindow ? { compareWindow: brief.compareWindow } : {}),
    ...(brief.comparisonGroup ? { comparisonGroup: brief.comparisonGroup } : {}),
  };
}
