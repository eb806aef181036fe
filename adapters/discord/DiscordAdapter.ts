// Discord through discord.js: a mention of the bot in a server channel opens a thread on that
// message, and the conversation happens in the thread. Prompts come with buttons or a select
// menu, charts and files as attachments, progress by editing the message.
// Gateway intents: Guilds, GuildMessages and MessageContent (privileged: enable it on the
// application's Bot page, or message text arrives empty).
import {
  Client,
  Events,
  GatewayIntentBits,
  ThreadAutoArchiveDuration,
  type Interaction,
  type Message,
  type MessageCreateOptions,
  type SendableChannels,
} from 'discord.js';
import type { OutgoingPost } from '../../bot/port.js';
import { chunks } from '../text-chunks.js';
import type { ChatAdapter, Deliver, KnownThread } from '../chat-adapter.js';
import { SeenIds } from '../SeenIds.js';
import { discordMessages, isCardCustomId, readCustomId } from './discord-components.js';
import type { DiscordMessage } from './discord-limits.js';
import { clip, DISCORD_LIMITS } from './discord-limits.js';
import { fromDiscordText, toDiscordMarkdown } from './discord-text.js';

const PREFIX = 'discord:';

export interface DiscordAdapterOptions {
  token: string;
  deliver: Deliver;
  knows: KnownThread;
  log?: (line: string) => void;
  /** The REST API base (tests point it at a local fake); default Discord's own. */
  restApi?: string;
  /** The clock for a date control's choices (tests fix it). */
  now?: () => Date;
}

/** "discord:<thread channel id>" */
export function discordThreadId(channelId: string): string {
  return `${PREFIX}${channelId}`;
}

/**
 * The access rules' channel key: "discord:<guild id>:<channel id>", the channel a request's
 * thread was opened in (not the thread itself). Outside a guild the guild part is "dm".
 */
export function discordChannelKey(guildId: string | null, channelId: string): string {
  return `${PREFIX}${guildId ?? 'dm'}:${channelId}`;
}

export class DiscordAdapter implements ChatAdapter {
  readonly name = 'discord';
  readonly client: Client;
  private readonly seen = new SeenIds();
  private readonly log: (line: string) => void;

  constructor(private readonly opts: DiscordAdapterOptions) {
    this.log = opts.log ?? ((line) => process.stderr.write(`${line}\n`));
    this.client = new Client({
      intents: [GatewayIntentBits.Guilds, GatewayIntentBits.GuildMessages, GatewayIntentBits.MessageContent],
      ...(opts.restApi ? { rest: { api: opts.restApi } } : {}),
    });
    // REST calls need the token before (or without) a gateway login.
    this.client.token = opts.token;
    this.client.rest.setToken(opts.token);
    this.client.on(Events.MessageCreate, (m) => void this.onMessage(m).catch((err: unknown) => this.fail('a message', err)));
    this.client.on(Events.InteractionCreate, (i) => void this.onInteraction(i).catch((err: unknown) => this.fail('a click', err)));
    this.client.on(Events.Error, (err) => this.fail('the gateway', err));
  }

  owns(threadId: string): boolean {
    return threadId.startsWith(PREFIX);
  }

  async start(): Promise<void> {
    await this.client.login(this.opts.token);
  }

  async stop(): Promise<void> {
    await this.client.destroy();
  }

  /**
   * Posts the text in as many messages as it needs, the components and files with the last. The
   * reference is the messages' ids joined by commas, so an edit reaches every part.
   */
  async post(threadId: string, post: OutgoingPost): Promise<string> {
    const channel = await this.channel(threadId);
    const messages = discordMessages(post, this.dates());
    const title = (post.text.split('\n')[0] ?? '').replace(/[*_]/g, '');
    const files = (post.files ?? []).map((f) => ({
      attachment: typeof f.content === 'string' ? Buffer.from(f.content, 'utf8') : f.content,
      name: f.name,
      // A chart's description is its alt text for screen readers.
      ...(f.kind === 'chart' ? { description: clip(`Chart: ${title}`, DISCORD_LIMITS.attachmentDescription) } : {}),
    }));
    const ids: string[] = [];
    for (const [i, message] of messages.entries()) {
      // Ten attachments at most per message; any more follow in messages of their own.
      const withFiles = i === messages.length - 1 ? files.slice(0, DISCORD_LIMITS.attachments) : [];
      const sent = await channel.send({ content: message.content, components: message.components, files: withFiles, allowedMentions: { parse: [] } } as MessageCreateOptions);
      ids.push(sent.id);
    }
    for (let i = DISCORD_LIMITS.attachments; i < files.length; i += DISCORD_LIMITS.attachments) {
      await channel.send({ files: files.slice(i, i + DISCORD_LIMITS.attachments) });
    }
    return ids.join(',');
  }

  /**
   * Edits a message posted earlier, every part of it: the text only, or with `post` the whole
   * (components included; a post without any leaves none). Text that now needs more parts than were
   * posted is clipped in the last (a card is posted with room to spare); parts no longer needed say so.
   */
  async update(threadId: string, ref: string, text: string, post?: Omit<OutgoingPost, 'key' | 'files'>): Promise<void> {
    const channel = await this.channel(threadId);
    if (!('messages' in channel)) throw new Error(`Discord channel ${threadId} has no messages`);
    const ids = ref.split(',');
    const messages: { content: string; components?: DiscordMessage['components'] }[] = post
      ? discordMessages({ ...post, text }, this.dates())
      : chunks(toDiscordMarkdown(text), DISCORD_LIMITS.content).map((content) => ({ content }));
    const fitted = fit(messages, ids.length);
    for (const [i, id] of ids.entries()) {
      const m = fitted[i];
      const content = m?.content ?? '-# (continued in the message above)';
      await channel.messages.edit(id, post ? { content, components: m?.components ?? [] } : { content });
    }
  }

  private dates(): { today: string } {
    const now = this.opts.now?.() ?? new Date();
    // The server's calendar day: the requester's own zone is not known to Discord's API.
    const local = new Date(now.getTime() - now.getTimezoneOffset() * 60_000);
    return { today: local.toISOString().slice(0, 10) };
  }

  private async onMessage(message: Message): Promise<void> {
    const me = this.client.user?.id;
    if (message.author.bot || !me || !this.seen.first(message.id)) return;
    const mentioned = message.mentions.users.has(me);
    const text = fromDiscordText(message.content, me);
    if (message.channel.isThread()) {
      // In a thread: a reply to a request the bot knows, or a mention that starts one there.
      const threadId = discordThreadId(message.channel.id);
      const channel = discordChannelKey(message.guildId, message.channel.parentId ?? message.channel.id);
      if (mentioned || (await this.opts.knows(threadId))) this.opts.deliver({ threadId, author: message.author.id, text: text || 'help', channel });
      return;
    }
    if (!mentioned || !message.inGuild()) return;
    const thread = await message.startThread({ name: clip(text || 'Data request', DISCORD_LIMITS.threadName), autoArchiveDuration: ThreadAutoArchiveDuration.OneDay });
    this.opts.deliver({ threadId: discordThreadId(thread.id), author: message.author.id, text: text || 'help', channel: discordChannelKey(message.guildId, message.channel.id) });
  }

  private async onInteraction(interaction: Interaction): Promise<void> {
    if (!interaction.isButton() && !interaction.isStringSelectMenu()) return;
    const value = readCustomId(interaction.customId, interaction.isStringSelectMenu() ? interaction.values : []);
    if (value === null || !interaction.channelId) return;
    // The label the requester chose: the button's, or the chosen options'.
    const label = interaction.isButton()
      ? ('label' in interaction.component && interaction.component.label) || value
      : interaction.component.options.filter((o) => interaction.values.includes(o.value)).map((o) => o.label).join(', ') || value;
    const chosen = `-# <@${interaction.user.id}> chose **${clip(label, 200)}**`;
    const card = isCardCustomId(interaction.customId);
    // Answer within 3 s. A prompt's choices give way to who chose what, so nobody answers twice;
    // the card keeps its components (the bot edits it with what changed), showing the last choice.
    const content = interaction.message.content.replace(/\n-# <@\d+> chose \*\*.*\*\*$/, '');
    await interaction.update({
      content: `${clip(content, DISCORD_LIMITS.content - chosen.length - 1)}\n${chosen}`,
      components: card ? interaction.message.components : [],
      allowedMentions: { parse: [] },
    });
    const where = interaction.channel;
    const parent = where?.isThread() ? where.parentId : null;
    this.opts.deliver({
      threadId: discordThreadId(interaction.channelId),
      author: interaction.user.id,
      text: value,
      label,
      channel: discordChannelKey(interaction.guildId, parent ?? interaction.channelId),
    });
  }

  private async channel(threadId: string): Promise<SendableChannels> {
    if (!this.owns(threadId)) throw new Error(`thread ${threadId} is not a Discord thread`);
    const channel = await this.client.channels.fetch(threadId.slice(PREFIX.length));
    if (!channel?.isSendable()) throw new Error(`cannot post in Discord channel ${threadId}`);
    return channel;
  }

  private fail(what: string, err: unknown): void {
    this.log(`discord: ${what} failed: ${err instanceof Error ? err.message : String(err)}`);
  }
}

/** `messages` in `n` parts at most: any beyond are joined into the last, its text clipped and at most five rows kept. */
function fit<T extends { content: string; components?: DiscordMessage['components'] }>(messages: T[], n: number): T[] {
  if (messages.length <= n) return messages;
  const rest = messages.slice(n - 1);
  const components = rest.flatMap((m) => m.components ?? []).slice(-DISCORD_LIMITS.rows);
  return [...messages.slice(0, n - 1), { ...rest.at(-1)!, content: clip(rest.map((m) => m.content).join('\n'), DISCORD_LIMITS.content), components }];
}
