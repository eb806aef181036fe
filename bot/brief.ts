// A brief: what the request asks for, read from its text and completed by the prompts.
import type { Audience, DateWindow, Grain, RequestKind } from '../analysis/types.js';

export { AUDIENCES, type Audience } from '../analysis/types.js';

/** A phrase in the request that looked like a metric but matched nothing in the catalog. */
export interface UnknownTerm {
  text: string;
  closest: string[];
}

/** One question inside a request; a message may hold several. */
export interface Question {
  text: string;
  kind: RequestKind;
  metrics: string[];
  dimensions: string[];
  comparisonGroup?: string;
  /** Asks how often each customer (the group's unit) does something, not a metric total. */
  frequency: boolean;
  /** Asks for the numbers period by period ("the numbers by month"): the plan opens with the period table. */
  table?: boolean;
}

export interface Brief {
  requestText: string;
  questions: Question[];
  kinds: RequestKind[];
  metrics: string[];
  dimensions: string[];
  comparisonGroup?: string;
  unknownTerms: UnknownTerm[];
  window?: DateWindow;
  grain?: Grain;
  deadline?: string;
  audience?: Audience;
  purpose?: string;
  /** The breakdown prompt was answered (possibly with "none"). */
  dimensionsAsked?: boolean;
  /** Personal-data dimensions the request named: refused, never grouped by, filtered on or shown. */
  personalData?: string[];
}
