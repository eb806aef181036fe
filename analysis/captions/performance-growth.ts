// Words for "performance_growth": did the members grow faster than the others? Each group's own
// growth against the same dates a year earlier, in total and like for like; when the two answers
// differ, which units make the difference (a shop new in one group).
import type { GroupGrowth, PerformanceGroupGrowthFinding } from '../findings/performance.js';
import { formatChange, formatPeriod, formatValue, valueFormatOf } from '../format.js';
import type { Finding } from '../types.js';
import { capitalise, countOf, listJoin, pluralNoun } from './grammar.js';
import { spanText } from './growth-words.js';
import { findOne, groupLabel, inText, type WordsContext } from './performance-words.js';

/** Growth rates closer than this (in proportion: 0.1 percentage point) are called the same. */
const SAME_RATE = 0.001;

export interface GroupGrowthWords {
  title: string;
  caption: string;
  notes: string[];
  takeaway: string | null;
}

type Pace = 'faster' | 'slower' | 'same' | null;

function paceOf(m: number | null | undefined, o: number | null | undefined): Pace {
  if (m === null || m === undefined || o === null || o === undefined) return null;
  return Math.abs(m - o) < SAME_RATE ? 'same' : m > o ? 'faster' : 'slower';
}

function grewText(pace: Pace): string {
  return pace === 'faster' ? 'grew faster than' : pace === 'slower' ? 'grew more slowly than' : 'grew at the same rate as';
}

/** "Quayside (opened 1 June 2025)". */
function changedText(g: GroupGrowth, locale: string): string[] {
  return g.changed.map((c) => {
    const what = c.opened && c.firstDay ? `opened ${formatPeriod(c.firstDay, 'day', locale, 'long')}` : c.closed && c.lastDay ? `last recorded ${formatPeriod(c.lastDay, 'day', locale, 'long')}` : 'not there through both periods';
    return `${c.segment ?? '(not recorded)'} (${what})`;
  });
}

export function groupGrowthWords(findings: readonly Finding[], ctx: WordsContext): GroupGrowthWords {
  const { metric, group, locale } = ctx;
  const f: PerformanceGroupGrowthFinding | undefined = findOne(findings, 'performance_group_growth');
  const label = metric.label;
  if (!f) return { title: `${label}: no growth to compare for ${inText(group.members_label)} and ${inText(group.others_label)}`, caption: 'There is no data in the period asked for or in the same dates a year earlier.', notes: [], takeaway: null };
  const [m, o] = [f.groups.find((g) => g.group === 'members')!, f.groups.find((g) => g.group === 'others')!];
  const M = group.members_label;
  const O = inText(group.others_label);
  const fmt = valueFormatOf(metric, locale);
  const value = (v: number) => formatValue(v, fmt, { compact: true });
  const pct = (r: number | null) => (r === null ? 'new (none a year earlier)' : formatChange(r, locale));
  const totalPace = paceOf(m.total.relative, o.total.relative);
  const lflPace = paceOf(m.likeForLike?.relative, o.likeForLike?.relative);
  const anyChanged = m.changed.length > 0 || o.changed.length > 0;
  const spans = `${spanText(f.current, locale)} against ${spanText(f.prior, locale)}`;
  const unitNoun = inText(ctx.dataset.dimensions.find((d) => d.name === f.unit)?.label ?? f.unit);
  const side = (g: GroupGrowth) =>
    g.total.relative === null
      ? `${inText(groupLabel(group, g.group))} none a year earlier (${value(g.total.after)} now)`
      : `${inText(groupLabel(group, g.group))} ${pct(g.total.relative)} (${value(g.total.before)} to ${value(g.total.after)})`;
  let title: string;
  let verdict: string;
  const newOnes = [...m.changed, ...o.changed].map((c) => c.segment ?? '(not recorded)');
  const isAre = newOnes.length === 1 ? 'is' : 'are';
  if (anyChanged && lflPace !== null && totalPace !== null && lflPace !== totalPace) {
    // The question's two honest answers differ: say both, and why.
    title = `${capitalise(inText(M))} ${grewText(lflPace)} ${O} like for like (${pct(m.likeForLike!.relative)} against ${pct(o.likeForLike!.relative)}), but not in total`;
    verdict = `So: ${lflPace === 'faster' ? 'yes' : lflPace === 'slower' ? 'no' : 'level'} like for like, ${totalPace === 'faster' ? 'yes' : totalPace === 'slower' ? 'no' : 'level'} in total, because ${listJoin(newOnes)} ${isAre} not in both periods.`;
  } else {
    const pace = anyChanged && lflPace !== null ? lflPace : totalPace;
    const lfl = anyChanged && lflPace !== null;
    const [a, b] = lfl ? [m.likeForLike!.relative, o.likeForLike!.relative] : [m.total.relative, o.total.relative];
    title = pace === null ? `${label}: growth of ${inText(M)} and ${O}` : `${capitalise(inText(M))} ${grewText(pace)} ${O}${lfl ? ' like for like' : ''}: ${pct(a)} against ${pct(b)}`;
    verdict = lfl ? `In total the answer is the same (${pct(m.total.relative)} against ${pct(o.total.relative)}).` : '';
  }
  const parts: string[] = [`${label}, ${spans}: ${side(m)}; ${side(o)}.`];
  for (const g of [m, o]) {
    if (g.changed.length === 0 || !g.likeForLike) continue;
    const one = g.changed.length === 1;
    parts.push(
      `${capitalise(listJoin(changedText(g, locale)))} ${one ? 'was' : 'were'} not there through both periods, so ${one ? 'it is' : 'they are'} left out of ${inText(groupLabel(group, g.group))}' like-for-like growth: ${pct(g.likeForLike.relative)} over the other ${countOf(g.likeForLike.units, unitNoun, locale)}.`,
    );
  }
  if (verdict) parts.push(verdict);
  parts.push(`${f.unit ? `Each group's growth is over its own ${pluralNoun(unitNoun)}; t` : 'T'}wo growth rates side by side are a description, not a test of the ${group.label}.`);
  const takeaway = title;
  return { title, caption: parts.join(' '), notes: [], takeaway };
}
