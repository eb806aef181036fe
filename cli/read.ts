// `threadcount read`: the brief the bot would act on for a request, as one JSON object. Uses the
// same reader as the conversation and `ask`; also a way for a catalog's author to check its words.
import { allowedDatasets, chooseDataset } from '../bot/access.js';
import { briefToJson, type BriefJson } from '../bot/reading/brief-json.js';
import { readRequest } from '../bot/reading/read-request.js';
import { readSecrets } from '../config/environment.js';
import { loadConfig } from '../config/load.js';
import { datasetFacts } from '../analysis/workspace.js';
import { closeWorkspaces, openWorkspaces } from './workspaces.js';

export interface ReadOptions {
  configFile: string;
  text: string;
  dataset?: string;
  now?: Date;
  /** The channel key whose access rules apply (default "local"). */
  channel?: string;
}

export class ReadUsageError extends Error {}

export async function readBrief(opts: ReadOptions): Promise<BriefJson> {
  const config = loadConfig(opts.configFile);
  const names = opts.dataset ? [opts.dataset] : allowedDatasets(config.access, config.datasets.map((d) => d.name), opts.channel ?? 'local');
  if (opts.dataset && !config.datasets.some((d) => d.name === opts.dataset)) {
    throw new ReadUsageError(`the config has no dataset "${opts.dataset}" (it has: ${config.datasets.map((d) => d.name).join(', ')})`);
  }
  if (names.length === 0) throw new ReadUsageError('no dataset may be used from this channel (see the config\'s access rules); pass --dataset NAME');
  const workspaces = await openWorkspaces(config, readSecrets(config), names, opts.now ?? new Date());
  try {
    const choice = chooseDataset(opts.text, [...workspaces.values()].map((w) => w.dataset), (ds) => workspaces.get(ds.name)?.values);
    const chosen = choice.kind === 'chosen' ? choice.dataset : choice.ranked[0]!;
    const ws = workspaces.get(chosen.name)!;
    const brief = readRequest(opts.text, datasetFacts(ws), { now: opts.now ?? new Date(), locale: config.charts.locale });
    if (choice.kind === 'ask') brief.toAsk = [...new Set([...(brief.toAsk ?? []), 'dataset' as const])];
    return briefToJson(brief, ws.dataset.name);
  } finally {
    await closeWorkspaces(workspaces);
  }
}
