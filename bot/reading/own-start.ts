// A named segment measured from its own start ("How has LWB done since it opened?", "since we
// launched the Leeds site", "since Arsenal's first match in the data"): the window begins on the
// value's first day in the data, when the presence rule (analysis/presence.ts) says it entered
// part-way, and the card says what it found. A value there from the data's first day has no start
// in the data: said, and all of it is read. Words that anchor to a start with no value to anchor
// to ("since launch" and nothing named) are said back with what was assumed, never answered as
// another question silently.
import { addDays, daysBetween } from '../../analysis/periods.js';
import { enteredAfter, presenceToleranceDays } from '../../analysis/presence.js';
import { dimensionByName, isBreakdownDimension } from '../../analysis/catalog.js';
import { inSentence } from '../../analysis/captions/grammar.js';
import { fullWindow } from './answers.js';
import type { Question } from '../brief.js';
import type { DatasetFacts } from './read-request.js';
import { isDayFilter } from '../../analysis/day-of-week.js';

const START_VERB = `(?:first\\s+)?(?:opened|opened\\s+up|launched|started|began|begun|went\\s+live|came\\s+online|arrived|joined|appeared|showed\\s+up|debuted|entered(?:\\s+the\\s+data)?|was\\s+(?:added|introduced|launched|opened)|were\\s+(?:added|introduced|launched|opened))`;
const START_NOUN = `(?:launch|opening|start|debut|beginning|arrival|first\\s+day)`;
/**
 * Words that anchor a window to the start of what the question names: "since it opened", "since
 * we launched X", "since X started", "since launch", "since its first match in the data", "since
 * day one". "since the start of 2024" is a calendar period (periods.ts), not this.
 */
export const OWN_START = new RegExp(
  [
    `\\bsince\\s+(?:[\\p{L}\\p{N}'’&.-]+\\s+){0,3}?${START_VERB}\\b`,
    `\\bsince\\s+(?:the\\s+|its\\s+|their\\s+|[\\p{L}\\p{N}&.-]+(?:'s|’s|s')\\s+)?${START_NOUN}\\b(?!\\s+of\\b)`,
    `\\bsince\\s+(?:its|their|[\\p{L}\\p{N}&.-]+(?:'s|’s|s'))\\s+(?:very\\s+)?first\\s+[\\p{L}]+`,
    `\\bsince\\s+(?:it|they)\\s+(?:was|were)\\s+first\\s+(?:seen|recorded)\\b`,
    `\\bsince\\s+day\\s+one\\b`,
    `\\bfrom\\s+(?:its|their|the)\\s+(?:very\\s+)?(?:start|launch|opening|first\\s+day)\\b(?!\\s+of\\b)`,
  ].join('|'),
  'iu',
);

/** Where a question's window was anchored to its segment's start, for the plan. */
export interface OwnStart {
  dimension: string;
  value: string;
  /** The value's first day in the data. */
  first: string;
  /** The presence rule found it entered part-way (else it was there from the data's first day). */
  entered: boolean;
}

/** The one value the question names of a breakdown, or null when it names none or several. */
function namedValue(q: Question, facts: DatasetFacts): { dimension: string; value: string } | null {
  const named = [...q.filters.filter((f) => !f.exclude && !isDayFilter(f) && isBreakdownDimension(facts.dataset, f.dimension)), ...(q.shareOf ? [{ dimension: q.shareOf.dimension, values: [q.shareOf.value] }] : [])];
  if (named.length !== 1 || named[0]!.values.length !== 1) return null;
  return { dimension: named[0]!.dimension, value: String(named[0]!.values[0]) };
}

/** "flight" from the count of rows labelled "Flights": what one row is, for "its first flight". */
function rowWord(facts: DatasetFacts): string {
  const count = facts.dataset.metrics.find((m) => m.definition.type === 'count' && !('where' in m.definition && m.definition.where));
  const label = count ? inSentence(count.label) : '';
  if (/^[a-z]+s$/.test(label) && !/ss$/.test(label) && label !== 'rows') return label.replace(/(?<=[^aeiou])ies$/, 'y').replace(/s$/, '');
  return 'day';
}

function longDay(iso: string): string {
  const d = new Date(`${iso}T00:00:00Z`);
  return `${d.getUTCDate()} ${d.toLocaleString('en-GB', { month: 'long', timeZone: 'UTC' })} ${d.getUTCFullYear()}`;
}

/**
 * Anchors each question whose words tie its window to the start of what it names, in place, and
 * returns what to say back. A question that already has its own period or a launch date (a
 * comparison group's) is left as it is; so is one whose value is still to be chosen (an ambiguous
 * name), which is anchored once the answer names it (bot/prompts.ts).
 */
export function anchorToOwnStart(questions: Question[], facts: DatasetFacts, pending = false): string[] {
  const notes: string[] = [];
  const data = fullWindow(facts.coverage);
  if (!data) return notes;
  for (const q of questions) {
    const words = OWN_START.exec(q.text);
    if (!words || q.window || q.launchDate || q.comparisonGroup || q.ownStart) continue;
    const named = namedValue(q, facts);
    if (!named) {
      if (pending) continue;
      notes.push(`"${words[0]}" read, but no single value is named to start from, so no start could be found: reading all the data (from ${longDay(data.start)}). Name one (say "since X opened") or give a date to start from.`);
      if (q.kind === 'performance') q.kind = 'trend';
      continue;
    }
    const life = facts.values?.get(named.dimension)?.values.find((v) => v.value === named.value);
    const dim = inSentence(dimensionByName(facts.dataset, named.dimension).label);
    if (!life?.first || !life.last || life.months === undefined) {
      notes.push(`"${words[0]}" read as from ${named.value}'s first day in the data, but when that was is not known here: reading all the data.`);
      continue;
    }
    const entered = enteredAfter({ first: life.first, last: life.last, activeMonths: life.months }, data.start, presenceToleranceDays(data));
    // A before/after of a segment with no rows before it makes no sense: its course since then is the question.
    if (q.kind === 'performance') q.kind = 'trend';
    q.ownStart = { dimension: named.dimension, value: named.value, first: life.first, entered };
    if (!entered) {
      notes.push(`"${words[0]}": ${named.value} (${dim}) is in the data from its first day (${longDay(data.start)}) on, so its start is before the data; reading all of it.`);
      continue;
    }
    const end = data.end;
    if (daysBetween(life.first, end) < 1) continue;
    q.window = { start: life.first, end };
    notes.push(`${named.value}'s first ${rowWord(facts)} in the data is ${longDay(life.first)}; reading from there to ${longDay(addDays(end, -1))} ("${words[0]}").`);
  }
  return notes;
}
