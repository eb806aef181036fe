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
import type { ChatAdapter, Deliver, KnownThread } from '../chat-adapter.js';
import { SeenIds } from '../SeenIds.js';
import { discordMessage, readCustomId } from './discord-components.js';
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

  async post(threadId: string, post: OutgoingPost): Promise<string> {
    const channel = await this.channel(threadId);
    const message = discordMessage(post);
    const title = (post.text.split('\n')[0] ?? '').replace(/[*_]/g, '');
    const files = (post.files ?? []).map((f) => ({
      attachment: typeof f.content === 'string' ? Buffer.from(f.content, 'utf8') : f.content,
      name: f.name,
      // A chart's description is its alt text for screen readers.
      ...(f.kind === 'chart' ? { description: clip(`Chart: ${title}`, DISCORD_LIMITS.attachmentDescription) } : {}),
    }));
    // Ten attachments at most per message; any more follow in messages of their own.
    const first = files.slice(0, DISCORD_LIMITS.attachments);
    const sent = await channel.send({ content: message.content, components: message.components, files: first, allowedMentions: { parse: [] } } as MessageCreateOptions);
    for (let i = DISCORD_LIMITS.attachments; i < files.length; i += DISCORD_LIMITS.attachments) {
      await channel.send({ files: files.slice(i, i + DISCORD_LIMITS.attachments) });
    }
    return sent.id;
  }

  async update(threadId: string, ref: string, text: string): Promise<void> {
    const channel = await this.channel(threadId);
    if (!('messages' in channel)) throw new Error(`Discord channel ${threadId} has no messages`);
    await channel.messages.edit(ref, { content: clip(toDiscordMarkdown(text), DISCORD_LIMITS.content) });
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
    // Answer within 3 s: the choices give way to who chose what, so nobody answers twice.
    const label = interaction.isButton()
      ? (interaction.customId.startsWith('tc:v:') && 'label' in interaction.component && interaction.component.label) || value
      : interaction.component.options.filter((o) => interaction.values.includes(o.value)).map((o) => o.label).join(', ') || value;
    const chosen = `\n-# <@${interaction.user.id}> chose **${clip(label, 200)}**`;
    await interaction.update({ content: clip(interaction.message.content, DISCORD_LIMITS.content - chosen.length) + chosen, components: [], allowedMentions: { parse: [] } });
    const where = interaction.channel;
    const parent = where?.isThread() ? where.parentId : null;
    this.opts.deliver({
      threadId: discordThreadId(interaction.channelId),
      author: interaction.user.id,
      text: value,
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
