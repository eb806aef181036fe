// Discord: a real discord.js Client whose REST calls go to a fake Discord API on 127.0.0.1 and
// whose gateway events arrive as raw dispatch packets; the real bot answers on the demo data.
// Packets are handed to the client's packet handler, an internal API: discord.js is pinned exactly.
import { Status, type Client } from 'discord.js';
import pLimit from 'p-limit';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { discordMessage, discordMessages } from '../../adapters/discord/discord-components.js';
import { toDiscordMarkdown } from '../../adapters/discord/discord-text.js';
import { DiscordAdapter } from '../../adapters/discord/DiscordAdapter.js';
import { ThreadInbox } from '../../adapters/ThreadInbox.js';
import { openWorkspace, type Workspace } from '../../analysis/workspace.js';
import { Bot } from '../../bot/Bot.js';
import type { IncomingMessage } from '../../bot/port.js';
import { presentAnswer, presentSummary } from '../../bot/present-answer.js';
import { MemoryStateStore } from '../../bot/stores/MemoryStateStore.js';
import { loadConfig } from '../../config/load.js';
import { agreedCardPost, briefCardPost, CARD_TEXT, correctedCardPost } from '../helpers/brief-card-post.js';
import { demoFixture } from '../helpers/demo-fixture.js';
import { BOT_USER, FakeDiscordApi, type ApiCall } from '../helpers/fake-discord-api.js';
import { expectBundleHoldsThread } from '../helpers/thread-bundle.js';
import { waitFor } from '../helpers/wait-for.js';

const GUILD = '800000000000000001';
const CHANNEL = '800000000000000002';
const APP = '900000000000000009';
const MAREN = { id: '700000000000000001', username: 'maren', discriminator: '0', avatar: null, global_name: 'Maren' };
const REQUEST = 'How has revenue moved over time, month by month? We want to see the busiest and quietest months.';
const TOKEN = 'OTAwMDAwMDAwMDAwMDAwMDAx.GabcDE.fakefakefakefakefakefakefakefakefakefake';

let ws: Workspace;
let api: FakeDiscordApi;
let adapter: DiscordAdapter;
let inbox: ThreadInbox;
const delivered: IncomingMessage[] = [];
let seq = 1;

/** Hands a gateway dispatch packet to the client, as its WebSocket shard would. */
function dispatch(client: Client, t: string, d: unknown): void {
  const shard = { id: 0, checkReady: () => undefined };
  (client.ws as unknown as { handlePacket(p: unknown, s: unknown): boolean }).handlePacket({ op: 0, t, d, s: seq++ }, shard);
}

const member = { roles: [], joined_at: '2024-01-01T00:00:00.000Z', deaf: false, mute: false, flags: 0 };

function userMessage(channelId: string, content: string, mentions: unknown[] = []): Record<string, unknown> {
  return {
    id: api.snowflake(),
    channel_id: channelId,
    guild_id: GUILD,
    author: MAREN,
    member,
    content,
    timestamp: new Date().toISOString(),
    edited_timestamp: null,
    tts: false,
    mention_everyone: false,
    mentions,
    mention_roles: [],
    attachments: [],
    embeds: [],
    components: [],
    pinned: false,
    type: 0,
    flags: 0,
  };
}

function click(threadId: string, message: ApiCall, data: Record<string, unknown>): void {
  dispatch(adapter.client, 'INTERACTION_CREATE', {
    id: api.snowflake(),
    application_id: APP,
    type: 3,
    token: `tok-${seq}`,
    version: 1,
    guild_id: GUILD,
    channel_id: threadId,
    channel: { id: threadId, type: 11, guild_id: GUILD, parent_id: CHANNEL, name: 'request' },
    member: { ...member, user: MAREN, permissions: '2248473465835073' },
    message: message.answer,
    data,
    app_permissions: '2248473465835073',
    locale: 'en-GB',
    guild_locale: 'en-GB',
    entitlements: [],
    authorizing_integration_owners: { '0': GUILD },
    context: 0,
    attachment_size_limit: 26_214_400,
  });
}

beforeAll(async () => {
  ws = await openWorkspace(loadConfig((await demoFixture()).configPath));
  api = new FakeDiscordApi(GUILD);
  const restApi = await api.start();
  const store = new MemoryStateStore();
  adapter = new DiscordAdapter({
    token: TOKEN,
    restApi,
    now: () => new Date('2026-12-04T10:00:00Z'),
    deliver: (m) => {
      delivered.push(m);
      inbox.deliver(m);
    },
    knows: async (id) => (await store.get(id)) !== undefined,
    log: (line) => {
      throw new Error(line);
    },
  });
  const bot = new Bot({ workspace: ws, port: adapter, store, now: () => new Date('2026-12-01T09:00:00Z'), presentAnswer, presentSummary, jobs: pLimit(2) });
  inbox = new ThreadInbox((m) => bot.handle(m), (err) => {
    throw err;
  });

  // No login: the gateway session is played by packets. READY sets the bot user; the guild and
  // its channel must be cached before any MESSAGE_CREATE, or discord.js drops the message.
  const client = adapter.client;
  (client.ws as unknown as { status: number }).status = Status.Ready;
  dispatch(client, 'READY', { v: 10, user: BOT_USER, guilds: [{ id: GUILD, unavailable: true }], session_id: 's', resume_gateway_url: 'wss://gateway.invalid', application: { id: APP, flags: 0 }, shard: [0, 1] });
  dispatch(client, 'GUILD_CREATE', {
    id: GUILD,
    name: 'Skerrywake Ferries',
    icon: null,
    owner_id: MAREN.id,
    unavailable: false,
    member_count: 2,
    large: false,
    joined_at: '2024-01-01T00:00:00.000Z',
    roles: [{ id: GUILD, name: '@everyone', permissions: '2248473465835073', position: 0, color: 0, hoist: false, managed: false, mentionable: false, flags: 0 }],
    channels: [{ id: CHANNEL, type: 0, name: 'data-requests', guild_id: GUILD, position: 0, permission_overwrites: [], parent_id: null, nsfw: false, rate_limit_per_user: 0 }],
    threads: [],
    members: [],
    emojis: [],
    stickers: [],
    features: [],
    presences: [],
    voice_states: [],
    stage_instances: [],
    guild_scheduled_events: [],
    soundboard_sounds: [],
    preferred_locale: 'en-GB',
    premium_tier: 0,
    nsfw_level: 0,
  });
});

afterAll(async () => {
  await inbox?.idle();
  await adapter?.stop();
  await api?.stop();
  await ws?.source.close();
});

let threadId = '';
let cardRef = '';

describe('Discord adapter', () => {
  it('opens a thread on the mentioning message and answers in it', async () => {
    dispatch(adapter.client, 'MESSAGE_CREATE', userMessage(CHANNEL, `<@${BOT_USER.id}> ${REQUEST}`, [BOT_USER]));
    const started = await waitFor('a thread to be started', () => api.calls.find((c) => c.method === 'POST' && /^\/channels\/\d+\/messages\/\d+\/threads$/.test(c.path)));
    expect(started.path).toMatch(new RegExp(`^/channels/${CHANNEL}/messages/\\d+/threads$`));
    expect(started.body).toMatchObject({ name: REQUEST, auto_archive_duration: 1440 });
    threadId = String(started.answer!.id);
    // The fake records the call when it arrives; the adapter delivers once the thread is returned.
    expect(await waitFor('the request delivered', () => delivered[0])).toEqual({ threadId: `discord:${threadId}`, author: MAREN.id, text: REQUEST, channel: `discord:${GUILD}:${CHANNEL}` });
    const first = await waitFor('the first reply', () => api.messagesIn(threadId)[0]);
    // The brief card is the first reply (the request names its measure: nothing to ask first).
    expect(first.body.content).toMatch(/^\*\*Here is what I understood\.\*\*/);
    // Nothing is posted in the channel itself.
    expect(api.messagesIn(CHANNEL)).toHaveLength(0);
  });

  it('asks with buttons, takes clicks, and reads a typed "go" in the thread', async () => {
    const answered = new Set<ApiCall>();
    for (let turn = 0; turn < 10; turn++) {
      const prompt = await waitFor('a message with components', () => api.messagesIn(threadId).find((c) => (c.body.components as unknown[]).length > 0 && !answered.has(c)));
      answered.add(prompt);
      const rows = prompt.body.components as { type: number; components: { type: number; custom_id: string; label?: string; style?: number }[] }[];
      const buttons = rows.flatMap((r) => r.components).filter((c) => c.type === 2);
      // A long card's first part carries only its selects; Go and Cancel come with the last.
      if (buttons.length === 0) continue;
      if (buttons.some((b) => b.custom_id === 'tc:q:go' || b.custom_id === 'tc:k:go')) {
        expect(buttons.map((b) => b.label)).toEqual(['Go: run it', 'Cancel']);
        dispatch(adapter.client, 'MESSAGE_CREATE', userMessage(threadId, 'go'));
        break;
      }
      expect(rows).toHaveLength(1);
      // The recommendation is shown once: the one primary button among the options, no "Use recommended".
      const recommended = buttons.filter((b) => b.style === 1);
      expect(recommended).toHaveLength(1);
      expect(recommended[0]!.custom_id).toMatch(/^tc:r:/);
      expect(buttons.map((b) => b.label)).not.toContain('Use recommended');
      expect(buttons.filter((b) => b !== recommended[0]).every((b) => b.custom_id.startsWith('tc:v:') && b.style === 2)).toBe(true);
      // The numbered options live in the buttons, not in the text.
      expect(prompt.body.content).not.toMatch(/^1\. /m);
      const callbacks = api.calls.filter((c) => c.path.startsWith('/interactions/')).length;
      const before = delivered.length;
      click(threadId, prompt, { custom_id: recommended[0]!.custom_id, component_type: 2 });
      const callback = await waitFor('the interaction answered', () => api.calls.filter((c) => c.path.startsWith('/interactions/'))[callbacks]);
      // Type 7 updates the prompt in place: its components go, who chose what is added, by its label.
      expect(callback.body).toMatchObject({ type: 7, data: { components: [] } });
      expect(String((callback.body.data as { content: string }).content)).toContain(`<@${MAREN.id}> chose **${recommended[0]!.label}**`);
      // Delivered as the value, with the label the requester clicked (issue 17 item 4).
      const delivery = await waitFor('the click delivered', () => delivered[before]);
      expect(delivery).toMatchObject({ text: recommended[0]!.custom_id.slice('tc:r:'.length), label: recommended[0]!.label });
    }
    await waitFor('the typed go', () => delivered.find((d) => d.text === 'go'));
    expect(delivered.every((d) => d.threadId === `discord:${threadId}`)).toBe(true);
    // Replies in the thread (typed or clicked) carry the channel the thread was opened in, for the access rules.
    expect(delivered.filter((d) => d.threadId === `discord:${threadId}`).map((d) => d.channel)).not.toContain(undefined);
  });

  it('attaches charts, tables and SQL as files, and edits the progress message', async () => {
    await waitFor('the summary', () => api.messagesIn(threadId).find((c) => String(c.body.content).startsWith('**Summary**')), 120_000);
    await inbox.idle();
    const withFiles = api.messagesIn(threadId).filter((c) => c.files.length > 0);
    expect(withFiles.length).toBeGreaterThan(0);
    const chartPost = withFiles.find((c) => c.files.some((f) => f.name.endsWith('.png')))!;
    const png = chartPost.files.find((f) => f.name.endsWith('.png'))!;
    expect(png.field).toMatch(/^files\[\d+\]$/);
    expect(png.bytes.subarray(1, 4).toString('latin1')).toBe('PNG');
    expect(png.bytes.readUInt32BE(16)).toBe(1200);
    expect(chartPost.files.map((f) => f.name)).toEqual(expect.arrayContaining([expect.stringMatching(/\.csv$/), expect.stringMatching(/\.sql$/)]));
    // The multipart payload lists each attachment by the index of its files[n] part; a chart carries alt text.
    const listed = chartPost.body.attachments as { id: string; description?: string }[];
    expect(listed.map((a) => `files[${a.id}]`)).toEqual(chartPost.files.map((f) => f.field));
    expect(listed[chartPost.files.indexOf(png)]!.description).toMatch(/^Chart: 1\. /);
    expect(String(chartPost.body.content)).toMatch(/^\*\*1\. /);
    const edits = api.calls.filter((c) => c.method === 'PATCH' && c.path.startsWith(`/channels/${threadId}/messages/`));
    expect(String(edits.at(-1)!.body.content)).toMatch(/^All \d+ done\.$/);
  });

  it('attaches one zip of the thread after the summary, holding every file the thread posted', async () => {
    const zipPost = await waitFor('the zip', () => api.messagesIn(threadId).find((c) => c.files.some((f) => f.name.endsWith('.zip'))), 120_000);
    const sent = api.messagesIn(threadId);
    expect(sent.filter((c) => c.files.some((f) => f.name.endsWith('.zip')))).toHaveLength(1);
    expect(String(zipPost.body.content)).toMatch(/^\*\*Everything above in one file\*\*: /);
    expect(sent.indexOf(zipPost)).toBeGreaterThan(sent.findIndex((c) => String(c.body.content).startsWith('**Summary**')));
    const zip = zipPost.files.find((f) => f.name.endsWith('.zip'))!;
    expectBundleHoldsThread(zip.bytes, sent.flatMap((c) => c.files));
  });

  it('offers a select menu for a choice of several, and reads what was selected', async () => {
    dispatch(adapter.client, 'MESSAGE_CREATE', userMessage(CHANNEL, `<@${BOT_USER.id}> How has churn moved over time?`, [BOT_USER]));
    const started = await waitFor('a second thread', () => api.calls.filter((c) => /\/threads$/.test(c.path))[1]);
    const second = String(started.answer!.id);
    const prompt = await waitFor('the metric prompt', () => api.messagesIn(second).find((c) => (c.body.components as unknown[]).length > 0));
    const rows = prompt.body.components as { components: { type: number; custom_id: string; max_values?: number; options?: { value: string }[] }[] }[];
    const select = rows[0]!.components[0]!;
    expect(select).toMatchObject({ type: 3, custom_id: 'tc:select', min_values: 1 });
    expect(select.max_values).toBe(select.options!.length);
    // One click takes the recommendation: a primary button named by it.
    expect(rows[1]!.components[0]).toMatchObject({ type: 2, style: 1, custom_id: expect.stringMatching(/^tc:r:/) });
    expect((rows[1]!.components[0] as unknown as { label: string }).label).not.toBe('Use recommended');
    click(second, prompt, { custom_id: 'tc:select', component_type: 3, values: ['revenue', 'bookings'] });
    const chosen = await waitFor('the selection delivered', () => delivered.find((d) => d.threadId === `discord:${second}` && d.text === 'revenue, bookings'));
    const labels = Object.fromEntries(select.options!.map((o) => [o.value, (o as { label?: string }).label]));
    expect(chosen.label).toBe(`${labels.revenue}, ${labels.bookings}`);
  });

  it('ignores messages that do not mention it outside its threads, and its own', async () => {
    const before = delivered.length;
    dispatch(adapter.client, 'MESSAGE_CREATE', userMessage(CHANNEL, 'lunch at noon?'));
    dispatch(adapter.client, 'MESSAGE_CREATE', { ...userMessage(threadId, 'a bot talking'), author: BOT_USER });
    await new Promise((r) => setTimeout(r, 50));
    expect(delivered).toHaveLength(before);
  });

  it('adds a table\'s monospace text as a code block, the first variant that fits the 2,000-character limit', async () => {
    const wide = `${'Jan 2024 | €1.0K  +1.0% '.repeat(8)}\n`.repeat(12);
    const short = 'Jan 2024 | €1.0K* +1.0%\nTotal    | €1.9K';
    await adapter.post(`discord:${threadId}`, { key: 'table-text', text: '*1. Revenue peaked in January 2024*', monospace: [wide, short] });
    const sent = api.messagesIn(threadId).at(-1)!;
    // The block keeps its * and ! as they are: Discord reads no markdown inside it.
    expect(sent.body.content).toBe(`**1. Revenue peaked in January 2024**\n\`\`\`\n${short}\n\`\`\``);
    expect(discordMessage({ key: 'k', text: 'caption', monospace: [wide] }).content).toBe('caption');
  });

  it('keeps within Discord\'s limits without losing words: long text goes on in further messages', () => {
    const text = Array.from({ length: 3 }, () => `${'word '.repeat(399)}end`).join('\n');
    const long = discordMessages({ key: 'k', text }, { today: '2026-12-04' });
    expect(long.length).toBeGreaterThan(1);
    for (const m of long) expect(m.content.length).toBeLessThanOrEqual(2000);
    expect(long.map((m) => m.content).join('\n')).toBe(text);
    const bold = discordMessage({ key: 'k', text: '*Summary*\n- _Note: partial_' });
    expect(bold.content).toBe('**Summary**\n- _Note: partial_');
  });

  it('posts the brief card whole, a select per control with the choice in force, and Go and Cancel', async () => {
    const thread = `discord:${threadId}`;
    const before = api.messagesIn(threadId).length;
    const ref = await adapter.post(thread, briefCardPost());
    const sent = api.messagesIn(threadId).slice(before);
    expect(ref.split(',')).toEqual(sent.map((c) => String(c.answer!.id)));
    // The 16-item plan and its edit instructions survive: split at line ends, nothing clipped.
    expect(sent.length).toBeGreaterThan(1);
    expect(sent.map((c) => String(c.body.content)).join('\n')).toBe(toDiscordMarkdown(CARD_TEXT));
    expect(String(sent.at(-1)!.body.content)).toContain('16. A period table of revenue, bookings and passengers month by month');
    type Row = { type: number; components: { type: number; custom_id: string; label?: string; style?: number; options?: { label: string; value: string; default?: boolean }[] }[] };
    const rows = sent.flatMap((c) => c.body.components as Row[]);
    for (const c of sent) expect((c.body.components as Row[]).length).toBeLessThanOrEqual(5);
    // Five controls and the buttons are six rows: the first control rides on the message before.
    expect((sent.at(-1)!.body.components as Row[]).length).toBe(5);
    const selects = rows.flatMap((r) => r.components).filter((c) => c.type === 3);
    expect(selects.map((c) => c.custom_id)).toEqual(['tc:c:audience', 'tc:c:deadline', 'tc:c:grain', 'tc:c:period', 'tc:c:breakdowns']);
    const current = (id: string) => selects.find((c) => c.custom_id === id)!.options!.filter((o) => o.default).map((o) => o.label);
    expect(current('tc:c:audience')).toEqual(['Audience: Managers (plain words with the detail)']);
    expect(current('tc:c:grain')).toEqual(['Grain: Monthly']);
    expect(current('tc:c:breakdowns')).toEqual(['Breakdowns: Route']);
    expect(current('tc:c:period')).toEqual([]);
    // No date picker on Discord: sensible days from today (Friday 4 December 2026), the one in force kept.
    const days = selects.find((c) => c.custom_id === 'tc:c:deadline')!.options!;
    expect(days.map((o) => [o.label, o.value, o.default ?? false])).toEqual([
      ['Deadline: Thu 10 Dec 2026', 'deadline 2026-12-10', true],
      ['Deadline: Today (Fri 4 Dec 2026)', 'deadline 2026-12-04', false],
      ['Deadline: Tomorrow (Sat 5 Dec 2026)', 'deadline 2026-12-05', false],
      ['Deadline: End of next week (Fri 11 Dec 2026)', 'deadline 2026-12-11', false],
      ['Deadline: End of the month (Thu 31 Dec 2026)', 'deadline 2026-12-31', false],
      ['Deadline: No deadline', 'no deadline', false],
    ]);
    const buttons = rows.flatMap((r) => r.components).filter((c) => c.type === 2);
    expect(buttons.map((b) => [b.label, b.custom_id, b.style])).toEqual([
      ['Go: run the plan', 'tc:k:go', 1],
      ['Cancel', 'tc:k:cancel', 4],
    ]);
    expect(rows.at(-1)!.components).toEqual(expect.arrayContaining([expect.objectContaining({ custom_id: 'tc:k:go' })]));
    cardRef = ref;
  });

  it('delivers a card choice as its value with its label, keeping the card\'s components', async () => {
    const last = api.messagesIn(threadId).at(-1)!;
    const callbacks = api.calls.filter((c) => c.path.startsWith('/interactions/')).length;
    const before = delivered.length;
    click(threadId, last, { custom_id: 'tc:c:grain', component_type: 3, values: ['weekly'] });
    const delivery = await waitFor('the choice delivered', () => delivered[before]);
    expect(delivery).toMatchObject({ threadId: `discord:${threadId}`, author: MAREN.id, text: 'weekly', label: 'Grain: Weekly' });
    const callback = await waitFor('the interaction answered', () => api.calls.filter((c) => c.path.startsWith('/interactions/'))[callbacks]);
    const data = callback.body.data as { content: string; components: { components: { custom_id: string }[] }[] };
    expect(callback.body.type).toBe(7);
    // The components stay; the choice shows under the card until the bot edits it.
    expect(data.components.flatMap((r) => r.components.map((c) => c.custom_id))).toEqual(
      (last.body.components as { components: { custom_id: string }[] }[]).flatMap((r) => r.components.map((c) => c.custom_id)),
    );
    expect(data.content).toMatch(new RegExp(`<@${MAREN.id}> chose \\*\\*Grain: Weekly\\*\\*$`));
    expect(data.content).toContain('16. A period table');
    click(threadId, last, { custom_id: 'tc:c:deadline', component_type: 3, values: ['deadline 2026-12-11'] });
    expect(await waitFor('the day delivered', () => delivered[before + 1])).toMatchObject({ text: 'deadline 2026-12-11', label: 'Deadline: End of next week (Fri 11 Dec 2026)' });
    click(threadId, last, { custom_id: 'tc:k:go', component_type: 2 });
    expect(await waitFor('go delivered', () => delivered[before + 2])).toMatchObject({ text: 'go', label: 'Go: run the plan' });
  });

  it('edits every part of the card in place, and leaves no components once agreed', async () => {
    // The bot's answers to the clicks above are out of the way first.
    await inbox.idle();
    const ids = cardRef.split(',');
    const cardParts = () => api.messagesIn(threadId).filter((c) => String(c.body.content).includes('Here is what I understood')).length;
    const cardsBefore = cardParts();
    const editsBefore = api.calls.length;
    const corrected = correctedCardPost();
    await adapter.update(`discord:${threadId}`, cardRef, corrected.text, corrected);
    // (The bot may edit its own progress message meanwhile: only the card's parts are counted.)
    const edits = api.calls.slice(editsBefore).filter((c) => c.method === 'PATCH' && ids.some((id) => c.path === `/channels/${threadId}/messages/${id}`));
    expect(edits.map((c) => c.path)).toEqual(ids.map((id) => `/channels/${threadId}/messages/${id}`));
    expect(edits.map((c) => String(c.body.content)).join('\n')).toBe(toDiscordMarkdown(corrected.text));
    const grain = edits.flatMap((c) => c.body.components as { components: { custom_id: string; options?: { value: string; default?: boolean }[] }[] }[]).flatMap((r) => r.components).find((c) => c.custom_id === 'tc:c:grain')!;
    expect(grain.options!.filter((o) => o.default).map((o) => o.value)).toEqual(['weekly']);
    const agreed = agreedCardPost();
    const agreedFrom = api.calls.length;
    await adapter.update(`discord:${threadId}`, cardRef, agreed.text, agreed);
    const inert = api.calls.slice(agreedFrom).filter((c) => c.method === 'PATCH' && ids.some((id) => c.path === `/channels/${threadId}/messages/${id}`));
    expect(inert).toHaveLength(ids.length);
    for (const c of inert) expect(c.body.components).toEqual([]);
    expect(inert.map((c) => String(c.body.content)).join('\n')).toContain('Agreed: running the plan.');
    // No new message for the card (the bot's own follow-up run may post meanwhile: only the card is checked).
    expect(cardParts()).toBe(cardsBefore);
  });
});
