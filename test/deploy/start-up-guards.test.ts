// `threadcount serve` as a real process refuses to start where it would be unsafe or would lose
// data: on a non-loopback address without an access token (as the Docker image runs it, on
// 0.0.0.0), and on a damaged state file, which it leaves exactly as it found it. A backup made
// with `threadcount state backup` restores the conversations.
import { createHash } from 'node:crypto';
import { readFileSync, statSync, truncateSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import type { LocalMessage } from '../../adapters/local-channel/local-thread-log.js';
import { SERVE_ALLOCATOR_ENV } from '../../cli/allocator.js';
import { demoServeFixture, runCli, type Replica } from './replica-process.js';

const TOKEN = 'docker-style-token-0123456789abcdef';

describe('serve refuses to start where it would be unsafe or lose data', () => {
  const fx = demoServeFixture('tc-guards-');

  async function start(env: Record<string, string>, args: string[]): Promise<Replica> {
    return fx.start(env, args);
  }
  async function stop(r: Replica): Promise<void> {
    await r.stop();
    fx.forget(r);
  }

  it('on 0.0.0.0 (the Docker image\'s setting) without a token: refused, naming the variable; with one, an API call without it gets 401', async () => {
    // The image's own environment, as its Dockerfile sets it: listening beyond loopback, and no token baked in.
    const imageEnv = dockerfileEnv(readFileSync(new URL('../../Dockerfile', import.meta.url), 'utf8'));
    expect(imageEnv.THREADCOUNT_HOST).toBe('0.0.0.0');
    expect(imageEnv.THREADCOUNT_ACCESS_TOKEN).toBeUndefined();
    const state = join(fx.dir, 'exposed.duckdb');
    const refused = await runCli(fx.buildDir, ['serve', '--config', fx.configPath, '--state', state], imageEnv);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toMatch(/THREADCOUNT_ACCESS_TOKEN/);
    expect(refused.stderr).toMatch(/THREADCOUNT_HOST=0\.0\.0\.0/);
    expect(refused.stdout).not.toMatch(/Local channel:/);
    // The image sets glibc's allocator before start (cli/allocator.ts), so serve has nothing to say of it;
    // started without those settings, it names each one to set.
    for (const [name, value] of Object.entries(SERVE_ALLOCATOR_ENV)) expect(imageEnv[name]).toBe(value);
    expect(refused.stderr).not.toMatch(/MALLOC_/);
    const { MALLOC_ARENA_MAX: _a, MALLOC_MMAP_THRESHOLD_: _m, MALLOC_TRIM_THRESHOLD_: _t, ...withoutAllocator } = imageEnv;
    // runCli passes this process's environment on: none of the settings may come from there either.
    const inherited = Object.keys(SERVE_ALLOCATOR_ENV).map((name) => [name, process.env[name]] as const);
    for (const [name] of inherited) delete process.env[name];
    const bare = await runCli(fx.buildDir, ['serve', '--config', fx.configPath, '--state', state], withoutAllocator).finally(() => {
      for (const [name, value] of inherited) if (value !== undefined) process.env[name] = value;
    });
    expect(bare.code).toBe(2);
    expect(bare.stderr).toMatch(/MALLOC_ARENA_MAX=2 MALLOC_MMAP_THRESHOLD_=131072 MALLOC_TRIM_THRESHOLD_=131072/);

    const r = await start({ THREADCOUNT_HOST: '0.0.0.0', THREADCOUNT_ACCESS_TOKEN: TOKEN }, ['--state', state]);
    const without = await fetch(`${r.url}/api/threads`);
    expect(without.status).toBe(401);
    expect((await fetch(`${r.url}/api/threads`, { headers: { authorization: `Bearer ${TOKEN}` } })).status).toBe(200);
    expect((await fetch(`${r.url}/`, { redirect: 'manual' })).status).toBe(303);
    await stop(r);
  }, 600_000);

  it('a truncated state file stops serve with a clear message and is left as it was; a backup restores it', async () => {
    const state = join(fx.dir, 'state.duckdb');
    let r = await start({}, ['--state', state]);
    const created = await fetch(`${r.url}/api/threads`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ author: 'maren', text: 'How has revenue moved over time?' }) });
    const { threadId } = (await created.json()) as { threadId: string };
    const asked = async () => ((await (await fetch(`${r.url}/api/threads/${threadId}`)).json()) as { messages: LocalMessage[] }).messages;
    // The brief card: it waits for "go" or a correction.
    for (let i = 0; i < 200 && !(await asked()).some((m) => m.fromBot && m.quickReplies?.length); i++) await new Promise((resolve) => setTimeout(resolve, 100));
    const before = await asked();
    expect(before.at(-1)!.quickReplies?.length).toBeGreaterThan(0);
    await stop(r);

    const backup = join(fx.dir, 'backup.duckdb');
    const made = await runCli(fx.buildDir, ['state', 'backup', '--config', fx.configPath, '--state', state, '--out', backup]);
    expect(made.code, made.stderr).toBe(0);
    // A backup never overwrites.
    expect((await runCli(fx.buildDir, ['state', 'backup', '--config', fx.configPath, '--state', state, '--out', backup])).code).toBe(2);

    truncateSync(state, Math.floor(statSync(state).size / 2));
    const hash = () => createHash('sha256').update(readFileSync(state)).digest('hex');
    const damaged = hash();
    const refused = await runCli(fx.buildDir, ['serve', '--config', fx.configPath, '--state', state]);
    expect(refused.code).toBe(4);
    expect(refused.stderr).toMatch(/the state file .*state\.duckdb is damaged and was left as it is/);
    expect(refused.stderr).toMatch(/threadcount state restore --from FILE/);
    expect(refused.stdout).not.toMatch(/Local channel:/);
    expect(hash()).toBe(damaged);
    const checked = await runCli(fx.buildDir, ['state', 'check', '--config', fx.configPath, '--state', state]);
    expect(checked.code).toBe(4);
    expect(hash()).toBe(damaged);

    const restored = await runCli(fx.buildDir, ['state', 'restore', '--config', fx.configPath, '--state', state, '--from', backup]);
    expect(restored.code, restored.stderr).toBe(0);
    expect(restored.stdout).toMatch(/replaced-/);
    r = await start({}, ['--state', state]);
    // The thread is as it was, still waiting on its card, and "go" moves it on.
    expect((await asked()).map((m) => m.id)).toEqual(before.map((m) => m.id));
    await fetch(`${r.url}/api/threads/${threadId}/messages`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ author: 'maren', text: 'go' }) });
    for (let i = 0; i < 200 && (await asked()).length <= before.length + 1; i++) await new Promise((resolve) => setTimeout(resolve, 100));
    expect((await asked()).length).toBeGreaterThan(before.length + 1);
    await stop(r);
  }, 600_000);
});

/** The ENV lines of a Dockerfile (the `ENV NAME=value` form it uses). */
function dockerfileEnv(text: string): Record<string, string> {
  const env: Record<string, string> = {};
  for (const m of text.matchAll(/^ENV\s+([A-Z_][A-Z0-9_]*)=(\S*)\s*$/gm)) env[m[1]!] = m[2]!;
  return env;
}
