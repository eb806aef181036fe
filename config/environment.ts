// The one place that reads process.env: the chat platforms' tokens and the local channel's
// address (parsed with zod; which adapters start follows from which tokens are set), and the
// database URLs the config names by variable (a warehouse source's, the shared state's). Read
// once at start and passed down. A problem message names the variable and shows at most a
// token's first few characters, never the secret.
import { z } from 'zod';
import type { Config } from './schema.js';

export const DEFAULT_LOCAL_PORT = 8787;
export const DEFAULT_SLACK_PORT = 3000;

export type SlackEnvironment = (
  | { mode: 'http'; botToken: string; signingSecret: string; port: number }
  | { mode: 'socket'; botToken: string; appToken: string }
) & {
  /** The Web API's base URL when it is not Slack's own (GovSlack, or a proxy the organisation runs). */
  apiUrl?: string;
};

export interface Environment {
  /** The local channel's address, and the access token it needs beyond loopback. */
  local: { host: string; port: number; accessToken?: string };
  slack?: SlackEnvironment;
  discord?: { token: string };
}

export class EnvironmentError extends Error {
  readonly code = 'environment_invalid';
  constructor(readonly problems: string[]) {
    super(problems.join('\n'));
    this.name = 'EnvironmentError';
  }
}

/** An unset variable and an empty one mean the same: not configured. */
const optional = <T extends z.ZodType>(schema: T) => z.preprocess((v) => (v === '' ? undefined : v), schema.optional());

const port = (name: string) =>
  z
    .string()
    .regex(/^\d{1,5}$/, `${name} must be a port number from 0 to 65535`)
    .transform(Number)
    .refine((n) => n <= 65535, `${name} must be a port number from 0 to 65535`);

const token = (name: string, prefix: string, what: string) =>
  z
    .string()
    .refine((v) => v.startsWith(prefix), { message: `${name} must start with ${prefix} (${what})` })
    .refine((v) => /^[A-Za-z0-9-]+$/.test(v) && v.length > prefix.length + 10, { message: `${name} does not look like a Slack token (${what})` });

const environmentSchema = z.object({
  SLACK_BOT_TOKEN: optional(token('SLACK_BOT_TOKEN', 'xoxb-', 'the Bot User OAuth Token from the app\'s "OAuth & Permissions" page')),
  SLACK_SIGNING_SECRET: optional(
    z.string().regex(/^[0-9a-f]{16,}$/i, 'SLACK_SIGNING_SECRET must be the hexadecimal "Signing Secret" from the app\'s "Basic Information" page'),
  ),
  SLACK_APP_TOKEN: optional(token('SLACK_APP_TOKEN', 'xapp-', 'an app-level token with the connections:write scope, for Socket Mode')),
  SLACK_PORT: optional(port('SLACK_PORT')),
  SLACK_API_URL: optional(z.string().regex(/^https?:\/\/[^\s]+\/$/, 'SLACK_API_URL must be the Web API\'s base URL ending in a slash (e.g. https://slack-gov.com/api/)')),
  // A bot token is three base64url parts joined by dots.
  DISCORD_BOT_TOKEN: optional(
    z.string().regex(/^[\w-]{10,}\.[\w-]{4,}\.[\w-]{10,}$/, 'DISCORD_BOT_TOKEN does not look like a bot token (three parts joined by dots, from the "Bot" page of the application)'),
  ),
  THREADCOUNT_PORT: optional(port('THREADCOUNT_PORT')),
  THREADCOUNT_HOST: optional(z.string().regex(/^[\w.:-]+$/, 'THREADCOUNT_HOST must be a host name or IP address')),
  THREADCOUNT_ACCESS_TOKEN: optional(
    z
      .string()
      .regex(/^[\x21-\x7e]{24,}$/, 'THREADCOUNT_ACCESS_TOKEN must be at least 24 printable characters with no spaces (e.g. the output of "openssl rand -hex 32")'),
  ),
});

/** Parses the variables threadcount uses; throws EnvironmentError naming every problem. */
export function parseEnvironment(env: Record<string, string | undefined>): Environment {
  const parsed = environmentSchema.safeParse(env);
  if (!parsed.success) {
    throw new EnvironmentError(parsed.error.issues.map((i) => `${i.message}${hint(env, i.path[0])}`));
  }
  const e = parsed.data;
  const problems: string[] = [];
  let slack: SlackEnvironment | undefined;
  if (e.SLACK_BOT_TOKEN) {
    // Socket Mode when an app-level token is given; otherwise the Events API over HTTP.
    if (e.SLACK_APP_TOKEN) slack = { mode: 'socket', botToken: e.SLACK_BOT_TOKEN, appToken: e.SLACK_APP_TOKEN };
    else if (e.SLACK_SIGNING_SECRET) slack = { mode: 'http', botToken: e.SLACK_BOT_TOKEN, signingSecret: e.SLACK_SIGNING_SECRET, port: e.SLACK_PORT ?? DEFAULT_SLACK_PORT };
    else problems.push('SLACK_BOT_TOKEN is set but neither SLACK_SIGNING_SECRET (Events API over HTTP) nor SLACK_APP_TOKEN (Socket Mode) is');
  } else if (e.SLACK_SIGNING_SECRET || e.SLACK_APP_TOKEN) {
    problems.push(`${e.SLACK_APP_TOKEN ? 'SLACK_APP_TOKEN' : 'SLACK_SIGNING_SECRET'} is set but SLACK_BOT_TOKEN is not; Slack needs the bot token too`);
  }
  if (slack && e.SLACK_API_URL) slack = { ...slack, apiUrl: e.SLACK_API_URL };
  if (problems.length > 0) throw new EnvironmentError(problems);
  return {
    local: { host: e.THREADCOUNT_HOST ?? '127.0.0.1', port: e.THREADCOUNT_PORT ?? DEFAULT_LOCAL_PORT, ...(e.THREADCOUNT_ACCESS_TOKEN ? { accessToken: e.THREADCOUNT_ACCESS_TOKEN } : {}) },
    ...(slack ? { slack } : {}),
    ...(e.DISCORD_BOT_TOKEN ? { discord: { token: e.DISCORD_BOT_TOKEN } } : {}),
  };
}

/** Reads the chat settings from the process environment (the CLI calls this once at start-up). */
export function loadEnvironment(): Environment {
  return parseEnvironment(process.env);
}

function hint(env: Record<string, string | undefined>, key: PropertyKey | undefined): string {
  // Platform token prefixes (xoxb-, xoxp-) are not secret; the signing secret and the access token are never echoed.
  if (typeof key !== 'string' || !/^(SLACK|DISCORD)_\w*TOKEN$/.test(key)) return '';
  const v = env[key] ?? '';
  return v.length > 0 ? ` (the value set starts with "${v.slice(0, 5)}…")` : '';
}

/** Environment variable name -> value, for the variables the config names (and that are set). */
export type Secrets = Readonly<Record<string, string>>;

/** The parts of a config that name secrets. */
type NamesSecrets = Pick<Config, 'datasets'> & { conversation?: Pick<Config['conversation'], 'state'> };

/** The environment variables `config` names, read once; an empty value counts as unset. */
export function readSecrets(config: NamesSecrets, env: Readonly<Record<string, string | undefined>> = process.env): Secrets {
  const out: Record<string, string> = {};
  for (const name of secretNames(config)) {
    const value = env[name];
    if (value !== undefined && value !== '') out[name] = value;
  }
  return Object.freeze(out);
}

/** Every environment variable the config names: PostgreSQL sources' URLs, then the shared state's. */
export function secretNames(config: NamesSecrets): string[] {
  const names = config.datasets.flatMap((d) => (d.source.kind === 'postgres' ? [d.source.url_env] : []));
  const state = config.conversation?.state;
  if (state) names.push(state.url_env);
  return [...new Set(names)];
}
