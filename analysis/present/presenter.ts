// A presenter turns one answer into what a post shows: a title that states the finding, a
// caption, an optional chart spec and a takeaway for the thread summary. Pure: no I/O.
import type { Verdict } from '../captions/verdict-words.js';
import type { DatasetConfig } from '../../config/schema.js';
import type { ChartSpec } from '../charts/spec.js';
import type { StampGranularity } from '../stamps.js';
import type { Answer, Audience } from '../types.js';

export interface PresentContext {
  dataset: DatasetConfig;
  locale: string;
  audience: Audience;
  chart: { width: number; height: number; scale: 1 | 2 };
  /** The dataset's last date (ISO), for "data as of" in footers. */
  dataAsOf: string | null;
  /** How often the data is stamped (analysis/stamps.ts): monthly data is dated in months, not days. Absent: daily. */
  stamps?: StampGranularity;
}

export interface Takeaway {
  /** Higher is more important; the summary lists the top few in this order. */
  importance: number;
  text: string;
  /** Put first in the summary whatever the rest's importance (the takeaway across a table's metrics). */
  leads?: boolean;
  /** The answer's finding as a verdict on a comparison with a year earlier, when it settles one. */
  verdict?: Verdict;
  /** Notes about the measure's data as a whole that this answer left to the summary, said there once (thread-notes.ts). */
  dataNotes?: string[];
  /** The answer's filters in words ("origin airport: LAX"), said once in the summary when every line shares them (scope-words.ts). */
  scope?: string;
}

export interface Presented {
  title: string;
  caption: string;
  /** Extra lines under the caption: caveats in plain words, the observational-study caution... */
  notes: string[];
  chart: ChartSpec | null;
  takeaway: Takeaway | null;
  /** Further images of the same answer, posted after `chart` (a long table's later pages). */
  moreCharts?: ChartSpec[];
  /** The answer as a reader's table, in CSV, beside the raw query results. */
  csv?: string;
  /**
   * The answer as monospace text, most detailed first: a platform shows the first that fits its
   * message limits, or none.
   */
  textBlocks?: string[];
}

export type Presenter = (answer: Answer, ctx: PresentContext) => Presented;

/** A takeaway that settles the comparison asked carries its verdict, said first in the summary. */
export function withVerdict(t: Takeaway, verdict: Verdict | null): Takeaway {
  return verdict ? { ...t, verdict } : t;
}
