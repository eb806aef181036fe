// Access control: which datasets a channel may use (the config's `access` rules), which of them a
// request is about, the refusal for a channel with none, and a thread that keeps its dataset.
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import pLimit from 'p-limit';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parse, stringify } from 'yaml';
import type { Workspace } from '../../analysis/workspace.js';
import { allowedDatasets, channelKey, chooseDataset, globMatches } from '../../bot/access.js';
import { Bot } from '../../bot/Bot.js';
import { presentAnswer, presentSummary } from '../../bot/present-answer.js';
import { playScriptedConversation } from '../../bot/scripted-conversation.js';
import { MemoryStateStore } from '../../bot/stores/MemoryStateStore.js';
import { closeWorkspaces, openWorkspaces } from '../../cli/workspaces.js';
import { ConfigError, loadConfig, parseConfigText, type LoadedConfig } from '../../config/load.js';
import type { AccessConfig } from '../../config/schema.js';
import { demoFixture } from '../helpers/demo-fixture.js';
import { EXAMPLE_CONFIG_PATH } from '../helpers/example-config.js';
import { RecordingPort } from '../helpers/recording-port.js';

const NO_DATASET = 'This channel has no dataset it may use; ask your data team to add it in the config.';

describe('channel rules', () => {
  it('globs match the whole key: * any run of characters, ? one, nothing else special', () => {
    expect(globMatches('slack:C0123*', 'slack:C0123ABC')).toBe(true);
    expect(globMatches('slack:C0123*', 'slack:C0123')).toBe(true);
    expect(globMatches('slack:C0123*', 'slack:C0124ABC')).toBe(false);
    expect(globMatches('slack:C0123*', 'xslack:C0123')).toBe(false);
    expect(globMatches('local', 'local')).toBe(true);
    expect(globMatches('local', 'local:abc')).toBe(false);
    expect(globMatches('discord:*:555', 'discord:111:555')).toBe(true);
    expect(globMatches('discord:*:555', 'discord:111:5556')).toBe(false);
    expect(globMatches('slack:C?', 'slack:C1')).toBe(true);
    expect(globMatches('slack:C?', 'slack:C12')).toBe(false);
    expect(globMatches('*', '')).toBe(true);
    expect(globMatches('a*b*c', 'aXXbYYbZc')).toBe(true);
    // Regular-expression characters are plain characters.
    expect(globMatches('slack:C.1', 'slack:CX1')).toBe(false);
    expect(globMatches('slack:[C]1', 'slack:[C]1')).toBe(true);
  });

  it('the first matching rule decides; unmatched channels get the default; no section allows all', () => {
    const access: AccessConfig = {
      channels: [
        { match: 'slack:CFIN*', datasets: ['refunds'] },
        { match: 'slack:*', datasets: ['bookings'] },
        { match: 'local', datasets: ['bookings', 'refunds'] },
      ],
      default_datasets: [],
    };
    const all = ['bookings', 'refunds'];
    expect(allowedDatasets(access, all, 'slack:CFIN01')).toEqual(['refunds']);
    expect(allowedDatasets(access, all, 'slack:COPS')).toEqual(['bookings']);
    expect(allowedDatasets(access, all, 'local')).toEqual(['bookings', 'refunds']);
    expect(allowedDatasets(access, all, 'discord:1:2')).toEqual([]);
    expect(allowedDatasets({ ...access, default_datasets: ['refunds'] }, all, 'discord:1:2')).toEqual(['refunds']);
    // The config's dataset order, whatever order a rule lists them in.
    expect(allowedDatasets({ channels: [{ match: '*', datasets: ['refunds', 'bookings'] }], default_datasets: [] }, all, 'x')).toEqual(all);
    expect(allowedDatasets(undefined, all, 'anything')).toEqual(all);
  });

  it('reads the channel key from the message, or from the thread id when the adapter gave none', () => {
    expect(channelKey({ threadId: 'slack:C1:1.2', channel: 'slack:C1' })).toBe('slack:C1');
    expect(channelKey({ threadId: 'slack:C0123:1700000000.000100' })).toBe('slack:C0123');
    expect(channelKey({ threadId: 'local:abc' })).toBe('local');
    expect(channelKey({ threadId: 'discord:42' })).toBe('discord');
    expect(channelKey({ threadId: 'cli-thread' })).toBe('cli-thread');
  });
});

describe('the access section of the config', () => {
  const base = readFileSync(EXAMPLE_CONFIG_PATH, 'utf8');
  const problems = (text: string) => {
    try {
      parseConfigText(text, 'threadcount.yaml');
    } catch (err) {
      if (err instanceof ConfigError) return err.problems;
      throw err;
    }
    return [];
  };

  it('accepts rules and a default', () => {
    const c = parseConfigText(`${base}\naccess:\n  channels:\n    - match: "slack:C0123*"\n      datasets: [bookings]\n  default_datasets: [bookings]\n`, 'threadcount.yaml');
    expect(c.access).toEqual({ channels: [{ match: 'slack:C0123*', datasets: ['bookings'] }], default_datasets: ['bookings'] });
  });

  it('names the line of a dataset the file does not define, and of an unknown key', () => {
    const text = `${base}\naccess:\n  channels:\n    - match: local\n      datasets: [bookings, refunds]\n`;
    const line = text.split('\n').findIndex((l) => l.includes('datasets: [bookings, refunds]')) + 1;
    expect(problems(text)).toEqual([
      { file: 'threadcount.yaml', line, key: 'access.channels[0].datasets[1]', message: expect.stringMatching(/names dataset "refunds", which is not in this file's datasets \(bookings\)/) },
    ]);
    const typo = `${base}\naccess:\n  channel: []\n`;
    const typoLine = typo.split('\n').findIndex((l) => l.startsWith('  channel:')) + 1;
    expect(problems(typo)).toEqual([expect.objectContaining({ line: typoLine, key: 'access.channel' })]);
    expect(problems(`${base}\naccess:\n  channels:\n    - datasets: [bookings]\n`)).toEqual([expect.objectContaining({ key: 'access.channels[0].match' })]);
  });
});

describe('a bot on two datasets with access rules (demo data)', () => {
  let config: LoadedConfig;
  let workspaces: Map<string, Workspace>;
  const now = new Date('2026-12-01T09:00:00Z');
  const access: AccessConfig = {
    channels: [
      { match: 'slack:COPS*', datasets: ['bookings'] },
      { match: 'local', datasets: ['bookings', 'refunds'] },
    ],
    default_datasets: [],
  };

  beforeAll(async () => {
    const demo = await demoFixture();
    // Two datasets over the demo table: the full catalog, and a refunds-only one.
    const raw = parse(readFileSync(demo.configPath, 'utf8')) as { datasets: Record<string, unknown>[] } & Record<string, unknown>;
    const bookings: Record<string, unknown> = { ...raw.datasets[0]!, source: { kind: 'duckdb', path: demo.databasePath } };
    const metrics = (bookings.metrics as { name: string }[]).filter((m) => ['refund_rate', 'refunded_amount'].includes(m.name));
    const refunds = { ...bookings, name: 'refunds', label: 'Skerrywake refunds', metrics, comparison_groups: [] };
    const dir = mkdtempSync(join(tmpdir(), 'threadcount-access-'));
    writeFileSync(join(dir, 'threadcount.yaml'), stringify({ ...raw, datasets: [bookings, refunds], access }));
    config = loadConfig(join(dir, 'threadcount.yaml'));
    workspaces = await openWorkspaces(config, {});
  });
  afterAll(async () => {
    await closeWorkspaces(workspaces);
  });

  const newBot = (store = new MemoryStateStore(), port = new RecordingPort(), rules: AccessConfig = access) => ({
    bot: new Bot({ workspaces, access: rules, port, store, now: () => now, presentAnswer, presentSummary, jobs: pLimit(2) }),
    store,
    port,
  });

  it('chooses by the catalog the request names: its own name first, then metrics and dimensions', () => {
    const ds = [...workspaces.values()].map((w) => w.dataset);
    expect(chooseDataset('How has revenue moved over time?', ds)).toMatchObject({ kind: 'chosen', dataset: { name: 'bookings' } });
    expect(chooseDataset('In the refunds data, how has the refund rate moved?', ds)).toMatchObject({ kind: 'chosen', dataset: { name: 'refunds' } });
    // Both catalogs have the refund rate: a tie is asked.
    expect(chooseDataset('How has the refund rate moved?', ds)).toMatchObject({ kind: 'ask', matched: true });
    expect(chooseDataset('How have things moved over time?', ds)).toMatchObject({ kind: 'ask', matched: false, ranked: [{ name: 'bookings' }, { name: 'refunds' }] });
  });

  it('a channel with no dataset gets the refusal, and nothing runs or is kept', async () => {
    const { bot, store, port } = newBot();
    await bot.handle({ threadId: 'discord:9', author: 'ana', text: 'How has revenue moved over time?', channel: 'discord:1:2' });
    await bot.idle();
    expect(port.messages.map((m) => m.text)).toEqual([NO_DATASET]);
    expect(await store.get('discord:9')).toBeUndefined();
    const audit = await store.listAudit();
    expect(audit.map((e) => e.kind)).toEqual(['request', 'denied', 'post']);
    expect(audit[1]).toMatchObject({ channel: 'discord:1:2', requester: 'ana', detail: { reason: 'no_dataset' } });
    // "What can you measure" there is refused too.
    await bot.handle({ threadId: 'discord:10', author: 'ana', text: 'what can you measure?', channel: 'discord:1:2' });
    expect(port.messages.at(-1)!.text).toBe(NO_DATASET);
  });

  it('a channel with one dataset uses it whatever the request says, and the thread keeps it', async () => {
    const { bot, store, port } = newBot();
    await bot.handle({ threadId: 'slack:COPS1:1.1', author: 'ana', text: 'In the refunds data, how has the refund rate moved over time?', channel: 'slack:COPS1' });
    const state = (await store.get('slack:COPS1:1.1'))!;
    expect(state).toMatchObject({ dataset: 'bookings', channel: 'slack:COPS1' });
    // One dataset allowed: the brief card does not name it.
    expect(port.messages[0]!.text).toMatch(/^\*Here is what I understood\.\*/);
    expect(port.messages[0]!.text).not.toMatch(/Using Skerrywake/);
  });

  it('a channel with both: the request\'s terms choose, and the acknowledgement says which', async () => {
    const { bot, store, port } = newBot();
    await bot.handle({ threadId: 'local:a', author: 'ana', text: 'How has revenue moved over time?', channel: 'local' });
    expect((await store.get('local:a'))!.dataset).toBe('bookings');
    expect(port.messages[0]!.text).toMatch(/^\*Here is what I understood\.\*/);
    expect(port.messages[0]!.text).toMatch(/^Using Skerrywake bookings: its catalog has the most of the terms in your request\.$/m);
  });

  it('asks which dataset when the request does not settle it, then uses the answer for the whole thread', async () => {
    const { bot, store, port } = newBot();
    const end = await playScriptedConversation({
      bot,
      store,
      threadId: 'local:b',
      requester: 'ana',
      channel: 'local',
      request: 'How have things moved over time? For my team, no deadline.',
      answers: { dataset: '2', metrics: 'refund rate', grain: 'month', window: 'all' },
    });
    expect(end).toBe('done');
    const topics = port.messages.map((m) => m.promptTopic).filter(Boolean);
    expect(topics[0]).toBe('dataset');
    expect(port.messages[0]!.text).toMatch(/^This channel may use several datasets\. Which one is the request about\?\n1\. Skerrywake bookings\n2\. Skerrywake refunds/);
    expect((await store.get('local:b'))!.dataset).toBe('refunds');
    // The metrics prompt lists the refunds catalog only.
    const metricsPrompt = port.messages.find((m) => m.promptTopic === 'metrics')!;
    expect(metricsPrompt.text).toMatch(/1\. Refund rate\n2\. Refunded amount\nRecommended/);
    // Every query ran on the chosen dataset.
    const sql = (await store.listAudit()).filter((e) => e.kind === 'sql');
    expect(sql.length).toBeGreaterThan(0);
    expect(new Set(sql.map((e) => e.detail.dataset))).toEqual(new Set(['refunds']));
  });

  it('a typed answer that names no dataset is re-asked with the choices', async () => {
    const { bot, port } = newBot();
    await bot.handle({ threadId: 'local:c', author: 'ana', text: 'How have things moved?', channel: 'local' });
    await bot.handle({ threadId: 'local:c', author: 'ana', text: 'the weather one', channel: 'local' });
    expect(port.messages.at(-1)!.text).toMatch(/^I couldn't match "the weather one" to a dataset\. Choose one of: Skerrywake bookings, Skerrywake refunds\./);
    await bot.handle({ threadId: 'local:c', author: 'ana', text: 'refunds', channel: 'local' });
    // The request names no measure: asked next, after saying which dataset is used.
    expect(port.messages.at(-1)!.text).toMatch(/^Using Skerrywake refunds\./);
    expect(port.messages.at(-1)!.promptTopic).toBe('metrics');
  });

  it('when the rules change, a thread whose dataset the channel lost is refused on its next message', async () => {
    const store = new MemoryStateStore();
    const port = new RecordingPort();
    await newBot(store, port).bot.handle({ threadId: 'local:d', author: 'ana', text: 'How has revenue moved over time?', channel: 'local' });
    const stricter: AccessConfig = { channels: [{ match: 'local', datasets: ['refunds'] }], default_datasets: [] };
    const { bot } = newBot(store, port, stricter);
    await bot.handle({ threadId: 'local:d', author: 'ana', text: 'managers', channel: 'local' });
    expect(port.messages.at(-1)!.text).toBe('This request uses Skerrywake bookings, which this channel may no longer use; nothing more will run here. Ask your data team if that is a mistake.');
    expect((await store.listAudit()).filter((e) => e.kind === 'denied').map((e) => e.detail.reason)).toEqual(['dataset_not_allowed']);
  });
});
