// Opens the datasets a command serves, by name, in the config's order: every one for `serve`,
// the ones a channel may use for `ask`. A dataset that cannot be opened closes the others.
import type { LoadedConfig } from '../config/load.js';
import type { Secrets } from '../config/environment.js';
import { openWorkspace, type Workspace } from '../analysis/workspace.js';

export async function openWorkspaces(config: LoadedConfig, secrets: Secrets, names: readonly string[] = config.datasets.map((d) => d.name), now: Date = new Date()): Promise<Map<string, Workspace>> {
  const opened = new Map<string, Workspace>();
  try {
    for (const name of names) opened.set(name, await openWorkspace(config, name, secrets, now));
  } catch (err) {
    await closeWorkspaces(opened);
    throw err;
  }
  return opened;
}

export async function closeWorkspaces(workspaces: ReadonlyMap<string, Workspace>): Promise<void> {
  for (const ws of workspaces.values()) await ws.source.close().catch(() => undefined);
}
