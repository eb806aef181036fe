// Words for a level asked across entities (catalog.ts ownLevelDimension): why one figure across
// them averages unlike things, said on the card (as the assumption behind a per-member answer) and
// under every combined answer (caveat `mixed_levels`). One place for both, so they say the same.
import { type OwnLevelEntities, UNLIKE_LEVEL_FACTOR } from '../catalog.js';
import { formatPeriod, formatValue, type ValueFormat } from '../format.js';
import type { Caveat } from '../types.js';
import { countOf, listJoin, pluralNoun } from './grammar.js';

/** Up to this many entering or leaving members are named; past it they are counted. */
const NAMED_MEMBERS = 3;

/** The caveat data of a combined answer of `metricLabel` across the entities (caveatNote reads it back). */
export function mixedLevelsCaveat(metricLabel: string, dimensionLabel: string, e: OwnLevelEntities, fmt: ValueFormat): Caveat {
  return {
    code: 'mixed_levels',
    data: {
      metric: metricLabel,
      dimension: dimensionLabel,
      members: e.members,
      lowest: e.lowest.value,
      lowestMedian: e.lowest.median,
      highest: e.highest.value,
      highestMedian: e.highest.median,
      factor: e.factor,
      entering: e.entering.map((m) => `${m.value}\u0001${m.first}`).join('\u0002'),
      leaving: e.leaving.map((m) => `${m.value}\u0001${m.last}`).join('\u0002'),
      unit: fmt.unit,
      currency: fmt.currency ?? null,
      decimals: fmt.decimals ?? null,
      unitLabel: fmt.label ?? null,
    },
  };
}

/** The caveat's data back as the entities and the value format. */
function fromCaveat(c: Caveat): { e: OwnLevelEntities; fmt: ValueFormat; metric: string; dimension: string } {
  const d = c.data;
  const pairs = (s: unknown) => (typeof s === 'string' && s.length > 0 ? s.split('\u0002').map((p) => p.split('\u0001') as [string, string]) : []);
  const fmt: ValueFormat = { unit: (d.unit as ValueFormat['unit']) ?? 'number', locale: 'en' };
  if (typeof d.currency === 'string') fmt.currency = d.currency;
  if (typeof d.decimals === 'number') fmt.decimals = d.decimals;
  if (typeof d.unitLabel === 'string') fmt.label = d.unitLabel;
  return {
    metric: String(d.metric ?? 'the measure'),
    dimension: String(d.dimension ?? 'segment'),
    fmt,
    e: {
      dimension: String(d.dimension ?? ''),
      members: Number(d.members ?? 0),
      lowest: { value: String(d.lowest ?? ''), median: Number(d.lowestMedian) },
      highest: { value: String(d.highest ?? ''), median: Number(d.highestMedian) },
      factor: typeof d.factor === 'number' ? d.factor : null,
      entering: pairs(d.entering).map(([value, first]) => ({ value, first })),
      leaving: pairs(d.leaving).map(([value, last]) => ({ value, last })),
    },
  };
}

/** "MSFT's median US$24.1 against GOOG's US$420, 17 times as high", or the gap in units where no ratio applies. */
function spreadWords(e: OwnLevelEntities, fmt: ValueFormat, locale: string): string {
  const v = (x: number) => formatValue(x, { ...fmt, locale }, { compact: true });
  const ends = `from ${v(e.lowest.median)} (${e.lowest.value}) to ${v(e.highest.median)} (${e.highest.value})`;
  if (e.factor !== null && e.factor >= 1.05) return `medians run ${ends}, ${e.factor >= 10 ? Math.round(e.factor) : e.factor.toFixed(1)} times as high`;
  return `medians run ${ends}`;
}

/** "GOOG enters in August 2004", "2 symbols leave (A in May 2003, B in June 2004)". */
function comingsAndGoings(e: OwnLevelEntities, locale: string): string[] {
  const month = (iso: string) => formatPeriod(iso.slice(0, 10), 'month', locale, 'long');
  const say = (ms: { value: string; day: string }[], verb: string, plural: string) => {
    if (ms.length === 0) return [];
    const named = ms.slice(0, NAMED_MEMBERS).map((m) => `${m.value} in ${month(m.day)}`);
    if (ms.length === 1) return [`${ms[0]!.value} ${verb} in ${month(ms[0]!.day)}`];
    return [`${ms.length} ${plural} (${listJoin(named)}${ms.length > NAMED_MEMBERS ? ', …' : ''})`];
  };
  return [...say(e.entering.map((m) => ({ value: m.value, day: m.first })), 'enters only', 'enter late'), ...say(e.leaving.map((m) => ({ value: m.value, day: m.last })), 'stops', 'stop early')];
}

/**
 * Why the plan answers per member, for the card: "price is a level each symbol holds of its own
 * (medians run from US$24.1 (MSFT) to US$420 (GOOG), 17 times as high; GOOG enters only in August
 * 2004), so each symbol is shown on its own; a figure across them averages unlike things".
 */
export function ownLevelsReason(metricLabel: string, dimensionLabel: string, e: OwnLevelEntities, fmt: ValueFormat, locale: string): string {
  const dim = dimensionLabel.toLowerCase();
  const facts = [spreadWords(e, fmt, locale), ...comingsAndGoings(e, locale)].join('; ');
  return `${metricLabel.toLowerCase()} is a level each ${dim} holds of its own (${facts}), so each ${dim} is shown on its own; a figure across them averages unlike things${e.entering.length + e.leaving.length > 0 ? ' and moves as members enter or leave' : ''}`;
}

/** The note under a combined answer (caveat `mixed_levels`). */
export function mixedLevelsNote(c: Caveat, locale: string): string {
  const { e, fmt, metric, dimension } = fromCaveat(c);
  const dim = dimension.toLowerCase();
  const moves = comingsAndGoings(e, locale);
  // Said once for the thread (quality/thread-notes.ts), so it names what it is about rather than "this".
  return `A figure of ${metric.toLowerCase()} across all ${pluralNoun(dim)} averages ${countOf(e.members, dim)}, each a level of its own (${spreadWords(e, fmt, locale)}): it mixes unlike things${e.factor !== null && e.factor >= UNLIKE_LEVEL_FACTOR ? ', follows the highest most' : ''}${moves.length > 0 ? ` and moves when a ${dim} enters or leaves (${moves.join('; ')})` : ''}. Each ${dim}'s own course is in the answer by ${dim}.`;
}
