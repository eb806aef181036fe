// Where `serve` keeps what outlives a message: the embedded DuckDB file for one process, or, with
// `conversation.state` in the config, PostgreSQL shared by every replica (the state store, the
// local channel's threads and the queue of runs).
import { hostname } from 'node:os';
import { DuckDbThreadLog } from '../adapters/local-channel/DuckDbThreadLog.js';
import type { LocalThreadLog } from '../adapters/local-channel/local-thread-log.js';
import { PostgresThreadLog } from '../adapters/local-channel/PostgresThreadLog.js';
import { PgBossRunQueue } from '../bot/queue/PgBossRunQueue.js';
import type { RunQueue } from '../bot/queue/RunQueue.js';
import { DuckDbStateStore } from '../bot/stores/DuckDbStateStore.js';
import { PostgresStateStore } from '../bot/stores/PostgresStateStore.js';
import type { StateStore } from '../bot/thread-state.js';
import { EnvironmentError, type Secrets } from '../config/environment.js';
import type { SharedStateConfig } from '../config/schema.js';

export interface StateBackend {
  store: StateStore;
  /** The local channel's threads, kept with the state. */
  threads: LocalThreadLog;
  /** Whether other processes share this state (replicas): then they may be handling a message this one did not see. */
  shared: boolean;
  /** The shared queue of runs; absent, each process runs what it agreed. */
  queue?: RunQueue;
  /** Names this process in the audit log. */
  replica: string;
  /** Closes the store (the caller stops the queue and the channel first). */
  close(): Promise<void>;
}

export async function openFileState(statePath: string): Promise<StateBackend> {
  const store = await DuckDbStateStore.open(statePath);
  try {
    const threads = await DuckDbThreadLog.open(store);
    return { store, threads, shared: false, replica: replicaName(), close: () => store.close() };
  } catch (err) {
    await store.close().catch(() => undefined);
    throw err;
  }
}

export async function openSharedState(shared: SharedStateConfig, secrets: Secrets, log: (line: string) => void): Promise<StateBackend> {
  const url = sharedStateUrl(shared, secrets);
  const replica = replicaName();
  const store = await PostgresStateStore.open({ url, schema: shared.schema, applicationName: `threadcount ${replica}` });
  let threads: PostgresThreadLog | undefined;
  try {
    threads = await PostgresThreadLog.open({ url, pool: store.pool, schema: shared.schema });
    const queue = await PgBossRunQueue.open({
      url,
      schema: `${shared.schema}_queue`,
      workers: shared.runs_per_replica,
      expireSeconds: shared.run_expiry_seconds,
      retries: shared.run_retries,
      checkSeconds: shared.expiry_check_seconds,
      pollSeconds: 1,
      applicationName: `threadcount-queue ${replica}`,
      onError: (err) => log(`threadcount: run queue: ${err.message}`),
    });
    return { store, threads, shared: true, queue, replica, close: () => store.close() };
  } catch (err) {
    await threads?.close().catch(() => undefined);
    await store.close().catch(() => undefined);
    throw err;
  }
}

/** The shared state's URL, or an error naming the variable the config expects it in. */
export function sharedStateUrl(shared: SharedStateConfig, secrets: Secrets): string {
  const url = secrets[shared.url_env];
  if (!url) throw new EnvironmentError([`${shared.url_env} is not set: the config keeps conversations in PostgreSQL (conversation.state) and names this variable for its URL`]);
  return url;
}

function replicaName(): string {
  return `${hostname()}:${process.pid}`;
}
