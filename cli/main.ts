// The `threadcount` command. Errors a user can fix are printed as one clear message, never a stack trace.
import { existsSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { parseArgs } from 'node:util';
import { ConfigError, loadConfig } from '../config/load.js';
import { generateDemo } from '../config/demo/generate-demo.js';
import { DEMO_CONFIG_FILE, DEMO_DATABASE_FILE } from '../config/demo/generate-demo.js';
import { SourceError } from '../analysis/sources/data-source.js';
import { ask } from './ask.js';
import { checkConfig, formatCheckReport } from '../analysis/sources/dataset-check.js';
import { draftConfigFile } from './init.js';
import { readBrief, ReadUsageError } from './read.js';
import { EnvironmentError, loadEnvironment, readSecrets } from '../config/environment.js';
import { PostgresStateStore } from '../bot/stores/PostgresStateStore.js';
import { serveUntilSignal, type Serving } from './serve.js';
import { sharedStateUrl } from './state-backend.js';
import { auditLines, AuditUsageError, normaliseSince, readAudit } from './audit.js';
import type { AuditEntry, AuditFilter } from '../bot/thread-state.js';
import { StateFileError } from '../bot/stores/state-file-check.js';
import { backupState, checkState, restoreState, StateUsageError } from './state-file.js';
import { allocatorNote, runsOnGlibc } from './allocator.js';

export const DEMO_REQUEST =
  'Ops review is on the 15th. How has revenue moved over time, month by month? We want to see the busiest and quietest months.';

const USAGE = `threadcount: answers a data request in a thread.

Commands:
  threadcount demo --out DIR [--rows N] [--seed N]
      Write the Skerrywake Ferries demo data (DuckDB) and a config pointing to it into DIR.
  threadcount ask --config FILE --request "TEXT" [--answers FILE] --out DIR
      Run one whole conversation with scripted answers; write thread.json, charts, tables and SQL to DIR.
  threadcount check --config FILE
      Hold the config against its data before any conversation: every column exists with a
      usable type, every metric runs, the time column's dates and how often they are stamped,
      each dimension's values. Prints what it found; exits 2 when the config has problems.
  threadcount init --source FILE|URL [--table T] --out FILE
      Draft a config from the data: the time column, metrics for its numbers and true/false
      columns, dimensions for its low-cardinality text, suspected personal data marked.
  threadcount read --config FILE [--dataset NAME] [--now ISO-TIMESTAMP] "TEXT"
      Print the brief the bot would act on for a request, as one JSON object (docs/reading.md).
  threadcount serve --config FILE [--state FILE]
      Answer requests in chat: the local channel page always, Slack and Discord when their
      tokens are set in the environment. Conversations are kept in the state file
      (default: threadcount-state.duckdb beside the config), or in PostgreSQL when the config
      has conversation.state: then several serve processes (replicas) share the work.
  threadcount audit --config FILE [--state FILE] [--thread ID] [--since DATE]
      Print the audit log (requests, messages, SQL that ran, posts, refusals, runs) as JSON
      lines, oldest first, from the state serve keeps. Stop serve first when it is a file: the
      file is locked while it runs (PostgreSQL state can be read at any time).
  threadcount state check|backup|restore --config FILE [--state FILE] [--out FILE | --from FILE]
      The state file's care (stop serve first): check reads it through as serve does at start;
      backup --out FILE writes a checked copy; restore --from FILE puts a backup in its place,
      keeping the replaced file beside it.
  threadcount start [--out DIR]
      Generate the demo data (once) into DIR/demo-data, then serve it; prints the page's address.

Environment: the variable the config's conversation.state names (its PostgreSQL URL);
SLACK_BOT_TOKEN with SLACK_SIGNING_SECRET (Events API over HTTP, SLACK_PORT) or
SLACK_APP_TOKEN (Socket Mode); DISCORD_BOT_TOKEN; THREADCOUNT_PORT and THREADCOUNT_HOST for
the local channel (default 127.0.0.1:8787), and THREADCOUNT_ACCESS_TOKEN, required when
THREADCOUNT_HOST is not a loopback address (the API then takes it as a bearer token, the page
as a sign-in).

Exit codes: 1 unexpected error; 2 a problem in the config, the environment or the command line;
3 a dataset that cannot be used; 4 a state file that is damaged or in use.
`;

export async function main(argv: string[]): Promise<number> {
  const [command, ...rest] = argv;
  try {
    switch (command) {
      case 'demo':
        return await demoCommand(rest);
      case 'ask':
        return await askCommand(rest);
      case 'read':
        return await readCommand(rest);
      case 'serve':
        return await serveCommand(rest);
      case 'check':
        return await checkCommand(rest);
      case 'init':
        return await initCommand(rest);
      case 'start':
        return await startCommand(rest);
      case 'audit':
        return await auditCommand(rest);
      case 'state':
        return await stateCommand(rest);
      case undefined:
      case 'help':
      case '--help':
      case '-h':
        process.stdout.write(USAGE);
        return 0;
      default:
        process.stderr.write(`threadcount: unknown command "${command}".\n\n${USAGE}`);
        return 2;
    }
  } catch (err) {
    return reportError(err);
  }
}

function reportError(err: unknown): number {
  if (err instanceof ConfigError) {
    process.stderr.write(`threadcount: the file has problems:\n${err.message}\n`);
    return 2;
  }
  if (err instanceof SourceError) {
    process.stderr.write(`threadcount: the dataset could not be used: ${err.message}\n`);
    return 3;
  }
  if (err instanceof EnvironmentError) {
    process.stderr.write(`threadcount: the environment has problems:\n${err.problems.map((p) => `- ${p}`).join('\n')}\n`);
    return 2;
  }
  if (err instanceof StateFileError) {
    process.stderr.write(`threadcount: ${err.message}\n`);
    return 4;
  }
  if (err instanceof UsageError || err instanceof AuditUsageError || err instanceof StateUsageError || err instanceof ReadUsageError) {
    process.stderr.write(`threadcount: ${err.message}\n\n${USAGE}`);
    return 2;
  }
  process.stderr.write(`threadcount: unexpected error: ${err instanceof Error ? err.message : String(err)}\n`);
  return 1;
}

class UsageError extends Error {}

function parse(rest: string[], options: Record<string, { type: 'string' | 'boolean' }>) {
  try {
    return parseArgs({ args: rest, options, allowPositionals: false, strict: true }).values as Record<string, string | undefined>;
  } catch (err) {
    throw new UsageError(err instanceof Error ? err.message : String(err));
  }
}

function positiveInt(value: string | undefined, name: string): number | undefined {
  if (value === undefined) return undefined;
  const n = Number(value.replaceAll('_', ''));
  if (!Number.isInteger(n) || n < 1) throw new UsageError(`--${name} must be a whole number above 0 (got "${value}")`);
  return n;
}

async function demoCommand(rest: string[]): Promise<number> {
  const v = parse(rest, { out: { type: 'string' }, rows: { type: 'string' }, seed: { type: 'string' } });
  if (!v.out) throw new UsageError('demo needs --out DIR');
  const rows = positiveInt(v.rows, 'rows');
  if (rows !== undefined && rows < 1000) throw new UsageError(`--rows must be at least 1000 (got ${rows})`);
  const seed = positiveInt(v.seed, 'seed');
  const started = Date.now();
  const result = await generateDemo({ outDir: resolve(v.out), ...(rows ? { rows } : {}), ...(seed ? { seed } : {}) });
  process.stdout.write(`Wrote ${result.rows.toLocaleString('en')} bookings to ${result.databasePath}\nConfig: ${result.configPath} (${((Date.now() - started) / 1000).toFixed(1)} s)\n`);
  return 0;
}

async function askCommand(rest: string[]): Promise<number> {
  const v = parse(rest, { config: { type: 'string' }, request: { type: 'string' }, answers: { type: 'string' }, out: { type: 'string' } });
  if (!v.config || !v.request || !v.out) throw new UsageError('ask needs --config FILE, --request "TEXT" and --out DIR');
  const result = await ask({ configFile: v.config, request: v.request, outDir: resolve(v.out), ...(v.answers ? { answersFile: v.answers } : {}) });
  const files = result.thread.thread.posts.flatMap((p) => p.files);
  process.stdout.write(`Thread written to ${result.threadFile} (${result.thread.thread.posts.length} posts, ${files.length} files; conversation ${result.end}).\n`);
  return result.end === 'stalled' ? 1 : 0;
}

async function checkCommand(rest: string[]): Promise<number> {
  const v = parse(rest, { config: { type: 'string' } });
  if (!v.config) throw new UsageError('check needs --config FILE');
  const config = loadConfig(resolve(v.config));
  const report = await checkConfig(config, readSecrets(config));
  process.stdout.write(formatCheckReport(report));
  return report.problems.length ? 2 : 0;
}

async function initCommand(rest: string[]): Promise<number> {
  const v = parse(rest, { source: { type: 'string' }, table: { type: 'string' }, out: { type: 'string' }, 'url-env': { type: 'string' } });
  if (!v.source || !v.out) throw new UsageError('init needs --source FILE|URL and --out FILE');
  const result = await draftConfigFile({ source: v.source, out: resolve(v.out), ...(v.table ? { table: v.table } : {}), ...(v['url-env'] ? { urlEnv: v['url-env'] } : {}) });
  process.stdout.write(result.summary);
  return 0;
}

async function readCommand(rest: string[]): Promise<number> {
  let parsed;
  try {
    parsed = parseArgs({ args: rest, options: { config: { type: 'string' }, dataset: { type: 'string' }, now: { type: 'string' } }, allowPositionals: true, strict: true });
  } catch (err) {
    throw new UsageError(err instanceof Error ? err.message : String(err));
  }
  const v = parsed.values as Record<string, string | undefined>;
  const text = parsed.positionals.join(' ');
  if (!v.config || text.trim().length === 0) throw new UsageError('read needs --config FILE and the request text');
  const now = v.now ? new Date(v.now) : new Date();
  if (Number.isNaN(now.getTime())) throw new UsageError(`--now must be an ISO timestamp such as 2025-06-20T09:00:00Z (got "${v.now}")`);
  const brief = await readBrief({ configFile: resolve(v.config), text, now, ...(v.dataset ? { dataset: v.dataset } : {}) });
  process.stdout.write(`${JSON.stringify(brief, null, 2)}\n`);
  return 0;
}

async function serveCommand(rest: string[]): Promise<number> {
  const v = parse(rest, { config: { type: 'string' }, state: { type: 'string' } });
  if (!v.config) throw new UsageError('serve needs --config FILE');
  // Tokens first: a malformed one stops start-up before any data is opened.
  const environment = loadEnvironment();
  const configFile = resolve(v.config);
  const statePath = resolve(v.state ?? defaultStatePath(configFile));
  noteAllocator();
  await serveUntilSignal({ configFile, statePath, environment }, announce);
  return 0;
}

/** The config's conversation.state_path (default threadcount-state.duckdb), beside the config. */
function defaultStatePath(configFile: string): string {
  return resolve(dirname(configFile), loadConfig(configFile).conversation.state_path);
}

async function auditCommand(rest: string[]): Promise<number> {
  const v = parse(rest, { config: { type: 'string' }, state: { type: 'string' }, thread: { type: 'string' }, since: { type: 'string' } });
  if (!v.config && !v.state) throw new UsageError('audit needs --config FILE (or --state FILE)');
  if (v.config && !v.state) {
    const config = loadConfig(resolve(v.config));
    const shared = config.conversation.state;
    if (shared) {
      const filter: AuditFilter = { ...(v.thread ? { threadId: v.thread } : {}), ...(v.since ? { since: normaliseSince(v.since) } : {}) };
      process.stdout.write(auditLines(await sharedAudit(sharedStateUrl(shared, readSecrets(config)), shared.schema, filter)));
      return 0;
    }
  }
  const statePath = resolve(v.state ?? defaultStatePath(resolve(v.config!)));
  if (!existsSync(statePath)) throw new UsageError(`there is no state file at ${statePath} yet (serve writes it); pass --state FILE if it is elsewhere`);
  let entries;
  try {
    entries = await readAudit({ statePath, ...(v.thread ? { threadId: v.thread } : {}), ...(v.since ? { since: v.since } : {}) });
  } catch (err) {
    if (err instanceof AuditUsageError) throw err;
    const message = err instanceof Error ? err.message : String(err);
    // DuckDB locks the file while serve has it open.
    if (/lock/i.test(message)) throw new UsageError(`the state file ${statePath} is in use (is threadcount serve running?); stop it and try again`);
    throw err;
  }
  process.stdout.write(auditLines(entries));
  return 0;
}

/** The audit log from the shared state in PostgreSQL. */
async function sharedAudit(url: string, schema: string, filter: AuditFilter): Promise<AuditEntry[]> {
  const store = await PostgresStateStore.open({ url, schema, poolSize: 1, lockPoolSize: 1, applicationName: 'threadcount audit' });
  try {
    return await store.listAudit(filter);
  } finally {
    await store.close();
  }
}

async function stateCommand(rest: string[]): Promise<number> {
  const [action, ...args] = rest;
  const v = parse(args, { config: { type: 'string' }, state: { type: 'string' }, out: { type: 'string' }, from: { type: 'string' } });
  if (!v.config && !v.state) throw new UsageError('state needs --config FILE (or --state FILE)');
  const statePath = resolve(v.state ?? defaultStatePath(resolve(v.config!)));
  switch (action) {
    case 'check':
      await checkState(statePath);
      process.stdout.write(`The state file ${statePath} reads through with no damage.\n`);
      return 0;
    case 'backup':
      if (!v.out) throw new UsageError('state backup needs --out FILE');
      await backupState(statePath, resolve(v.out));
      process.stdout.write(`Backed up ${statePath} to ${resolve(v.out)} (checked).\n`);
      return 0;
    case 'restore': {
      if (!v.from) throw new UsageError('state restore needs --from FILE');
      const kept = await restoreState(statePath, resolve(v.from));
      process.stdout.write(`Restored ${statePath} from ${resolve(v.from)}.${kept.length ? ` The replaced files are kept as ${kept.join(', ')}.` : ''}\n`);
      return 0;
    }
    default:
      throw new UsageError(`state needs check, backup or restore (got "${action ?? ''}")`);
  }
}

async function startCommand(rest: string[]): Promise<number> {
  const v = parse(rest, { out: { type: 'string' } });
  const environment = loadEnvironment();
  const base = resolve(v.out ?? 'out');
  const demoDir = join(base, 'demo-data');
  if (!existsSync(join(demoDir, DEMO_DATABASE_FILE))) {
    process.stdout.write('Generating the Skerrywake Ferries demo data (once)...\n');
    await generateDemo({ outDir: demoDir });
  }
  noteAllocator();
  await serveUntilSignal({ configFile: join(demoDir, DEMO_CONFIG_FILE), statePath: join(base, 'threadcount-state.duckdb'), environment }, announce);
  return 0;
}

/** A long-running serve without glibc's allocator settings is told which to set (they apply only from the start). */
function noteAllocator(): void {
  const note = allocatorNote(process.env, runsOnGlibc());
  if (note) process.stderr.write(`${note}\n`);
}

function announce(serving: Serving): void {
  const others = serving.adapters.filter((a) => a !== 'local');
  process.stdout.write(
    `threadcount is answering requests.\n` +
      `Local channel: ${serving.localUrl}\n` +
      (others.length ? `Also connected: ${others.join(', ')}.\n` : 'Slack and Discord are off (no tokens set).\n') +
      (serving.slackEventsUrl ? `Slack Events API: ${serving.slackEventsUrl}\n` : '') +
      `Try: "${serving.starters[0] ?? DEMO_REQUEST}"\nPress Ctrl+C to stop.\n`,
  );
}
