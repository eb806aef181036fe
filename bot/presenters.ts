// What the bot needs from the presentation side: an answered sub-question turned into a post,
// and the closing summary. Implemented in present-answer.ts; tests pass their own.
import type { PhaseTimings } from '../analysis/phase-timings.js';
import type { ChartSpec } from '../analysis/charts/spec.js';
import type { Takeaway } from '../analysis/present/presenter.js';
import type { QualityReport } from '../analysis/quality/quality-checks.js';
import type { Answer, Audience, SubQuestion } from '../analysis/types.js';
import type { Workspace } from '../analysis/workspace.js';
import type { OutgoingPost } from './port.js';

/** A chart kept for the digest: its PNG, and its spec when known. */
export interface DigestChart {
  png: Buffer;
  spec?: ChartSpec;
}

export interface PresentedPost {
  post: Omit<OutgoingPost, 'key'>;
  takeaway: Takeaway | null;
  /** The chart PNG, kept for the digest. */
  chart: Buffer | null;
  /** Its spec, so the digest can redraw it legibly at thumbnail size. */
  chartSpec?: ChartSpec;
}

/** Turns one answered sub-question into a post (chart, caption, CSV, SQL) and its takeaway. */
export type AnswerPresenter = (
  answer: Answer,
  ctx: { workspace: Workspace; audience: Audience; position: number; timings?: PhaseTimings },
) => Promise<PresentedPost>;

/** Writes the closing summary from the takeaways of the answers. */
export type SummaryPresenter = (
  takeaways: (Takeaway & { position: number })[],
  ctx: {
    workspace: Workspace;
    audience: Audience;
    failures: number;
    charts: Map<number, DigestChart>;
    requestText: string;
    timings?: PhaseTimings;
    /** The plan's sub-questions and the run's data-quality report, for the thread-wide notes said once. */
    items?: SubQuestion[];
    quality?: QualityReport;
    now?: Date;
  },
) => Promise<Omit<OutgoingPost, 'key'>>;
