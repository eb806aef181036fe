// Replicas as real processes: the CLI compiled with tsc into a folder of this test's own (not
// dist/, which the benchmark uses), and `threadcount serve` started from it as child processes.
import { execFile, spawn, type ChildProcess } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { promisify } from 'node:util';
import { parseDocument } from 'yaml';
import { peakRssKb, stopChild } from '../../bench/child-process.js';

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
