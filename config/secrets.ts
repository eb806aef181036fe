// Secrets the config names but never holds: a PostgreSQL source's connection URL lives in the
// environment variable its `url_env` names. Read once at start, here, and passed down; nothing
// outside config/ reads process.env.
import type { Config } from './schema.js';

/** Environment variable name -> value, for the variables the config names (and that are set). */
export type Secrets = Readonly<Record<string, string>>;

/** The environment variables `config` names, read once; an empty value counts as unset. */
export function readSecrets(config: Pick<Config, 'datasets'>, env: Readonly<Record<string, string | undefined>> = process.env): Secrets {
  const out: Record<string, string> = {};
  for (const name of secretNames(config)) {
    const value = env[name];
    if (value !== undefined && value !== '') out[name] = value;
  }
  return Object.freeze(out);
}

/** Every environment variable the config names. */
export function secretNames(config: Pick<Config, 'datasets'>): string[] {
  const names = config.datasets.flatMap((d) => (d.source.kind === 'postgres' ? [d.source.url_env] : []));
  return [...new Set(names)];
}
