// Which dataset a thread uses and whether its channel may still use it: the configured
// workspaces, looked up through the config's access rules.
import { datasetFacts, type Workspace } from '../analysis/workspace.js';
import type { AccessConfig } from '../config/schema.js';
import { allowedDatasets } from './access.js';
import type { PromptContext } from './prompts.js';
import * as replies from './replies.js';
import type { ThreadState } from './thread-state.js';

/** Why a thread may not go on: the audit log's reason and the reply. */
export interface Refusal {
  reason: 'no_dataset' | 'dataset_gone' | 'dataset_not_allowed';
  text: string;
}

export class ThreadDatasets {
  constructor(
    readonly workspaces: ReadonlyMap<string, Workspace>,
    private readonly access: AccessConfig | undefined,
  ) {
    if (workspaces.size === 0) throw new Error('the bot needs at least one dataset');
  }

  /** The charts' locale (the first dataset's config; every dataset shares the config). */
  get locale(): string {
    return this.workspaces.values().next().value!.config.charts.locale;
  }

  /** The name of the dataset a thread from before there were several uses: the config's first. */
  get firstDataset(): string {
    return this.workspaces.keys().next().value!;
  }

  /** The workspace of a thread's dataset. */
  of(state: Pick<ThreadState, 'threadId' | 'dataset'>): Workspace {
    const name = state.dataset ?? this.firstDataset;
    const ws = this.workspaces.get(name);
    if (!ws) throw new Error(`the dataset "${name}" of thread ${state.threadId} is not configured`);
    return ws;
  }

  /** The datasets a channel may use, in the config's order. */
  allowedFor(channel: string): Workspace[] {
    return allowedDatasets(this.access, [...this.workspaces.keys()], channel).map((n) => this.workspaces.get(n)!);
  }

  /** Why a thread may not go on from this channel, if it may not (the rules may have changed since it started). */
  refusal(state: ThreadState, channel: string): Refusal | null {
    const allowed = this.allowedFor(channel);
    // Still choosing: the channel must keep at least one dataset.
    if (state.stage === 'clarifying' && state.prompt.topic === 'dataset' && !state.dataset) {
      return allowed.length > 0 ? null : { reason: 'no_dataset', text: replies.noDatasetForChannel() };
    }
    const name = state.dataset ?? this.firstDataset;
    const ws = this.workspaces.get(name);
    if (!ws) return { reason: 'dataset_gone', text: replies.datasetGone(name) };
    if (!allowed.includes(ws)) return { reason: 'dataset_not_allowed', text: replies.datasetNotAllowed(ws.dataset.label) };
    return null;
  }

  promptContext(ws: Workspace, now: Date): PromptContext {
    return { dataset: ws.dataset, coverage: ws.coverage, facts: datasetFacts(ws), now, locale: this.locale };
  }
}
