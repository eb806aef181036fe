// Replicas as real processes: the CLI compiled with tsc into a folder of this test's own (not
// dist/, which the benchmark uses), and `threadcount serve` started from it as child processes.
import { execFile, spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';
import { parseDocument } from 'yaml';
import { peakRssKb, stopChild } from '../../bench/child-process.js';
import { afterAll, beforeAll } from 'vitest';
import { generateDemo } from '../../config/demo/generate-demo.js';
import { waitFor } from '../helpers/wait-for.js';

const ROOT = fileURLToPath(new URL('../..', import.meta.url));

/**
 * Compiles the CLI into node_modules/.cache (inside the package, so its dependencies and the
 * local channel's page are found as from dist/). Type errors elsewhere in a shared checkout do
 * not stop tsc from writing the JavaScript, so success is judged by the files written.
 */
export async function buildCli(): Promise<{ dir: string; remove: () => void }> {
  const dir = join(ROOT, 'node_modules', '.cache', `threadcount-replicas-${process.pid}`);
  rmSync(dir, { recursive: true, force: true });
  mkdirSync(dir, { recursive: true });
  await promisify(execFile)(process.execPath, [join(ROOT, 'node_modules', 'typescript', 'bin', 'tsc'), '-p', join(ROOT, 'tsconfig.build.json'), '--outDir', dir, '--sourceMap', 'false'], {
    cwd: ROOT,
    maxBuffer: 16 * 1024 * 1024,
  }).catch((err: { stdout?: string }) => {
    if (!existsSync(join(dir, 'cli', 'main.js'))) throw new Error(`tsc wrote no CLI: ${err.stdout ?? String(err)}`);
  });
  // Node looks for "type": "module" no higher than node_modules, so the folder states it itself.
  writeFileSync(join(dir, 'package.json'), '{ "type": "module", "private": true }\n');
  writeFileSync(join(dir, 'run.js'), "import('./cli/main.js').then((m) => m.main(process.argv.slice(2))).then((code) => process.exit(code));\n");
  return { dir, remove: () => rmSync(dir, { recursive: true, force: true }) };
}

/** Copies a config, adding the shared state in PostgreSQL with the given settings. */
export function withSharedState(configPath: string, outPath: string, state: Record<string, unknown>): void {
  const doc = parseDocument(readFileSync(configPath, 'utf8'));
  doc.setIn(['conversation', 'state'], doc.createNode(state));
  writeFileSync(outPath, doc.toString());
}

export interface Replica {
  name: string;
  /** The local channel's base URL, without the trailing slash. */
  url: string;
  child: ChildProcess;
  /** How the audit log names it ("host:pid"). */
  replicaName: string;
  stderr: () => string;
  stdout: () => string;
  /** Peak resident memory so far (Linux VmHWM), in KiB. */
  peakRssKb: () => number | null;
  stop: () => Promise<void>;
}

export async function startReplica(build: string, name: string, configPath: string, env: Record<string, string>, args: string[] = []): Promise<Replica> {
  const childEnv: NodeJS.ProcessEnv = {};
  // Only the local channel: chat tokens stay out of the child's environment.
  for (const [k, v] of Object.entries(process.env)) if (!/^(SLACK|DISCORD)_/.test(k)) childEnv[k] = v;
  Object.assign(childEnv, { THREADCOUNT_HOST: '127.0.0.1', THREADCOUNT_PORT: '0', ...env });
  const child = spawn(process.execPath, [join(build, 'run.js'), 'serve', '--config', configPath, ...args], { env: childEnv, stdio: ['ignore', 'pipe', 'pipe'] });
  let stderr = '';
  let stdout = '';
  child.stderr!.on('data', (c: Buffer) => (stderr += c.toString()));
  child.stdout!.on('data', (c: Buffer) => (stdout += c.toString()));
  const url = await new Promise<string>((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`replica ${name} did not start within 60 s: ${stderr}`)), 60_000);
    child.stdout!.on('data', () => {
      const m = /Local channel: (http:\/\/127\.0\.0\.1:\d+)\//.exec(stdout);
      if (m) {
        clearTimeout(timer);
        resolve(m[1]!);
      }
    });
    child.once('exit', (code, signal) => {
      clearTimeout(timer);
      reject(new Error(`replica ${name} exited (${code ?? signal}) before it listened: ${stderr}`));
    });
  });
  return {
    name,
    url,
    child,
    replicaName: `${(await import('node:os')).hostname()}:${child.pid}`,
    stderr: () => stderr,
    stdout: () => stdout,
    peakRssKb: () => peakRssKb(child.pid),
    stop: () => stopChild(child, 20_000),
  };
}

/** Runs the CLI once to its end (a command that is expected to exit by itself). */
export async function runCli(build: string, args: string[], env: Record<string, string> = {}, timeoutMs = 120_000): Promise<{ code: number | null; stdout: string; stderr: string }> {
  const childEnv: NodeJS.ProcessEnv = {};
  for (const [k, v] of Object.entries(process.env)) if (!/^(SLACK|DISCORD|THREADCOUNT)_/.test(k)) childEnv[k] = v;
  Object.assign(childEnv, { THREADCOUNT_PORT: '0', ...env });
  const child = spawn(process.execPath, [join(build, 'run.js'), ...args], { env: childEnv, stdio: ['ignore', 'pipe', 'pipe'] });
  let stdout = '';
  let stderr = '';
  child.stdout!.on('data', (c: Buffer) => (stdout += c.toString()));
  child.stderr!.on('data', (c: Buffer) => (stderr += c.toString()));
  const code = await new Promise<number | null>((resolve) => {
    const timer = setTimeout(() => child.kill('SIGKILL'), timeoutMs);
    child.once('exit', (c) => {
      clearTimeout(timer);
      resolve(c);
    });
  });
  return { code, stdout, stderr };
}

/** A call to a replica's local channel API: GET, or POST of a JSON body; the status and the parsed reply. */
export async function replicaApi<T>(r: Replica, path: string, body?: unknown): Promise<{ status: number; json: T }> {
  const res = await fetch(`${r.url}${path}`, body ? { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(body) } : {});
  return { status: res.status, json: (await res.json()) as T };
}

/** Polls replicas gently: they share two cores with the rest of the suite, and a run can take minutes there. */
export function pollReplica<T>(what: string, check: () => Promise<T | undefined>, timeoutMs = 180_000, everyMs = 100): Promise<T> {
  return waitFor(what, check, timeoutMs, everyMs);
}

/** The CLI built, a demo dataset of 5,000 rows in a folder of the test's own, and the replicas it started. */
export interface DemoServeFixture {
  readonly dir: string;
  readonly configPath: string;
  readonly buildDir: string;
  /** Starts `serve` on the demo with extra environment and arguments; stopped after the tests unless forgotten first. */
  start(env: Record<string, string>, args: string[]): Promise<Replica>;
  /** The replica has stopped (or was killed): no longer stopped after the tests. */
  forget(r: Replica): void;
}

/** Registers beforeAll/afterAll hooks in the calling describe block: build and demo before, replicas stopped after. */
export function demoServeFixture(tmpPrefix: string): DemoServeFixture {
  let build: Awaited<ReturnType<typeof buildCli>> | undefined;
  let dir = '';
  let configPath = '';
  const running: Replica[] = [];
  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), tmpPrefix));
    const [built, demo] = await Promise.all([buildCli(), generateDemo({ outDir: join(dir, 'demo'), rows: 5000 })]);
    build = built;
    configPath = demo.configPath;
  });
  afterAll(async () => {
    await Promise.all(running.map((r) => r.stop()));
    build?.remove();
  });
  return {
    get dir() {
      return dir;
    },
    get configPath() {
      return configPath;
    },
    get buildDir() {
      if (!build) throw new Error('the CLI is built in beforeAll');
      return build.dir;
    },
    async start(env, args) {
      const r = await startReplica(this.buildDir, 'serve', configPath, env, args);
      running.push(r);
      return r;
    },
    forget(r) {
      const i = running.indexOf(r);
      if (i >= 0) running.splice(i, 1);
    },
  };
}
