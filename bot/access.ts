// Which datasets a chat channel may use, and which of them a request is about. The rules come
// from the config's `access` section; without one, every channel may use every dataset.
import type { AccessConfig, DatasetConfig } from '../config/schema.js';
import type { ValueIndex } from '../analysis/values/value-index.js';
import type { IncomingMessage } from './port.js';
import { findCatalogHits, prepareCatalog } from './reading/catalog-match.js';
import { readablePart } from './reading/read-request.js';
import { RequestText } from './reading/text.js';

/**
 * The channel key of a message: the one its adapter set ("local", "slack:C0123",
 * "discord:<guild>:<channel>"), else one read from the thread id ("slack:C0123:1700.1" gives
 * "slack:C0123", "local:abc" gives "local"), else the thread id's prefix.
 */
export function channelKey(msg: Pick<IncomingMessage, 'threadId' | 'channel'>): string {
  if (msg.channel) return msg.channel;
  const slack = /^slack:([^:]+):/.exec(msg.threadId);
  if (slack) return `slack:${slack[1]}`;
  const colon = msg.threadId.indexOf(':');
  return colon > 0 ? msg.threadId.slice(0, colon) : msg.threadId;
}

/** A glob on the whole key: `*` is any run of characters (none included), `?` exactly one; nothing else is special. */
export function globMatches(pattern: string, key: string): boolean {
  // Iterative matching with one backtrack point: linear in practice, no regular expression built from config text.
  let p = 0;
  let k = 0;
  let star = -1;
  let mark = 0;
  while (k < key.length) {
    if (p < pattern.length && pattern[p] === '*') {
      star = p++;
      mark = k;
    } else if (p < pattern.length && (pattern[p] === '?' || pattern[p] === key[k])) {
      p++;
      k++;
    } else if (star >= 0) {
      p = star + 1;
      k = ++mark;
    } else {
      return false;
    }
  }
  while (p < pattern.length && pattern[p] === '*') p++;
  return p === pattern.length;
}

/**
 * The dataset names a channel may use, in the order the config lists its datasets. The first
 * rule whose `match` fits the key decides; a key no rule fits gets `default_datasets`.
 */
export function allowedDatasets(access: AccessConfig | undefined, datasets: readonly string[], channel: string): string[] {
  if (!access) return [...datasets];
  const rule = access.channels.find((r) => globMatches(r.match, channel));
  const names = new Set(rule ? rule.datasets : access.default_datasets);
  return datasets.filter((d) => names.has(d));
}

export type DatasetChoice =
  | { kind: 'chosen'; dataset: DatasetConfig; score: number }
  /** No catalog fits the request better than the rest: ask, recommending the first of `ranked` (`matched`: it scored above zero). */
  | { kind: 'ask'; ranked: DatasetConfig[]; matched: boolean };

/**
 * Which of several allowed datasets a request is about: each catalog is scored by the terms the
 * request names (its name or label 3, a metric, dimension or group named exactly 2, with a typo 1);
 * a single best score above zero chooses, anything else asks.
 */
export function chooseDataset(text: string, datasets: readonly DatasetConfig[], values: (ds: DatasetConfig) => ValueIndex | undefined = () => undefined): DatasetChoice {
  if (datasets.length === 1) return { kind: 'chosen', dataset: datasets[0]!, score: 0 };
  // Only the part of a long request that is read is scored (see REQUEST_READ_LIMIT).
  const readable = readablePart(text);
  const scored = datasets.map((ds, order) => ({ ds, order, score: catalogScore(readable, ds, values(ds)) }));
  scored.sort((a, b) => b.score - a.score || a.order - b.order);
  const [best, second] = scored;
  if (best && best.score > 0 && (!second || best.score > second.score)) return { kind: 'chosen', dataset: best.ds, score: best.score };
  return { kind: 'ask', ranked: scored.map((s) => s.ds), matched: (best?.score ?? 0) > 0 };
}

/** The dataset's own name 3, a catalog term or value named exactly 2, with a typo 1. */
function catalogScore(text: string, ds: DatasetConfig, values: ValueIndex | undefined): number {
  let score = 0;
  for (const hit of findCatalogHits(new RequestText(text), prepareCatalog(ds, values))) {
    const kinds = new Set(hit.entries.map((e) => e.kind));
    if (kinds.has('personal')) continue;
    score += kinds.has('dataset') ? 3 : hit.exact ? 2 : 1;
  }
  return score;
}
