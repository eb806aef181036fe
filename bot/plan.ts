// From a complete brief to a plan of sub-questions (each request kind through its lenses),
// shaped by the audience and capped in size, and the plan edits a requester can type.
import { isDeepStrictEqual } from 'node:util';
import type { ComparisonGroup, DatasetConfig } from '../config/schema.js';
import { firstBreakdownDimension, groupMadeOf, isAdditive, isBreakdownDimension, metricByName, namedUnitDimension, ownLevelDimension, plainCountMetric } from '../analysis/catalog.js';
import type { Coverage } from '../analysis/coverage.js';
import { SUB_QUESTIONS, type TemplateName } from '../analysis/sub-questions/registry.js';
import { type DateWindow, type Grain, type Lens, type RequestKind, type SubQuestion } from '../analysis/types.js';
import { type Brief, type Question, wholeRequestQuestion } from './brief.js';
import { fullWindow } from './reading/answers.js';
import { daySides } from './reading/day-filter.js';
import { isDayFilter } from '../analysis/day-of-week.js';
import { withStatistic } from '../analysis/statistic.js';
import { AGREE, CANCEL, CONCENTRATION_ASK, GROUP_GROWTH_ASK, grainNamedBy, SEASON_ASK, WEEKDAY_ASK } from './reading/lexicon.js';
import { describeWindow } from '../analysis/window-words.js';
import { addDays, daysBetween } from '../analysis/periods.js';
import { priorWindow } from '../analysis/templates/growth-compare.js';
import { describeSubQuestion } from '../analysis/sub-questions/describe.js';

export interface Plan {
  items: SubQuestion[];
  /** Kinds of question asked for that no template answers yet, said out loud in the plan. */
  notCovered: RequestKind[];
  /** Sub-questions left out by the size cap or the audience, in plain words for the reply. */
  leftOut: SubQuestion[];
  /** How calendar phrases were read ("this summer" -> the summer of 2024), said back. */
  readings: string[];
}

export const MAX_PLAN_ITEMS = 16;

/** A question about when in the year a measure peaks ("is generation seasonal?", "the busiest month"). */
export function asksWithinYear(text: string): boolean {
  return !WEEKDAY_ASK.test(text.toLowerCase()) && (SEASON_ASK.test(text.toLowerCase()) || /\bseason/i.test(text));
}

/** Why such a question has no answer on data stamped once a year: said on the card and with the plan. */
export const NO_WITHIN_YEAR = 'the data is stamped once a year, so no within-year pattern can be measured';
const LEADERSHIP_MAX_ITEMS = 6;
const LENS_ORDER: Lens[] = ['time_pattern', 'breakdown', 'summary', 'distribution'];

type Draft = Omit<SubQuestion, 'id'> & { headline: boolean; first?: boolean; defaultBreakdown?: boolean };

/** Metrics side by side in one period table; more are split over several tables so each stays legible. */
export const MAX_TABLE_METRICS = 4;

export function buildPlan(brief: Brief, ds: DatasetConfig, coverage: Coverage): Plan {
  const grain: Grain = brief.grain ?? 'month';
  // All the data, for the context of a growth or before/after answer; the brief's period, if it
  // names one, for questions that name none of their own.
  const history = fullWindow(coverage);
  if (!history) return { items: [], notCovered: [], leftOut: [], readings: [] };
  const all = brief.window ?? history;
  const drafts: Draft[] = [];
  const notCovered = new Set<RequestKind>();
  const readings: string[] = [];
  // "Weekends vs weekdays": each day set its own question, filtered to it (reading/day-filter.ts).
  const questions: Question[] = (brief.questions.length > 0 ? brief.questions : [wholeRequestQuestion(brief)]).flatMap(daySides);
  // Periods named to compare ("2009 vs 2008"): every growth answer of the request runs up to the
  // later of them, so none reads as the data's last two years instead (and two questions of one
  // request still share their items).
  const namedContext = upToLaterPeriod(questions.flatMap((q) => (q.compareWindow ? [q.window ?? all, q.compareWindow] : [])), history);
  for (const q of questions) {
    const group = groupFor(q, brief, ds);
    if (q.window) readings.push(`"${q.text}": ${describeWindow(q.window, coverage)}${q.windowSoFar ? ' so far (the data ends there)' : ''}${q.compareWindow ? `, against ${describeWindow(q.compareWindow, coverage)}` : ''}`);
    if (coverage.stamps === 'yearly' && asksWithinYear(q.text)) readings.push(`"${q.text}": ${NO_WITHIN_YEAR}`);
    const focus = q.window ?? all;
    // What every sub-question of this question carries: its filters and the hints the request gave.
    const shared: Partial<SubQuestion> = {
      filters: q.filters,
      ...(q.compareWindow ? { compareWindow: q.compareWindow } : {}),
      ...(q.spanEnds && !q.compareWindow ? { spanEnds: q.spanEnds } : {}),
      ...(q.launchDate ? { launchDate: q.launchDate } : {}),
      ...(q.perDay ? { perDay: true } : {}),
      ...(q.perRow ? { perRow: q.perRow } : {}),
      ...(q.rankLimit ? { rankLimit: q.rankLimit } : {}),
      ...(q.rankOrder ? { rankOrder: q.rankOrder } : {}),
      ...(q.rateUnit ? { rateUnit: q.rateUnit } : {}),
    };
    // A question's own breakdowns; the brief's (typed in a prompt) only when nothing else says.
    const own = q.dimensions.length > 0 ? q.dimensions : questions.length === 1 || brief.dimensionsAsked ? brief.dimensions : [];
    // Two values set against each other ("phone vs kiosk") are read through their breakdown.
    if (q.contrast && !own.includes(q.contrast.dimension)) own.push(q.contrast.dimension);
    const dims = own.filter((d) => isBreakdownDimension(ds, d));
    const metrics = q.metrics.length > 0 ? q.metrics : q.frequency ? [plainCountMetric(ds)?.name].filter((m): m is string => !!m) : brief.metrics;
    addPeriodTables(drafts, q, brief, metrics, grain, focus, shared);
    const before = drafts.length;
    // A question's own period frames its answers; without one, the brief's (or all the data).
    const span = q.window ?? all;
    // Kind and lens are the sub-question's own (its declaration in the registry).
    const add = (template: TemplateName, metric: string, headline: boolean, extra: Partial<SubQuestion> = {}, window: DateWindow = span) => {
      const { kind, lens } = SUB_QUESTIONS[template];
      const draft: Draft = { kind, lens, template, metrics: [metric], grain, window, filters: [], headline, ...shared, ...extra };
      // Two questions that come to the same thing ("how has it moved? the busiest months?") share
      // their items: one asks nothing the other does not (issue 17 item 11).
      const twin = drafts.find((d) => sameItem(d, draft, ds));
      if (twin) {
        twin.headline ||= headline;
        // "per decade" or "top 10" asked of one of the two is how the shared item states it.
        for (const hint of SHARED_HINTS) if (draft[hint] !== undefined && twin[hint] === undefined) Object.assign(twin, { [hint]: draft[hint] });
      } else drafts.push(draft);
    };
    // "Did phone grow faster than kiosk": the two values set against each other head the question's answers.
    const contrast = q.contrast && q.contrast.values.length === 2 && isBreakdownDimension(ds, q.contrast.dimension) ? q.contrast : null;
    // "Night vs day: how do strikes compare?" with no change asked: the two values' totals (or
    // levels) side by side over the period, then each one's course; their growth only when asked.
    const levels = contrast !== null && (q.kind === 'trend' || q.kind === 'kpi') && !q.compareWindow;
    if (contrast) {
      const pair = { dimension: contrast.dimension, values: [contrast.values[0]!, contrast.values[1]!] as [string, string] };
      for (const metric of metrics) {
        if (levels) {
          add('segment_shares', metric, true, { dimension: contrast.dimension, contrast: pair, answersAsked: true });
          add('segment_trend', metric, false, { dimension: contrast.dimension, contrast: pair });
        } else add('value_compare', metric, true, { dimension: contrast.dimension, contrast: pair });
      }
    }
    const ranks = q.ranking === true && dims.length > 0;
    // "What share of flights does ATL have": ATL's share of the whole heads the question's answers.
    const focused = q.shareOf && isBreakdownDimension(ds, q.shareOf.dimension) ? q.shareOf : null;
    for (const metric of metrics) {
      if (levels) break;
      const additive = ds.metrics.some((m) => m.name === metric) && isAdditive(metricByName(ds, metric));
      // A level whose breakdown's members carry their own level (catalog.ts ownLevelDimension): per member heads the answers.
      const entity = ds.metrics.some((m) => m.name === metric) ? ownLevelDimension(ds, metricByName(ds, metric), q.filters) : null;
      const perMember = entity !== null && dims.includes(entity.dimension) ? entity.dimension : null;
      if (focused && additive) {
        // Its share by month unless a grain was asked: weekly shares of a few months swing with the calendar more than with the share.
        const shareGrain: Grain = brief.evidence?.grain?.how === 'stated' || (grain !== 'day' && grain !== 'week') || monthsIn(span) < 2 ? grain : 'month';
        add('segment_shares', metric, true, { dimension: focused.dimension, focus: { ...focused }, answersAsked: true, grain: shareGrain });
        // "…, and is it growing?" of that share: its change by period (in the same item) answers it, not the whole's growth.
        if (q.kind !== 'trend') continue;
      }
      // "How has LWB done since it opened?": beside its own course, its share of everything over the
      // same days (from its first day), so it is set against the rest like for like in time.
      const own = q.ownStart;
      if (own && own.entered && additive && isBreakdownDimension(ds, own.dimension) && !focused) {
        const rest = q.filters.filter((f) => !(f.dimension === own.dimension && f.values.length === 1 && String(f.values[0]) === own.value));
        add('segment_shares', metric, false, { dimension: own.dimension, focus: { dimension: own.dimension, value: own.value }, filters: rest, grain: grain === 'day' && monthsIn(span) >= 2 ? 'week' : grain });
      }
      switch (q.kind) {
        case 'trend':
          // "Which species cause the most cost", "top 5 busiest airports": the ranking of the
          // breakdown heads the question's answers (bars by value where shares do not apply).
          // "How many airports make up 80% of flights": the shares and their Pareto count answer it.
          const concentrated = !ranks && dims.length > 0 && additive && CONCENTRATION_ASK.test(q.text.toLowerCase());
          if (ranks) for (const d of dims) add('segment_shares', metric, true, { dimension: d, answersAsked: true });
          if (concentrated) for (const d of dims) add('segment_shares', metric, true, { dimension: d });
          // The days of the week asked about ("which weekday", "by day of week"): the time pattern
          // answers it (on daily data) whatever the grain, heads the question and leads the summary.
          // A question kept to some days ("weekends" of "weekends vs weekdays") has no week's pattern to show.
          const weekdays = WEEKDAY_ASK.test(q.text.toLowerCase()) && !q.filters.some(isDayFilter);
          // A season put up as a guess ("I suspect winter is our worst season"): the month-of-year pattern answers it and heads the question.
          const seasonTest = !!q.seasonTested && !weekdays;
          add('series', metric, !ranks && !concentrated && !weekdays && !focused && !perMember && !seasonTest);
          if (grain === 'month' || weekdays || seasonTest) add('trend_seasonality', metric, weekdays || seasonTest, weekdays ? { weekdaysAsked: true, answersAsked: true } : seasonTest ? { answersAsked: true } : {});
          add('trend_test', metric, false);
          add('trend_summary', metric, false);
          for (const d of dims) add('segment_trend', metric, d === perMember && !ranks && !concentrated && !weekdays, { dimension: d });
          // "worst 10 by late share": a ranking by value answers it, whatever the metric, and heads the question.
          if ((additive || q.rankOrder) && !ranks && !concentrated) for (const d of dims) add('segment_shares', metric, !!q.rankOrder, { dimension: d });
          break;
        case 'growth':
          // The metric's own pattern over time is the context any growth answer is read against.
          // Over a short window of its own ("this summer") the growth series needs the history around it.
          // Two periods named ("2009 vs 2008"): their figures head the answers, whatever the
          // breakdown, and the growth around them runs up to the later one, so no answer under
          // the brief reads as the data's last two years instead.
          const named = !!q.compareWindow;
          const context = namedContext ?? (q.window && monthsIn(q.window) >= 13 ? q.window : history);
          // No period named at all: the card says "all the data, 2001 to 2017", so the segments'
          // growth runs over that span too, its first whole year against its last (as "since 2001"
          // does); the growth series beside it gives the latest year on the one before.
          const whole: Partial<SubQuestion> = !q.window && !brief.window && !named && !namedContext && !q.spanEnds ? { spanEnds: 'year' } : {};
          if (named) add('growth_periods', metric, true, {}, focus);
          add('series', metric, false, {}, context);
          add('growth_series', metric, !dims.length && !named, {}, context);
          // "Which channel is growing fastest": the segments ranked by their own rate answer it, and head the question.
          for (const [i, d] of dims.entries()) add('growth_drivers', metric, i === 0 && (!named || !!q.growthRank), { dimension: d, ...whole, ...(q.growthRank ? { growthRank: q.growthRank, answersAsked: true } : {}) }, focus);
          add('growth_summary', metric, false, {}, context);
          if (additive) for (const d of dims) add('growth_share_shift', metric, false, { dimension: d, ...whole }, focus);
          break;
        case 'performance': {
          if (!group) {
            // "Average delay before and after 1 April", with no group to set against: the metric
            // over equal spans either side of the date (as many days as the shorter side has), then
            // its course over all the data. Said as a before/after, not as an effect.
            const sides = launchSides(q.launchDate, q.window, history);
            if (sides) {
              add('growth_periods', metric, true, { compareWindow: sides.before, beforeAfter: true }, sides.after);
              add('series', metric, false, {}, history);
            }
            break;
          }
          const g = { comparisonGroup: group.name };
          const launch = q.launchDate ?? group.launch_date;
          const since = q.window ?? (launch ? { start: launch, end: history.end } : all);
          if (q.frequency) {
            // "Do they travel more often?" is a per-customer question: comparing the groups'
            // total bookings would mostly measure how many customers each group has.
            add('performance_frequency', metric, true, g, since);
            add('performance_before_after', metric, false, g, history);
            break;
          }
          // "Did the programme shops grow faster?" asks each group's own growth (in total and like
          // for like), not their levels: it heads the answers when the metric adds up over the
          // groups' units (shops), which like-for-like growth needs.
          const growth = GROUP_GROWTH_ASK.test(q.text.toLowerCase()) && additive && namedUnitDimension(ds, group) !== null;
          if (growth) add('performance_growth', metric, true, g, span);
          add('performance_compare', metric, !growth, g, since);
          add('performance_before_after', metric, false, g, history);
          // Never within a breakdown the group is made of ("Early Bake shops vs other shops within
          // each shop"): each of its segments holds one side only.
          const asked = dims.filter((x) => !groupMadeOf(ds, group, x));
          const d = asked[0] ?? firstBreakdownDimension(ds, q.filters, group);
          if (d) add('performance_by_segment', metric, false, { ...g, dimension: d, ...(asked[0] ? {} : { defaultBreakdown: true }) }, since);
          break;
        }
        case 'kpi': {
          const upTo = { start: history.start, end: focus.end };
          // "How many were unemployed in 2009": a period the request named, longer than one
          // period of the grain, is answered by its own figure (a flow's total, a level's mean
          // reading), beside the same dates a year earlier; its last month is the snapshot.
          const whole = q.window && !q.compareWindow && periodsIn(q.window, grain) > 1 ? q.window : null;
          // Listed with the KPI question it answers; a year before the data is said in the plan line.
          const prior = whole ? priorWindow(whole) : null;
          if (whole && prior) add('growth_periods', metric, true, { kind: 'kpi', compareWindow: prior, ...(prior.start < history.start ? { priorOutsideData: true } : {}) }, whole);
          add('kpi_snapshot', metric, !whole && !perMember, {}, upTo);
          add('kpi_context', metric, false, {}, upTo);
          for (const d of dims) add('kpi_by_segment', metric, ranks || (d === perMember && !whole), { dimension: d, ...(ranks ? { answersAsked: true } : {}) }, upTo);
          if (additive) for (const d of dims) add('kpi_mix', metric, false, { dimension: d }, upTo);
          break;
        }
      }
    }
    // "median delay": the question's items of an averaged metric take the statistic (analysis/statistic.ts).
    if (q.statistic && drafts.length > before) {
      // What the statistic could not reach is said on the card (reading/statistic-words.ts), where the measure is agreed.
      drafts.push(...withStatistic(drafts.splice(before), q.statistic, ds).items);
    }
    // A follow-up about the same share shares its item with the question before it.
    if (drafts.length === before && !focused) notCovered.add(q.kind);
  }
  // Leadership gets the headline of each question first, and fewer items.
  const leadership = brief.audience === 'leadership';
  const cap = leadership ? LEADERSHIP_MAX_ITEMS : MAX_PLAN_ITEMS;
  const kept = new Set(capOrder(drafts).slice(0, cap));
  // Shown grouped under each kind (in the order asked), headline first, then by lens; period tables open the plan.
  const kindOrder = [...new Set(drafts.map((d) => d.kind))];
  const rank = (d: Draft) => (d.first ? -1 : kindOrder.indexOf(d.kind) * 100 + (d.headline ? 0 : 10 + LENS_ORDER.indexOf(d.lens)));
  const ordered = [...drafts].sort((a, b) => rank(a) - rank(b));
  const keptOrdered = ordered.filter((d) => kept.has(d));
  const leftOrdered = ordered.filter((d) => !kept.has(d));
  const toSub = (d: Draft, i: number): SubQuestion => {
    const { headline: _headline, first: _first, defaultBreakdown: _default, ...sq } = d;
    return { id: `q${i + 1}`, ...sq };
  };
  return {
    items: keptOrdered.map(toSub),
    leftOut: leftOrdered.map((d, i) => toSub(d, keptOrdered.length + i)),
    notCovered: [...notCovered],
    readings,
  };
}

/**
 * Equal spans either side of a date a before/after turns on: from the date on, and as many days
 * before it, as far as the data (and the window asked, at its end) reaches on the shorter side.
 * None when the date is not inside the data.
 */
function launchSides(launch: string | undefined, window: DateWindow | undefined, history: DateWindow): { before: DateWindow; after: DateWindow } | null {
  if (!launch || launch <= history.start || launch >= history.end) return null;
  const end = window && window.end < history.end && window.end > launch ? window.end : history.end;
  const days = Math.min(daysBetween(history.start, launch), daysBetween(launch, end));
  if (days < 1) return null;
  return { before: { start: addDays(launch, -days), end: launch }, after: { start: launch, end: addDays(launch, days) } };
}

/**
 * The period table opens the plan when a question names two or more metrics and the brief has a
 * grain, or asks for the numbers period by period: the metrics side by side, split into tables of
 * at most MAX_TABLE_METRICS. A table already planned for the same metrics and window is not repeated.
 */
function addPeriodTables(drafts: Draft[], q: Question, brief: Brief, metrics: string[], grain: Grain, window: DateWindow, shared: Partial<SubQuestion>): void {
  // A ranking asked ("which phase costs the most") or two values set side by side ("night vs day") is
  // answered by those, not by a table of the pooled measures by period.
  if (metrics.length === 0 || !(q.table || (metrics.length >= 2 && brief.grain && !q.ranking && !q.contrast))) return;
  const count = Math.ceil(metrics.length / MAX_TABLE_METRICS);
  for (let k = 0; k < count; k++) {
    const chunk = metrics.slice(Math.round((k * metrics.length) / count), Math.round(((k + 1) * metrics.length) / count));
    const same = (d: Draft) => d.template === 'period_table' && d.metrics.join() === chunk.join() && d.window.start === window.start && d.window.end === window.end;
    if (drafts.some(same)) continue;
    const { kind, lens } = SUB_QUESTIONS.period_table;
    drafts.push({ kind, lens, template: 'period_table', metrics: chunk, grain, window, filters: [], ...shared, headline: true, first: true });
  }
}

/**
 * A question's hints that one of two questions may give and the other not ("top 10 pls" after
 * "which distributors earned the most", a year named to compare with): a shared item takes them.
 */
// A stretch named by its start (spanEnds, "since 2000") is a hint too: the question that gave it
// and one that only adds "top 10" plan the same item.
const SHARED_HINTS = ['rateUnit', 'rankLimit', 'rankOrder', 'growthRank', 'compareWindow', 'spanEnds'] as const;

/**
 * Whether two drafts come to the same item: everything but whether either heads its question is
 * the same, or all but a hint only one of them gives, where the plan would say both in the same
 * words (the hint changes nothing it computes: "top 10" on a monthly series, a comparison year on a
 * KPI snapshot). Two questions of one request that split apart ("which distributors earned the
 * most since 2000? top 10 pls") so plan and answer each thing once. The unit a rate is stated in
 * is shared as before, whatever the words.
 */
function sameItem(a: Draft, b: Draft, ds: DatasetConfig): boolean {
  const core = (d: Draft) => {
    const { headline: _h, first: _f, defaultBreakdown: _d, rateUnit: _r, rankLimit: _l, rankOrder: _o, growthRank: _g, compareWindow: _c, spanEnds: _s, ...rest } = d;
    return rest;
  };
  if (!isDeepStrictEqual(core(a), core(b))) return false;
  const conflicts = SHARED_HINTS.filter((h) => a[h] !== undefined && b[h] !== undefined && !isDeepStrictEqual(a[h], b[h]));
  if (conflicts.length > 0) return false;
  const oneSided = SHARED_HINTS.filter((h) => h !== 'rateUnit' && (a[h] === undefined) !== (b[h] === undefined));
  if (oneSided.length === 0) return true;
  // Said the same in the plan: the locale does not matter, the two are only compared with each other.
  const say = (d: Draft) => describeSubQuestion({ id: 'q', ...core(d), ...(d.rateUnit ? { rateUnit: d.rateUnit } : {}), ...pick(d, oneSided) }, ds, 'en');
  return say(a) === say(b);
}

function pick(d: Draft, hints: readonly (typeof SHARED_HINTS)[number][]): Partial<SubQuestion> {
  return Object.fromEntries(hints.flatMap((h) => (d[h] === undefined ? [] : [[h, d[h]]])));
}

/**
 * The order a capped plan keeps items in (issue 17 item 13): what was asked before what was
 * assumed, and a near-duplicate chart last. Period tables; each question's headline; the breakdowns
 * the request named; the other lenses; then breakdowns the plan chose itself and a second line of a
 * metric's own series (the same metric, window and grain drawn again with a mark or a mean). Within
 * each tier the metrics take turns, so a metric named last is not the one the cap drops whole.
 */
function capOrder(drafts: readonly Draft[]): Draft[] {
  const lines = new Set<string>();
  const repeat = new Set<Draft>();
  for (const d of [...drafts.filter((x) => x.headline), ...drafts.filter((x) => !x.headline)]) {
    if (!SUB_QUESTIONS[d.template].drawsSeriesLine) continue;
    const key = JSON.stringify([d.metrics, d.window, d.grain, d.filters]);
    if (lines.has(key)) repeat.add(d);
    else lines.add(key);
  }
  const last = (d: Draft) => repeat.has(d) || d.defaultBreakdown === true;
  const tiers = [
    drafts.filter((d) => d.first),
    drafts.filter((d) => !d.first && d.headline),
    drafts.filter((d) => !d.first && !d.headline && d.dimension !== undefined && !last(d)),
    drafts.filter((d) => !d.first && !d.headline && d.dimension === undefined && !last(d)),
    drafts.filter((d) => !d.first && !d.headline && last(d)),
  ];
  return tiers.flatMap(byTurns);
}

/** Items in turns by metric: the first of each metric, then the second of each, and so on. */
function byTurns(items: readonly Draft[]): Draft[] {
  const groups = new Map<string, Draft[]>();
  for (const d of items) {
    const key = d.metrics.join(',');
    groups.set(key, [...(groups.get(key) ?? []), d]);
  }
  const out: Draft[] = [];
  for (let i = 0; out.length < items.length; i++) for (const g of groups.values()) if (g[i]) out.push(g[i]!);
  return out;
}

/**
 * The growth context of periods named to compare: all the data up to the end of the latest of
 * them (its year-earlier rates are then the series' last), or null when none is named or that
 * leaves under two years.
 */
function upToLaterPeriod(named: readonly DateWindow[], history: DateWindow): DateWindow | null {
  if (named.length === 0) return null;
  const later = named.map((w) => w.end).sort().at(-1)!;
  const span = { start: history.start, end: later < history.end ? later : history.end };
  return monthsIn(span) >= 24 ? span : null;
}

/** How many periods of the grain a window spans, partly or whole (a day's window is 1 day). */
function periodsIn(w: DateWindow, grain: Grain): number {
  if (grain === 'day' || grain === 'week') return Math.ceil((Date.parse(w.end) - Date.parse(w.start)) / 86_400_000 / (grain === 'week' ? 7 : 1));
  const months = monthsIn(w) + (w.end.slice(8) > '01' ? 1 : 0);
  return Math.ceil(months / (grain === 'quarter' ? 3 : grain === 'year' ? 12 : 1));
}

function monthsIn(w: DateWindow): number {
  return (Number(w.end.slice(0, 4)) - Number(w.start.slice(0, 4))) * 12 + Number(w.end.slice(5, 7)) - Number(w.start.slice(5, 7));
}

function groupFor(q: Question, brief: Brief, ds: DatasetConfig): ComparisonGroup | undefined {
  const name = q.comparisonGroup ?? brief.comparisonGroup;
  return name ? ds.comparison_groups.find((g) => g.name === name) : ds.comparison_groups.length === 1 ? ds.comparison_groups[0] : undefined;
}

export type PlanEdit =
  | { type: 'agree' }
  | { type: 'drop'; numbers: number[] }
  | { type: 'grain'; grain: SubQuestion['grain'] }
  | { type: 'cancel' }
  /** "add a breakdown by channel": the phrase is matched to a dimension by the caller. */
  | { type: 'add_breakdown'; phrase: string; dimension?: string }
  /** "use 2024 instead", "since 2023-04": read against the data's coverage by the caller. */
  | { type: 'window'; phrase: string; window?: DateWindow; compareWindow?: DateWindow }
  | { type: 'unknown' };

// The breakdown lens of each request kind, for "add a breakdown by ...".
const BREAKDOWN_TEMPLATE: Record<RequestKind, TemplateName> = {
  trend: 'segment_trend',
  growth: 'growth_drivers',
  performance: 'performance_by_segment',
  kpi: 'kpi_by_segment',
};

export function readPlanEdit(text: string): PlanEdit {
  const t = text.trim().toLowerCase();
  if (AGREE.test(t)) return { type: 'agree' };
  if (CANCEL.test(t)) return { type: 'cancel' };
  const drop = /^(?:please\s+)?(?:drop|remove|delete|skip|lose|no)\s+(?:items?\s+|numbers?\s+|#)?(.+)$/.exec(t);
  if (drop) {
    const numbers = [...drop[1]!.matchAll(/\d+/g)].map((m) => Number(m[0]));
    if (numbers.length > 0 && !/\b(?:19|20)\d{2}\b/.test(drop[1]!)) return { type: 'drop', numbers };
  }
  const add = /^(?:please\s+)?(?:add|also|plus|and|include)\b.*?\b(?:by|per|across)\s+(.+?)[.!?]*$/.exec(t) ?? /\b(?:break|split)\s+(?:it|this|that|them)?\s*(?:down\s+)?(?:by|across)\s+(.+?)[.!?]*$/.exec(t) ?? /^(?:please\s+)?add\s+(?:the\s+|a\s+)?(.+?)(?:\s+breakdown)?[.!?]*$/.exec(t);
  if (add && !grainNamedBy(add[1]!)) return { type: 'add_breakdown', phrase: add[1]! };
  // A grain alone ("weekly", "by month"); a grain inside a period phrase ("the last 3 months") is a period.
  const grain = grainNamedBy(t);
  if (grain && /^(?:(?:make it|switch to|change to|use|go|do it|please|by|per|at)\s+)*(?:a\s+)?\S+(?:\s+(?:grain|instead|please|level|view|basis))?[.!]*$/.test(t)) return { type: 'grain', grain };
  // Anything naming a period ("use 2024", "since march 2024", "compare 2025 so far with 2024"): read by the caller.
  const phrase = t.replace(/^(?:(?:change|set|switch|move)\s+(?:the\s+)?(?:window|period|dates?|range)\s+to|(?:use|only|just|make it|do|for)\s+)/, '').replace(/\s+instead[.!?]*$/, '');
  if (/\d|\b(?:since|from|until|between|last|this|past|previous|year|month|quarter|week|day|half|ytd|mtd|qtd|to date|so far|all|everything|spring|summer|autumn|fall|winter|h[12]|q[1-4]|jan|feb|mar|apr|may|jun|jul|aug|sep|oct|nov|dec)/.test(phrase)) return { type: 'window', phrase };
  return { type: 'unknown' };
}

export function applyPlanEdit(plan: Plan, edit: PlanEdit): { plan: Plan; error?: string } {
  switch (edit.type) {
    case 'drop': {
      const bad = edit.numbers.filter((n) => n < 1 || n > plan.items.length);
      if (bad.length > 0) return { plan, error: `The plan has items 1 to ${plan.items.length}; there is no ${bad.join(', ')}.` };
      const items = plan.items.filter((_, i) => !edit.numbers.includes(i + 1));
      if (items.length === 0) return { plan, error: 'That would drop every item. Say "cancel" to stop the request instead.' };
      return { plan: { ...plan, items: renumber(items) } };
    }
    case 'grain':
      return { plan: { ...plan, items: plan.items.map((sq) => ({ ...sq, grain: edit.grain })) } };
    case 'window': {
      if (!edit.window) return { plan, error: `I couldn't read "${edit.phrase}" as a period.` };
      const w = edit.window;
      const compare = edit.compareWindow;
      // A new period replaces the old one's reading too ("since 2001" measured from its first year).
      return { plan: { ...plan, items: plan.items.map(({ spanEnds: _e, ...sq }) => ({ ...sq, window: w, ...(compare ? { compareWindow: compare } : {}) })) } };
    }
    case 'add_breakdown': {
      const dimension = edit.dimension;
      if (!dimension) return { plan, error: `I couldn't match "${edit.phrase}" to a breakdown.` };
      // One breakdown per question already in the plan (its kind, metric, window and group).
      const heads = new Map<string, SubQuestion>();
      for (const sq of plan.items) {
        // A period table's metrics each have their own questions; it takes no breakdown itself.
        if (sq.template === 'period_table') continue;
        const key = `${sq.kind}|${sq.metrics.join(',')}|${sq.comparisonGroup ?? ''}`;
        if (!heads.has(key)) heads.set(key, sq);
      }
      const added: SubQuestion[] = [];
      for (const sq of heads.values()) {
        const template = BREAKDOWN_TEMPLATE[sq.kind];
        const exists = plan.items.some((x) => x.template === template && x.dimension === dimension && x.metrics.join() === sq.metrics.join());
        if (exists) continue;
        const { dimension: _old, ...rest } = sq;
        added.push({ ...rest, template, lens: 'breakdown', dimension });
      }
      if (added.length === 0) return { plan, error: 'The plan already has that breakdown.' };
      const items = [...plan.items, ...added];
      if (items.length > MAX_PLAN_ITEMS) return { plan, error: `That would take the plan past ${MAX_PLAN_ITEMS} items; drop some first (e.g. "drop 3").` };
      return { plan: { ...plan, items: renumber(items) } };
    }
    default:
      return { plan };
  }
}

function renumber(items: SubQuestion[]): SubQuestion[] {
  return items.map((sq, i) => ({ ...sq, id: `q${i + 1}` }));
}
