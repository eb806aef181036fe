// The brief card: one message that says what was understood and what is assumed, with the plan
// beneath, so a requester agrees in one reply ("go") or corrects several things at once. Built
// from the brief (each slot with the words it was read from, or its default and why) and the plan;
// every platform shows its text, and those that can add a control per topic whose value is a
// correction read by the same reader as typed words.
import { statisticDataset } from '../analysis/statistic.js';
import { DAY_OF_WEEK, DAY_OF_WEEK_LABEL, daySetValueWords, daySetWords, daysKept, isDayFilter } from '../analysis/day-of-week.js';
import { inSentence, labelAtStart, listJoin, verbFor } from '../analysis/captions/grammar.js';
import type { Coverage } from '../analysis/coverage.js';
import { finestGrain, grainAdjective, isFinerGrain } from '../analysis/grains.js';
import { addDays } from '../analysis/periods.js';
import { GRAINS, type DateWindow, type Grain, type SubQuestion } from '../analysis/types.js';
import { describeWindow, shortWindow } from '../analysis/window-words.js';
import { isAdditive, isBreakdownDimension } from '../analysis/catalog.js';
import { dimensionPlural } from '../analysis/captions/trend-words.js';
import type { DatasetConfig } from '../config/schema.js';
import type { Brief, Evidence, Question } from './brief.js';
import { asksWithinYear, NO_WITHIN_YEAR, type Plan } from './plan.js';
import type { PostControl } from './port.js';
import { planLines } from './replies.js';
import { describeSubQuestion } from '../analysis/sub-questions/describe.js';
import { fullWindow } from './reading/answers.js';
import { AUDIENCE_LABELS, SEASON_ASK, WEEKDAY_ASK } from './reading/lexicon.js';

export const CARD_TOPICS = ['audience', 'deadline', 'metrics', 'grain', 'period', 'breakdowns', 'filters'] as const;
export type CardTopic = (typeof CARD_TOPICS)[number];

export interface CardChoice {
  /** What choosing it sends, as if typed: a correction the reader understands ("for leadership"). */
  value: string;
  label: string;
}

export interface CardLine {
  topic: CardTopic;
  label: string;
  value: string;
  /** `read`: from the request's words; `answered`: from an answer to a prompt; `assumed`: a default, with its reason. */
  how: 'read' | 'answered' | 'assumed';
  words?: string;
  reason?: string;
  /** The control a platform may show for it: a list to pick from, or a date. */
  control?: { kind: 'select'; choices: CardChoice[]; current?: string } | { kind: 'date'; current?: string };
}

export interface BriefCard {
  /** The questions in plain words. */
  questions: string[];
  lines: CardLine[];
  /** The plan's lines: numbered items under their kind's heading. */
  plan: string[];
  /** How many items the plan has. */
  items: number;
  leftOut: string[];
  notes: string[];
}

export interface CardContext {
  dataset: DatasetConfig;
  coverage: Coverage;
  locale: string;
  /** The defaults the plan was built with, so the card says what will run. */
  defaults: BriefDefaults;
}

/** What the bot assumes for what the request did not say, with reasons. */
export interface BriefDefaults {
  audience: { value: NonNullable<Brief['audience']>; reason: string };
  grain: { value: Grain; reason: string };
  /** The grain asked is finer than the data is stamped ("daily" on monthly data): the finest there is, and why. */
  grainCapped?: { asked: Grain; value: Grain; reason: string };
  /** Metrics taken for questions that named none ("did this summer beat last summer"). */
  metric?: { value: string; reason: string };
  /**
   * A breakdown to explain a change when none was asked; or, for the metrics in `levels`, the
   * breakdown whose members carry their own level of them (catalog.ts ownLevelDimension), which
   * every question of those metrics is answered by, whatever its kind.
   */
  breakdown?: { value: string; reason: string; levels?: string[] };
}

const AUDIENCE_CHOICES: CardChoice[] = (['leadership', 'managers', 'analysts'] as const).map((a) => ({ value: `for ${a}`, label: AUDIENCE_LABELS[a].label }));

export function buildCard(brief: Brief, plan: Plan, ctx: CardContext): BriefCard {
  const ds = ctx.dataset;
  const ev = brief.evidence ?? {};
  const lines: CardLine[] = [];
  const read = (e: Evidence | undefined) => (e?.how === 'answered' ? { how: 'answered' as const } : e?.words ? { how: 'read' as const, words: e.words } : { how: 'read' as const });
  const label = (m: string) => ds.metrics.find((x) => x.name === m)?.label ?? m;
  const dimLabel = (d: string) => (d === DAY_OF_WEEK ? DAY_OF_WEEK_LABEL : (ds.dimensions.find((x) => x.name === d)?.label ?? d));

  const audience = brief.audience ?? ctx.defaults.audience.value;
  lines.push({
    topic: 'audience',
    label: 'Audience',
    value: AUDIENCE_LABELS[audience].label,
    ...(brief.audience ? read(ev.audience) : { how: 'assumed' as const, reason: ctx.defaults.audience.reason }),
    control: { kind: 'select', choices: AUDIENCE_CHOICES, current: `for ${audience}` },
  });
  const deadline = brief.deadline && brief.deadline !== 'none' ? brief.deadline : undefined;
  lines.push({
    topic: 'deadline',
    label: 'Deadline',
    value: deadline ? `${brief.deadlineAsap ? 'as soon as possible, ' : ''}${longDate(deadline, ctx.locale)}` : 'none',
    ...(deadline ? read(ev.deadline) : { how: 'assumed' as const, reason: 'none given: it runs as soon as you say go' }),
    control: { kind: 'date', ...(deadline ? { current: deadline } : {}) },
  });
  const named = [...new Set(brief.questions.flatMap((q) => q.metrics))];
  const assumed = brief.questions.some((q) => q.metrics.length === 0 && !q.frequency) ? ctx.defaults.metric : undefined;
  lines.push({
    topic: 'metrics',
    label: named.length + (assumed ? 1 : 0) > 1 ? 'Measures' : 'Measure',
    value: [...named.map(label), ...(assumed && !named.includes(assumed.value) ? [`${label(assumed.value)} (assumed)`] : [])].join(', ') || 'none',
    ...(assumed ? { how: 'assumed' as const, reason: assumed.reason } : read(ev.metrics)),
    control: { kind: 'select', choices: ds.metrics.map((m) => ({ value: `measure ${m.label.toLowerCase()}`, label: m.label })) },
  });
  // A grain finer than the data is stamped is not offered: the coarser one is said, with why.
  const capped = ctx.defaults.grainCapped;
  const grain = capped ? capped.value : brief.grain ?? ctx.defaults.grain.value;
  lines.push({
    topic: 'grain',
    label: 'Grain',
    value: grainAdjective(grain, true),
    ...(capped ? { how: 'assumed' as const, reason: capped.reason } : brief.grain ? read(ev.grain) : { how: 'assumed' as const, reason: ctx.defaults.grain.reason }),
    control: { kind: 'select', choices: grainChoices(ctx.coverage), current: grainAdjective(grain) },
  });
  lines.push(periodLine(brief, ctx));
  const dims = [...new Set(brief.questions.flatMap((q) => q.dimensions))];
  // Two values set against each other ("Night vs day") are answered through their breakdown: it is in force, and read.
  const contrasted = [...new Map(brief.questions.flatMap((q) => (q.contrast && !dims.includes(q.contrast.dimension) ? [[q.contrast.dimension, q.contrast] as const] : []))).values()];
  const breakdown = dims.length === 0 && contrasted.length === 0 ? ctx.defaults.breakdown : undefined;
  const inForce = dims.length > 0 || contrasted.length > 0 ? [...dims, ...contrasted.map((c) => c.dimension)] : breakdown ? [breakdown.value] : [];
  const said = [...dims.map((d) => labelAtStart(dimLabel(d))), ...contrasted.map((c) => `${labelAtStart(dimLabel(c.dimension))} (${c.values.map((v) => (c.dimension === DAY_OF_WEEK ? daySetValueWords(v) : v)).join(' against ')})`)];
  lines.push({
    topic: 'breakdowns',
    label: 'Breakdowns',
    value: said.length > 0 ? said.join(', ') : breakdown ? `${dimLabel(breakdown.value)} (assumed)` : 'none',
    ...(dims.length > 0 ? read(ev.dimensions) : contrasted.length > 0 ? read(ev.filters) : breakdown ? { how: 'assumed' as const, reason: breakdown.reason } : { how: 'assumed' as const, reason: 'none asked' }),
    control: breakdownControl(ds, inForce.map(dimLabel)),
  });
  const filters = brief.questions.flatMap((q) => q.filters);
  if (filters.length > 0) {
    lines.push({
      topic: 'filters',
      label: 'Only',
      value: filters.map((f) => (isDayFilter(f) ? daySetWords(daysKept(f)) : `${f.exclude ? 'not ' : ''}${f.values.join(' or ')} (${inSentence(dimLabel(f.dimension))})`)).join('; '),
      ...read(ev.filters),
    });
  }
  const notes: string[] = [];
  if (brief.anchor && brief.anchor.why !== 'today') notes.push(anchorNote(brief.anchor, ctx));
  return {
    // Two questions read as the same thing are restated once (their plan items are shared too). A
    // question without a period of its own runs over the brief's, and is said so.
    questions: [...new Set(brief.questions.map((q) => restate(q.window || !brief.window ? q : { ...q, window: brief.window }, ds, ctx)))],
    lines,
    // The plan's headings and numbered items; its date readings and edit help are the card's own lines.
    plan: planLines(plan, ds, ctx.locale),
    items: plan.items.length,
    leftOut: leftOutLines(plan, ds, ctx.locale),
    notes,
  };
}

/** Where relative periods count from, in the card's own date words: the anchor is the day after the data ends. */
function anchorNote(anchor: NonNullable<Brief['anchor']>, ctx: CardContext): string {
  const last = ctx.coverage.lastDate;
  if (last && addDays(last, 1) <= anchor.today) return `Periods like "last month" count back from the end of the data (${longDate(addDays(anchor.today, -1), ctx.locale)}), not from today.`;
  return `Periods like "last month" count back from ${longDate(anchor.today, ctx.locale)}: ${anchor.why}.`;
}

/** What the size cap left out, each said once and none that reads as an item still in the plan (issue 17 item 12). */
function leftOutLines(plan: Plan, ds: DatasetConfig, locale: string): string[] {
  const say = (sq: SubQuestion) => describeSubQuestion(sq, ds, locale).replace(/\.$/, '');
  const kept = new Set(plan.items.map(say));
  return [...new Set(plan.leftOut.map(say))].filter((line) => !kept.has(line));
}

function periodLine(brief: Brief, ctx: CardContext): CardLine {
  const windowed = brief.questions.filter((q) => q.window);
  const full = fullWindow(ctx.coverage);
  const choices = periodChoices(ctx.coverage);
  if (windowed.length === 0 && !brief.window) {
    return {
      topic: 'period',
      label: 'Period',
      value: full ? `all the data, ${describeWindow(full, ctx.coverage, ctx.locale)}` : 'all the data',
      how: 'assumed',
      reason: 'no period named: the whole history shows the pattern best',
      control: { kind: 'select', choices, current: 'all the data' },
    };
  }
  const parts = (windowed.length > 0 ? windowed : [{ window: brief.window!, compareWindow: brief.compareWindow, windowSoFar: false } as Question]).map((q) => {
    const w = describeWindow(q.window!, ctx.coverage, ctx.locale);
    const so = q.windowSoFar ? ' so far' : '';
    return q.compareWindow ? `${w}${so} against ${describeWindow(q.compareWindow, ctx.coverage, ctx.locale)}` : `${w}${so}`;
  });
  const words = [brief.evidence?.window?.words, brief.evidence?.compareWindow?.words].filter(Boolean).join(' … ');
  const answered = brief.evidence?.window?.how === 'answered';
  const value = [...new Set(parts)].join('; ');
  // The select shows the period in force: one of its choices, or the period itself as the first
  // choice, sending words the reader takes back to the same dates. Several periods (one per
  // question) have no single choice to show.
  const periods = new Map((windowed.length > 0 ? windowed : [{ window: brief.window!, compareWindow: brief.compareWindow } as Question]).map((q) => {
    const choice = periodChoice(q.window!, q.compareWindow, ctx);
    return [choice.value, choice];
  }));
  const only = periods.size === 1 ? [...periods.values()][0]! : undefined;
  const control: CardLine['control'] = only
    ? { kind: 'select', choices: choices.some((c) => c.value === only.value) ? choices : [only, ...choices], current: only.value }
    : { kind: 'select', choices };
  return { topic: 'period', label: 'Period', value, how: answered ? 'answered' : 'read', ...(words && !answered ? { words } : {}), control };
}

/**
 * A period as a select's choice: it sends a correction the reader takes back to the same dates
 * (whole years "only 2010 to 2017", whole months "only 2024-03 to 2025-02", else days; a
 * comparison after "against"), and is labelled short enough for the select ("2010 to 2017",
 * "Mar 2024 to Feb 2025", "2016 vs 2015").
 */
function periodChoice(w: DateWindow, compare: DateWindow | undefined, ctx: CardContext): CardChoice {
  const wholeYears = (x: DateWindow) => x.start.endsWith('-01-01') && x.end.endsWith('-01-01');
  const words = (x: DateWindow) => {
    const last = addDays(x.end, -1);
    const [from, to] = wholeYears(x) ? [x.start.slice(0, 4), last.slice(0, 4)] : x.start.endsWith('-01') && x.end.endsWith('-01') ? [x.start.slice(0, 7), last.slice(0, 7)] : [x.start, last];
    return from === to ? from : `${from} to ${to}`;
  };
  const label = (x: DateWindow) => (wholeYears(x) ? words(x) : shortWindow(x, ctx.coverage.stamps, ctx.locale));
  return {
    value: `only ${words(w)}${compare ? ` against ${words(compare)}` : ''}`,
    label: compare ? `${label(w)} vs ${label(compare)}` : label(w),
  };
}

/**
 * The breakdown select: a breakdown to add, or none; the breakdowns in force are shown as its
 * current choice ("By source"), which sends them as read ("by source"), and "No breakdown" when none is.
 */
function breakdownControl(ds: DatasetConfig, inForce: string[]): CardLine['control'] {
  const choices: CardChoice[] = [...ds.dimensions.filter((d) => isBreakdownDimension(ds, d.name)).map((d) => ({ value: `add a breakdown by ${d.label.toLowerCase()}`, label: `Add ${inSentence(d.label)}` })), { value: 'no breakdown', label: 'No breakdown' }];
  if (inForce.length === 0) return { kind: 'select', choices, current: 'no breakdown' };
  const by = `by ${inForce.map(inSentence).join(' and ')}`;
  return { kind: 'select', choices: [{ value: by, label: cap(by) }, ...choices], current: by };
}

function grainChoices(coverage: Coverage): CardChoice[] {
  // Data stamped monthly has no daily or weekly grain to offer.
  const finest = finestGrain(coverage.stamps);
  return GRAINS.filter((g) => !isFinerGrain(g, finest)).map((g) => ({ value: grainAdjective(g), label: grainAdjective(g, true) }));
}

function periodChoices(coverage: Coverage): CardChoice[] {
  const choices: CardChoice[] = [{ value: 'all the data', label: 'All the data' }];
  if (!coverage.lastDate) return choices;
  choices.push({ value: 'the last 12 months', label: 'The last 12 full months' }, { value: 'year to date vs last year', label: 'This year so far against last' });
  const last = Number(coverage.lastDate.slice(0, 4));
  const first = Number((coverage.firstDate ?? coverage.lastDate).slice(0, 4));
  for (let y = last; y >= Math.max(first, last - 4); y--) choices.push({ value: `only ${y}`, label: String(y) });
  return choices;
}

/** A question in plain words: what, of which measure, over which period. */
function restate(q: Question, ds: DatasetConfig, ctx: CardContext): string {
  // "median delay": an averaged measure is restated with the statistic asked (analysis/statistic.ts).
  const seen = q.statistic ? statisticDataset(ds, { metrics: q.metrics, statistic: q.statistic }) : ds;
  const m = q.metrics.map((x) => inSentence(seen.metrics.find((y) => y.name === x)?.label ?? x));
  const assumed = ctx.defaults.metric ? inSentence(ds.metrics.find((y) => y.name === ctx.defaults.metric!.value)?.label ?? '') : '';
  const what = m.length > 0 ? listJoin(m) : assumed ? `${assumed} (assumed)` : 'a measure still to choose';
  // "bookings are", "revenue is"; two measures together are plural.
  const is = m.length > 1 ? 'are' : verbFor(m[0] ?? assumed);
  const dims = q.dimensions.map((d) => inSentence(ds.dimensions.find((x) => x.name === d)?.label ?? d));
  const by = dims.length > 0 ? ` by ${dims.join(' and ')}` : '';
  const only = q.filters.length > 0 ? ` (${q.filters.map((f) => (isDayFilter(f) ? daySetWords(daysKept(f)) : `${f.exclude ? 'not ' : ''}${f.values.join(' or ')}`)).join('; ')})` : '';
  const w = q.window ? describeWindow(q.window, ctx.coverage, ctx.locale) : '';
  const group = ds.comparison_groups.find((g) => g.name === q.comparisonGroup);
  // Two values set against each other head the question's answers, whatever its kind ("how do email tickets compare with phone tickets").
  if (q.contrast && q.kind !== 'performance') return `How ${q.contrast.values.map((v) => (q.contrast!.dimension === DAY_OF_WEEK ? daySetValueWords(v) : v)).join(' and ')} compare in ${what}${w ? `, ${w}` : ''}.`;
  // "Which species cause the most cost", "top 5 busiest airports": the ranking asked, not a pattern over time.
  const ranked = q.ranking ? ds.dimensions.find((x) => x.name === q.dimensions[0]) : undefined;
  if (ranked && (q.kind === 'trend' || q.kind === 'kpi')) {
    const when = w ? `, ${w}` : q.kind === 'kpi' ? ' in the latest complete period' : '';
    const additive = q.metrics.every((x) => { const metric = ds.metrics.find((y) => y.name === x); return metric ? isAdditive(metric) : true; });
    // The order asked, in the words of the measure: "the fewest strikes", "the least cost", "the lowest delay", "the worst late share".
    const counted = q.metrics.every((x) => ds.metrics.find((y) => y.name === x)?.unit === 'count');
    const order = q.rankOrder === 'lowest' ? (additive ? (counted ? 'fewest' : 'least') : 'lowest') : q.rankOrder === 'highest' ? (additive ? 'most' : 'highest') : q.rankOrder;
    if (q.rankLimit) return order && order !== 'most' ? `The ${q.rankLimit} ${dimensionPlural(ranked)} with the ${order} ${what}${only}${when}.` : `The top ${q.rankLimit} ${dimensionPlural(ranked)} by ${what}${only}${when}.`;
    return `Which ${inSentence(ranked.label)} has the ${order ?? (additive ? 'most' : 'highest')} ${what}${only}${when}.`;
  }
  // "what percentage of flights leave from ORD": the share asked heads the question, with the whole it is a share of.
  if (q.shareOf) {
    const dim = inSentence(ds.dimensions.find((x) => x.name === q.shareOf!.dimension)?.label ?? q.shareOf.dimension);
    const share = `${q.shareOf.value}'s share of all ${what}${only} (every ${dim})`;
    if (q.kind === 'growth' && q.compareWindow) return `How ${share} changed: ${w} against ${describeWindow(q.compareWindow, ctx.coverage, ctx.locale)}.`;
    return `${cap(share)}${w ? `, ${w}` : ''}, and how it moved.`;
  }
  switch (q.kind) {
    case 'growth':
      return q.compareWindow ? `How ${what}${only} changed${by}: ${w} against ${describeWindow(q.compareWindow, ctx.coverage, ctx.locale)}.` : `How fast ${what}${only} ${is} growing${by}${w ? `, ${w}` : ''}.`;
    case 'kpi':
      return `Where ${what}${only} ${is === 'are' ? 'stand' : 'stands'}${by}${w ? ` in ${w}` : ' in the latest complete period'}.`;
    case 'performance':
      if (group) return `${cap(what)}: ${inSentence(group.members_label)} against ${inSentence(group.others_label)}${q.frequency ? ' (how often each customer books)' : ''}${q.launchDate ? `, since ${longDate(q.launchDate, ctx.locale)}` : ''}.`;
      return `${cap(what)} before and after ${q.launchDate ? longDate(q.launchDate, ctx.locale) : 'the change'}.`;
    default:
      // A question about when things peak keeps that detail, so it is not folded into "how it moved".
      // "the busiest day of the week" asks about weekdays, though "busiest" alone asks about the year.
      if (WEEKDAY_ASK.test(q.text)) return `Which days of the week ${what}${only} ${is} highest and lowest on${by}${w ? `, ${w}` : ''}.`;
      // Data stamped once a year has no within-year pattern: said, with what is answered instead.
      if (asksWithinYear(q.text) && ctx.coverage.stamps === 'yearly') return `When in the year ${what}${only} ${is} highest and lowest: ${NO_WITHIN_YEAR}; the answers show how it moved year by year${by}${w ? `, ${w}` : ''}.`;
      if (q.seasonTested) return `Whether ${q.seasonTested} is when ${what}${only} ${is} highest or lowest, against the other seasons${by}${w ? `, ${w}` : ', over all the data'}.`;
      if (SEASON_ASK.test(q.text) || /\bseason/i.test(q.text)) return `When in the year ${what}${only} ${is} highest and lowest${by}${w ? `, ${w}` : ''}.`;
      return `How ${what}${only} moved${by}${w ? `, ${w}` : ' over time'}.`;
  }
}

/** The card as one message's text: plain words with light markdown, as every platform shows it. */
export function cardText(card: BriefCard): string {
  const out: string[] = ['*Here is what I understood.* Say "go" to run it, or change anything in your own words.'];
  out.push(card.questions.length > 1 ? '*Questions*' : '*Question*');
  card.questions.forEach((q, i) => out.push(card.questions.length > 1 ? `${i + 1}. ${q}` : q));
  for (const l of card.lines) {
    const source = l.how === 'read' ? (l.words ? `from "${clip(l.words)}"` : 'from your request') : l.how === 'answered' ? 'your answer' : `assumed: ${l.reason}`;
    out.push(`- *${l.label}:* ${l.value} _(${source})_`);
  }
  out.push(`*Plan* (${card.items} ${card.items === 1 ? 'answer' : 'answers'})`);
  out.push(...card.plan);
  if (card.leftOut.length > 0) out.push(`Left out to keep it focused: ${card.leftOut.join('; ')}.`);
  out.push(...card.notes);
  out.push('For example: "for leadership, weekly, only 2024, add channel, drop 3"; or "cancel".');
  return out.join('\n');
}

/** The card's controls: a select per topic that has choices, a date for the deadline. */
export function cardControls(card: BriefCard): PostControl[] {
  const out: PostControl[] = [];
  for (const l of card.lines) {
    if (!l.control) continue;
    if (l.control.kind === 'date') out.push({ topic: l.topic, label: l.label, kind: 'date', choices: [], sends: 'deadline {date}', ...(l.control.current ? { current: l.control.current } : {}) });
    else if (l.topic !== 'metrics') out.push({ topic: l.topic, label: l.label, kind: 'select', choices: l.control.choices, ...(l.control.current ? { current: l.control.current } : {}) });
  }
  return out;
}

function clip(s: string): string {
  return s.length > 60 ? `${s.slice(0, 57)}...` : s;
}

function cap(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}

const dateFormats = new Map<string, Intl.DateTimeFormat>();

function longDate(iso: string, locale: string): string {
  let f = dateFormats.get(locale);
  if (!f) dateFormats.set(locale, (f = new Intl.DateTimeFormat(locale, { day: 'numeric', month: 'long', year: 'numeric', timeZone: 'UTC' })));
  return f.format(new Date(`${iso}T00:00:00Z`));
}

export type { DateWindow };
