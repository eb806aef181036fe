// A small stand-in for Discord's REST API on 127.0.0.1: it records every call (JSON bodies, and
// multipart bodies with their files) and answers with the objects discord.js expects: a thread
// channel (type 11) for "start thread from message", a message object for sends and edits.
import { createServer, type IncomingMessage, type Server, type ServerResponse } from 'node:http';
import type { AddressInfo } from 'node:net';

export interface RecordedFile {
  field: string;
  name: string;
  bytes: Buffer;
}

export interface ApiCall {
  method: string;
  path: string;
  body: Record<string, unknown>;
  files: RecordedFile[];
  /** The message or channel object the fake answered with, if any. */
  answer?: Record<string, unknown>;
}

export const BOT_USER = { id: '900000000000000001', username: 'threadcount', discriminator: '0', avatar: null, global_name: null, bot: true };

export class FakeDiscordApi {
  readonly calls: ApiCall[] = [];
  private readonly server: Server;
  private nextId = 1_000_000_000_000_000n;

  constructor(private readonly guildId: string) {
    this.server = createServer((req, res) => {
      this.handle(req, res).catch((err: unknown) => {
        res.writeHead(500, { 'content-type': 'application/json' });
        res.end(JSON.stringify({ message: String(err), code: 0 }));
      });
    });
  }

  async start(): Promise<string> {
    await new Promise<void>((resolve) => this.server.listen(0, '127.0.0.1', resolve));
    return `http://127.0.0.1:${(this.server.address() as AddressInfo).port}/api`;
  }

  async stop(): Promise<void> {
    this.server.closeAllConnections();
    await new Promise<void>((resolve) => this.server.close(() => resolve()));
  }

  messagesIn(channelId: string): ApiCall[] {
    return this.calls.filter((c) => c.method === 'POST' && c.path === `/channels/${channelId}/messages`);
  }

  snowflake(): string {
    return String(this.nextId++);
  }

  private async handle(req: IncomingMessage, res: ServerResponse): Promise<void> {
    const path = (req.url ?? '').replace(/^\/api\/v\d+/, '').split('?')[0]!;
    const { body, files } = await readBody(req);
    const call: ApiCall = { method: req.method ?? 'GET', path, body, files };
    this.calls.push(call);
    let m: RegExpExecArray | null;
    if (call.method === 'POST' && (m = /^\/channels\/(\d+)\/messages\/(\d+)\/threads$/.exec(path))) {
      call.answer = this.thread(m[1]!, String(body.name));
      return json(res, 201, call.answer);
    }
    if (call.method === 'POST' && (m = /^\/channels\/(\d+)\/messages$/.exec(path))) {
      call.answer = this.message(m[1]!, this.snowflake(), body, files);
      return json(res, 200, call.answer);
    }
    if (call.method === 'PATCH' && (m = /^\/channels\/(\d+)\/messages\/(\d+)$/.exec(path))) {
      call.answer = this.message(m[1]!, m[2]!, body, files);
      return json(res, 200, call.answer);
    }
    if (call.method === 'POST' && /^\/interactions\/\d+\/[^/]+\/callback$/.test(path)) {
      res.writeHead(204);
      res.end();
      return;
    }
    json(res, 404, { message: `Unknown route ${call.method} ${path}`, code: 0 });
  }

  thread(parentId: string, name: string): Record<string, unknown> {
    return {
      id: this.snowflake(),
      type: 11,
      guild_id: this.guildId,
      parent_id: parentId,
      name,
      owner_id: BOT_USER.id,
      last_message_id: null,
      rate_limit_per_user: 0,
      message_count: 0,
      member_count: 1,
      total_message_sent: 0,
      flags: 0,
      thread_metadata: { archived: false, auto_archive_duration: 1440, archive_timestamp: new Date().toISOString(), locked: false },
    };
  }

  private message(channelId: string, id: string, body: Record<string, unknown>, files: RecordedFile[]): Record<string, unknown> {
    return {
      id,
      channel_id: channelId,
      guild_id: this.guildId,
      author: BOT_USER,
      content: body.content ?? '',
      timestamp: new Date().toISOString(),
      edited_timestamp: null,
      tts: false,
      mention_everyone: false,
      mentions: [],
      mention_roles: [],
      attachments: files.map((f, i) => ({ id: this.snowflake(), filename: f.name, size: f.bytes.length, url: `https://cdn.invalid/${i}/${f.name}`, proxy_url: `https://cdn.invalid/${i}/${f.name}` })),
      embeds: [],
      components: body.components ?? [],
      pinned: false,
      type: 0,
      flags: 0,
    };
  }
}

/** JSON, or multipart with a payload_json part and files[n] parts (how discord.js sends files). */
async function readBody(req: IncomingMessage): Promise<{ body: Record<string, unknown>; files: RecordedFile[] }> {
  const chunks: Buffer[] = [];
  for await (const c of req as AsyncIterable<Buffer>) chunks.push(c);
  const raw = Buffer.concat(chunks);
  const type = req.headers['content-type'] ?? '';
  if (raw.length === 0) return { body: {}, files: [] };
  if (type.startsWith('application/json')) return { body: JSON.parse(raw.toString('utf8')) as Record<string, unknown>, files: [] };
  if (type.startsWith('multipart/form-data')) {
    const form = await new Request('http://local/', { method: 'POST', headers: { 'content-type': type }, body: raw }).formData();
    const files: RecordedFile[] = [];
    let body: Record<string, unknown> = {};
    for (const [field, value] of form.entries()) {
      if (field === 'payload_json') body = JSON.parse(String(value)) as Record<string, unknown>;
      else if (typeof value !== 'string') files.push({ field, name: value.name, bytes: Buffer.from(await value.arrayBuffer()) });
    }
    return { body, files };
  }
  return { body: { raw: raw.toString('utf8') }, files: [] };
}

function json(res: ServerResponse, status: number, body: unknown): void {
  res.writeHead(status, { 'content-type': 'application/json' });
  res.end(JSON.stringify(body));
}
