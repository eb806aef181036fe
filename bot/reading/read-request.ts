// The one reader: a request's text, the dataset's catalog and facts about its data (what dates
// it covers, the values of its breakdowns) in; a brief out, every slot with the words it came
// from. The bot's conversation, `threadcount ask` and `threadcount read` all read through here.
import { type Coverage, dataEnd } from '../../analysis/coverage.js';
import { datesAfterWords, describeWindow } from '../../analysis/window-words.js';
import { addDays } from '../../analysis/periods.js';
import { inSentence } from '../../analysis/captions/grammar.js';
import type { DateWindow, Grain, GrowthRank, RankOrder, RequestKind, SegmentFilter, SpanEndsUnit } from '../../analysis/types.js';
import type { ValueIndex } from '../../analysis/values/value-index.js';
import type { DatasetConfig, Metric } from '../../config/schema.js';
import type { AmbiguousValue, Askable, Brief, BriefSlot, Evidence, Question } from '../brief.js';
import { daysBetween, minIso, monthWindow, periodHolding, type PeriodUnit, shiftMonths, shiftPeriod, shiftWeeksYears, yearOf } from './calendar.js';
import { type CatalogEntry, type CatalogHit, closestEntries, findCatalogHits, measureBeside, prepareCatalog, type PreparedCatalog } from './catalog-match.js';
import { splitClauses, type Clause } from './clauses.js';
import { stem } from './catalog-match.js';
import { findDeadlines } from './deadline.js';
import { readIntent } from './intent.js';
import {
  AUDIENCE_CUES,
  BREAKDOWN_BEFORE,
  BREAKDOWN_WH,
  FRAME_OPENING,
  FREQUENCY,
  GRAIN_WORDS,
  type MetricRole,
  NOT_RANK,
  ORDINARY,
  OVERALL,
  RANK_ASK,
  RANK_WORDS,
  rankOrderOf,
  rankRunOrder,
  growthRankOf,
  REFINES_PREVIOUS,
  ROLE_WORDS,
  SEASON_ASK,
  SHARE_ASK,
  STOPWORDS,
  VOLUME_WORDS,
  WEEKDAY_ASK,
} from './lexicon.js';
import { findPeriods, type PeriodContext, type PeriodMention } from './periods.js';
import { findUndatedEvents, type UndatedEvent } from './undated-events.js';
import { hypothesisSeasons } from './hypothesis-seasons.js';
import { isoDateIn } from './time-zone.js';
import { overlaps, RequestText, type Span } from './text.js';
import { applyStatistics, readStatistics } from './statistic-words.js';
import { type DayReading, type DaySetMention, readDaySets } from './day-filter.js';
import { DAY_OF_WEEK, dayFilter, dayScopeWords, isDayFilter } from '../../analysis/day-of-week.js';
import { findUnknownTerms } from './unknown-words.js';
import { focusShares } from './share-focus.js';
import { anchorToOwnStart } from './own-start.js';
import { mendCalendarWords } from './spelling.js';
import { COUNTING, rankMetrics } from './metric-ranking.js';
import { extremeOrder, findPeriodExtremes, type PeriodExtreme, superlativeIn, wholeHistorySpans } from './extremes.js';
import { groupMadeOf, isMemberValue, memberValues, metricKind } from '../../analysis/catalog.js';
import { listJoin } from '../../analysis/captions/grammar.js';
import { AUDIENCES, GRAINS } from '../../analysis/types.js';

/** What the reader knows about a dataset's data. */
export interface DatasetFacts {
  dataset: DatasetConfig;
  coverage: Coverage;
  values?: ValueIndex;
  /** How the data is stamped, when known: data stamped monthly is complete for its last stamped month. */
  stamp?: 'daily' | 'weekly' | 'monthly' | 'quarterly' | 'yearly' | 'irregular';
}

export interface ReadOptions {
  now: Date;
  /** The charts' locale: numeric dates are read month first only in en-US. */
  locale?: string;
}

/**
 * How many characters of a request are read. Chat platforms keep a message to a few thousand
 * characters (Slack advises at most 4,000 in a message's text; Discord allows 2,000), so a longer
 * request is nearly always a pasted document. The rest is not read, and the thread is told so;
 * the whole text stays in the brief and in the audit log. Counted in UTF-16 units, as everywhere.
 */
export const REQUEST_READ_LIMIT = 4_000;

/** The part of a request that is read: all of it up to the limit, else the start, cut between words. */
export function readablePart(text: string, limit = REQUEST_READ_LIMIT): string {
  if (text.length <= limit) return text;
  let cut = limit;
  // Never split a UTF-16 surrogate pair (an emoji or other character outside the BMP).
  if (/[\uD800-\uDBFF]/.test(text[cut - 1]!)) cut--;
  // Back off to the last space in the final 200 characters, so no word is half read.
  const space = text.slice(cut - 200, cut).search(/\s\S*$/);
  if (space >= 0) cut = cut - 200 + space;
  return text.slice(0, cut);
}

export function requestWasCut(text: string): boolean {
  return readablePart(text).length < text.length;
}

/** The reference "today" relative periods count from, and why. */
export function anchorOf(today: string, facts: Pick<DatasetFacts, 'coverage' | 'stamp'>): { today: string; why: string; dataEnd: string | null } {
  const last = facts.coverage.lastDate;
  if (!last) return { today, why: 'today (the dataset has no rows)', dataEnd: null };
  // Data stamped once a period covers the whole of its last stamped period.
  const stampedEnd = dataEnd({ lastDate: last, ...(facts.stamp ? { stamps: facts.stamp } : {}) });
  if (stampedEnd <= today) {
    return { today: stampedEnd, why: `the data ends on ${addDays(stampedEnd, -1)}, before today, so relative periods count back from there`, dataEnd: stampedEnd };
  }
  return { today, why: 'today', dataEnd: stampedEnd };
}

/** An ordinary word for a kind of measure ("takings", "how many"), with the metrics of that kind. */
interface RoleHit {
  span: Span;
  role: MetricRole;
  metrics: string[];
  /** Named with a word the catalog does not know ("trading volume"): a measure the data lacks. */
  qualified?: true;
  /** A bare "volume" that could be several counts of the data: asked, never guessed. */
  several?: true;
  /** How a bare "volume" was read, said back on the card ("volume" read as the number of tickets). */
  saidBack?: string;
}

interface ReadState {
  text: RequestText;
  ds: DatasetConfig;
  catalog: PreparedCatalog;
  anchor: string;
  dataEnd: string | null;
  periods: PeriodMention[];
  hits: CatalogHit[];
  roleHits: RoleHit[];
  grainSpans: Span[];
  evidence: Partial<Record<BriefSlot, Evidence>>;
  /** A word of several metrics' labels ("gross" of US Gross and Worldwide Gross): asked, never guessed. */
  sharedMetricHits: CatalogHit[];
  /** Readings said back on the card. */
  notes: string[];
  /** The request's words for days of the week ("on fridays"), the evidence of a day filter. */
  dayWords?: string[];
  /** The request's own words for a value read from part of its name ("nuclear" for Nuclear Energy), for the card's "from …". */
  partWords?: Map<string, string>;
  /** Superlatives beside a time noun ("the hottest day"): the grain of an extreme, and its end. */
  extremes: PeriodExtreme[];
  /** Measures a quality word pointed to ("hottest" to the daily high), with those words, for evidence. */
  inferredMetrics: { metric: string; words: string }[];
  /** "unemployment rate" where the catalog has the count but no rate of it: a measure it lacks, asked. */
  ratesOfCounts: Span[];
}

export function readRequest(fullText: string, facts: DatasetFacts, opts: ReadOptions): Brief {
  const ds = facts.dataset;
  const catalog = prepareCatalog(ds, facts.values);
  const seasons = seasonAsYear(mendCalendarWords(readablePart(fullText), catalogWords(catalog)));
  const text = new RequestText(seasons.text);
  const dayFirst = !/-US$/i.test(opts.locale ?? '');
  const today = isoDateIn(opts.now, ds.timezone);
  const anchor = anchorOf(today, facts);
  const evidence: Partial<Record<BriefSlot, Evidence>> = {};

  const personalValues = findPersonalValues(text);
  const deadlines = findDeadlines(text, today, dayFirst);
  for (const d of deadlines) text.claim(d);
  const periodCtx: PeriodContext = {
    anchor: anchor.today,
    hemisphere: ds.hemisphere ?? 'north',
    dayFirst,
    events: (ds.events ?? []).map((e) => ({ name: e.name, phrases: e.synonyms ?? [], window: { start: e.from, end: addDays(e.to, 1) } })),
    dataEnded: anchor.dataEnd !== null && anchor.today === anchor.dataEnd && anchor.today < today,
  };
  const periods = findPeriods(text, periodCtx);
  for (const p of periods) text.claim(p);
  // "the hottest day", "which month had the most flights": the time noun is the extreme's grain, not
  // a count of days; "on record", "ever" ask over the whole history, which no period is.
  const extremes = findPeriodExtremes(text);
  for (const e of extremes) for (const s of e.spans) text.claim(s);
  for (const s of wholeHistorySpans(text)) text.claim(s);
  // "the busiest day of the week", "which days of the week": a breakdown by day of the week (the
  // plan's weekday pattern, WEEKDAY_ASK), never a count of days.
  for (const m of text.matches(/(?<![\p{L}])days?[- ]of[- ](?:the[- ])?week(?![\p{L}])/gu)) text.claim(m.span);
  const hits = findCatalogHits(text, catalog);
  for (const h of hits) text.claim(h);
  // "in the recession": an event the data cannot date, never a value it lacks (undated-events.ts).
  const events = findUndatedEvents(text);
  for (const e of events) text.claim(e);
  const roleHits = findRoleWords(text, ds);
  // A business word the catalog has no metric for ("revenue" on a support desk) stays free, to be said back as unknown.
  for (const r of roleHits) if (r.metrics.length > 0) text.claim(r.span);
  // "on Fridays", "weekend orders", "weekends vs weekdays": days of the week as a filter (day-filter.ts).
  const daySets = readDaySets(text);
  for (const m of daySets.mentions) text.claim(m.span);
  // "median delay", "p90": a statistic of the measure (statistic-words.ts).
  const statistics = readStatistics(text, hits, ds);
  for (const m of statistics) text.claim(m.span);
  // "on a typical day": the day is the statistic's, no count of days.
  for (let i = hits.length - 1; i >= 0; i--) if (statistics.some((m) => hits[i]!.start >= m.span.start && hits[i]!.end <= m.span.end)) hits.splice(i, 1);
  const grain = readGrain(text) ?? extremeGrain(extremes);
  if (grain) {
    evidence.grain = { words: grain.words, how: grain.how };
    for (const s of grain.spans) text.claim(s);
  }
  const audience = readAudience(text, hits);
  if (audience) {
    evidence.audience = { words: audience.words, how: audience.how };
    text.claim(audience.span);
  }

  // "per decade": the unit a rate of change is stated in, not a term of the data.
  for (const m of text.matches(/(?<![\p{L}])(?:per|a|each)\s+decade(?![\p{L}])/gu)) text.claim(m.span);

  const state: ReadState = { text, ds, catalog, anchor: anchor.today, dataEnd: anchor.dataEnd, periods, hits, roleHits, grainSpans: grain?.spans ?? [], evidence, sharedMetricHits: [], notes: [], extremes, inferredMetrics: [], ratesOfCounts: [] };
  const { questions, ambiguous } = readQuestions(state);
  // "I suspect winter is our worst season": the season is the guess to test, not the period.
  const tested = hypothesisSeasons(text.lower, periods);
  for (const t of tested) {
    for (const q of questions) {
      if (!q.window || q.window.start !== t.mention.window!.start) continue;
      delete q.window;
      delete q.windowSoFar;
      delete q.spanEnds;
      delete q.compareWindow;
      q.seasonTested = t.season;
      if (q.kind === 'kpi' || q.kind === 'growth') q.kind = 'trend';
    }
  }
  applyDaySets(questions, daySets, text, state.notes);
  state.dayWords = daySets.mentions.map((m) => m.words);
  applyStatistics(questions, statistics, state.notes, ds);
  const unknownTerms = findUnknownTerms(text, { catalog });
  // "unemployment rate" with a count of the unemployed and no rate of it: the rate asked is a
  // measure the catalog lacks, said back with the closest, never read as the count.
  for (const span of state.ratesOfCounts) {
    const words = text.quote(span).toLowerCase();
    if (!unknownTerms.some((u) => u.text === words)) unknownTerms.push({ text: words, closest: closestEntries(words, catalog, ['metric']), role: 'metric' });
  }
  // A bare "volume" that could be several counts of the data: asked, with those counts as the closest.
  for (const r of roleHits) {
    if (!r.several || !questions.some((q) => q.metrics.length === 0 && q.text.includes(text.quote(r.span)))) continue;
    const words = text.quote(r.span).toLowerCase();
    for (let i = unknownTerms.length - 1; i >= 0; i--) if (unknownTerms[i]!.text === words) unknownTerms.splice(i, 1);
    unknownTerms.push({ text: words, closest: volumeCandidates(ds), role: 'metric', several: true });
  }
  // A word of several metrics' labels, in a question with no measure of its own: which one, asked.
  for (const h of state.sharedMetricHits) {
    const words = text.quote(h).toLowerCase();
    if (!questions.some((q) => q.metrics.length === 0 && !q.frequency && q.text.toLowerCase().includes(words))) continue;
    for (let i = unknownTerms.length - 1; i >= 0; i--) if (unknownTerms[i]!.text === words || unknownTerms[i]!.text.split(' ').includes(words)) unknownTerms.splice(i, 1);
    const candidates = unique(h.entries.filter((e) => e.kind === 'metric').map((e) => e.name));
    if (!unknownTerms.some((u) => u.role === 'metric' && u.several)) unknownTerms.push({ text: words, closest: candidates, role: 'metric', several: true });
    // "in the US" beside "gross": a word of one of their labels tells them apart (bot/reading/metric-ranking.ts), it is no value the data lacks.
    const labelWords = new Set(ds.metrics.filter((m) => candidates.includes(m.name)).flatMap((m) => m.label.toLowerCase().split(/[^\p{L}\p{N}]+/u)));
    for (let i = unknownTerms.length - 1; i >= 0; i--) if (unknownTerms[i]!.role !== 'metric' && labelWords.has(unknownTerms[i]!.text)) unknownTerms.splice(i, 1);
  }
  // A business word the catalog has no measure for ("revenue" on a support desk's data).
  for (const r of roleHits) {
    const words = text.quote(r.span).toLowerCase();
    if (r.metrics.length === 0 && (r.role === 'amount' || r.role === 'average_amount' || r.qualified) && !/how much/.test(words) && !unknownTerms.some((u) => u.text === words || words.includes(u.text) || (u.several && r.role === 'amount'))) {
      for (let i = unknownTerms.length - 1; i >= 0; i--) if (words.includes(unknownTerms[i]!.text)) unknownTerms.splice(i, 1);
      unknownTerms.push({ text: words, closest: closestEntries(words, catalog, ['metric']), role: 'metric' });
    }
  }

  // A word that is also a value ("email" the channel) names personal data only where the words around it say so, as in a clause.
  const personal = unique(hits.filter((h) => !(h.entries.some((e) => e.kind === 'value') && !personalContext(h, text))).flatMap((h) => h.entries.filter((e) => e.kind === 'personal').map((e) => e.name)));
  const deadline = deadlines.find((d) => d.date !== null);
  const pastDeadline = deadlines.find((d) => d.date === null && d.past)?.past;

  // "What share of flights does ATL have": ATL is the focus of the share, not a filter.
  state.notes.push(...focusShares(questions, ds));
  // "How has LWB done since it opened?": from LWB's first day in the data (own-start.ts).
  state.notes.push(...anchorToOwnStart(questions, facts, ambiguous.length > 0));
  const brief: Brief = {
    requestText: fullText,
    questions,
    kinds: unique(questions.map((q) => q.kind)),
    metrics: unique(questions.flatMap((q) => q.metrics)),
    dimensions: unique(questions.flatMap((q) => q.dimensions)),
    unknownTerms,
    anchor: { today: anchor.today, why: anchor.why },
    evidence,
  };
  if (brief.kinds.length === 0) brief.kinds = ['trend'];
  const group = questions.find((q) => q.comparisonGroup)?.comparisonGroup;
  if (group) brief.comparisonGroup = group;
  const windowed = questions.find((q) => q.window);
  if (windowed?.window) brief.window = windowed.window;
  // The first comparison named, even in a later question that refers back ("… and is it up on last year?").
  const compared = questions.find((q) => q.compareWindow);
  if (compared?.compareWindow) brief.compareWindow = compared.compareWindow;
  // "Bookings per day from 1 to 14 June": over a few weeks the daily points are the per-day figures.
  // Over longer, "per day" is an average at the default grain, not a daily grain (day-on-day noise).
  const perDayPoints = !grain?.perDayOnly || (brief.window !== undefined && daysBetween(brief.window.start, brief.window.end) <= PER_DAY_POINTS_DAYS);
  if (grain && perDayPoints) brief.grain = grain.grain;
  else if (grain) delete evidence.grain;
  if (audience) brief.audience = audience.audience;
  if (deadline?.date) {
    brief.deadline = deadline.date;
    if (deadline.asap) brief.deadlineAsap = true;
    evidence.deadline = { words: deadline.words, how: 'stated' };
  }
  if (pastDeadline) brief.pastDeadline = pastDeadline;
  const notes = [...seasons.notes, ...periodNotes(periods, facts, anchor.dataEnd), ...state.notes];
  // Rows dated after today are left out of every answer: said on the card, where the period is agreed.
  if (facts.coverage.afterToday) notes.push(datesAfterWords(facts.coverage.afterToday));
  for (const r of roleHits) if (r.saidBack && questions.some((q) => q.metrics.includes(r.metrics[0]!))) notes.push(r.saidBack);
  const stale = staleRelativePeriods(fullText, periods, facts, { ...periodCtx, anchor: today, dataEnded: false }, today, catalog);
  // A relative period said back from today replaces its reading from the data's end ("this year is after it").
  for (const w of stale.words) for (let i = notes.length - 1; i >= 0; i--) if (notes[i]!.includes(`; ${w} is after it`)) notes.splice(i, 1);
  notes.push(...stale.notes);
  if (notes.length > 0) brief.saidBack = unique(notes);
  const hadComparison = brief.questions.some((q) => q.compareWindow);
  const askWindow = dropWindowsOutside(brief, facts, anchor.dataEnd, stale.windows);
  // Relative periods after data that ended years ago: the same periods counted back from the data's end, offered in their place.
  const instead = askWindow && stale.units[0] ? latestInstead(facts, stale.units[0], hadComparison) ?? namedInstead(facts, stale.units[0], stale.windows) : null;
  if (instead) brief.latestInstead = instead;
  if (personal.length > 0) brief.personalData = personal;
  if (personalValues.length > 0) brief.personalValues = personalValues.map((p) => p.text);
  if (ambiguous.length > 0) brief.ambiguousValues = ambiguous;
  const purpose = /\b(?:for|ahead of|before)\s+(?:the|our|my|next|this)\s+([\p{L} ]{2,40}?(?:review|meeting|board|report|update|presentation|offsite|deck|pack))\b/iu.exec(text.original)?.[1];
  if (purpose) brief.purpose = purpose.trim();
  recordEvidence(brief, state);
  const askEvent = placeUndatedEvents(brief, events, periods, facts, anchor.dataEnd);
  if (tested.length > 0) {
    if (!brief.window && brief.evidence) delete brief.evidence.window;
    const all = dataWindow(facts, anchor.dataEnd);
    const range = all ? describeWindow(all, facts.coverage) : 'all the data';
    const notes = unique(tested.map((t) => t.season)).map((s) => `"${s}" is read as the season your guess is about, not the period: each month of the year is set against the rest over ${range}, so ${s} can be seen against the other seasons.`);
    brief.saidBack = unique([...(brief.saidBack ?? []), ...notes]);
  }
  brief.toAsk = toAsk(brief);
  if (askWindow || askEvent) brief.toAsk.push('window');
  return brief;
}

/**
 * Events named as a time that the data cannot date ("in the recession"). With no period of the
 * request's own for the window (none named, or only the one it is compared with), the window
 * counted in its place (the year to date beside "vs 2007") is taken out and the event's dates are
 * asked (prompts.ts windowPrompt); a comparison named beside it stays. Beside a period that was
 * named, the card says the event was not dated and the named period runs. Returns whether to ask.
 */
function placeUndatedEvents(brief: Brief, events: readonly UndatedEvent[], periods: readonly PeriodMention[], facts: DatasetFacts, dataEnd: string | null): boolean {
  if (events.length === 0) return false;
  brief.undatedEvents = unique(events.map((e) => e.words));
  const named = periods.some((p) => p.window && !p.compared && !p.shift);
  const asWindow = events.filter((e) => !e.compared);
  if (!named && asWindow.length > 0 && dataWindow(facts, dataEnd)) {
    for (const q of brief.questions) {
      delete q.window;
      delete q.windowSoFar;
      delete q.spanEnds;
    }
    delete brief.window;
    if (brief.evidence) delete brief.evidence.window;
    return true;
  }
  const instead = brief.window ? describeWindow(brief.window, facts.coverage) : 'the whole history';
  const notes = brief.undatedEvents.map((w) => `I can't tell the dates of "${w}" from the data, so it is not a period here: the answers use ${instead} as read. Give its dates ("from Dec 2007 to Jun 2009") to use them instead.`);
  brief.saidBack = unique([...(brief.saidBack ?? []), ...notes]);
  return false;
}

/** The data's days as a half-open window, or null for an empty dataset. */
function dataWindow(facts: DatasetFacts, dataEnd: string | null): DateWindow | null {
  const first = facts.coverage.firstDate;
  const end = dataEnd ?? (facts.coverage.lastDate ? addDays(facts.coverage.lastDate, 1) : null);
  return first && end ? { start: first, end } : null;
}

/**
 * A period named wholly outside the data ("sales in 2031", "last year" on data that ended years
 * ago) is asked about, never run on another period in its place: the questions' windows that lie
 * outside the data, or that were counted back from the data's end for a relative period that
 * means another time (`stale`), are taken out, and a window is asked for (the prompt says the
 * data's range and offers it). Returns whether to ask.
 */
function dropWindowsOutside(brief: Brief, facts: DatasetFacts, dataEnd: string | null, stale: readonly DateWindow[]): boolean {
  const data = dataWindow(facts, dataEnd);
  if (!data) return false;
  const outside = (w: DateWindow) => w.end <= data.start || w.start >= data.end || stale.some((x) => x.start === w.start);
  let ask = false;
  for (const q of brief.questions) {
    if (q.window && outside(q.window)) {
      delete q.window;
      delete q.windowSoFar;
      delete q.spanEnds;
      delete q.compareWindow;
      ask = true;
    }
    if (q.compareWindow && outside(q.compareWindow)) {
      delete q.compareWindow;
      ask = true;
    }
  }
  if (!ask) return false;
  const windowed = brief.questions.find((q) => q.window);
  if (windowed?.window) brief.window = windowed.window;
  else delete brief.window;
  const compared = brief.questions.find((q) => q.compareWindow);
  if (compared?.compareWindow) brief.compareWindow = compared.compareWindow;
  else delete brief.compareWindow;
  if (brief.evidence) {
    if (!brief.window) delete brief.evidence.window;
    if (!brief.compareWindow) delete brief.evidence.compareWindow;
  }
  return true;
}

/**
 * Data that ended years ago (nothing in today's year or the one before): relative periods are
 * counted back from the data's end so that something answers, but "last year" then means a year
 * the requester did not name. Each relative period is read again from today; one that lies wholly
 * after the data is said back with the data's range, and its window counted from the data's end
 * is returned, to be asked about rather than run.
 */
function staleRelativePeriods(fullText: string, periods: readonly PeriodMention[], facts: DatasetFacts, todayCtx: PeriodContext, today: string, catalog: PreparedCatalog): { notes: string[]; windows: DateWindow[]; words: string[]; units: PeriodMention['unit'][] } {
  const last = facts.coverage.lastDate;
  if (!last || yearOf(last) >= yearOf(today) - 1) return { notes: [], windows: [], words: [], units: [] };
  // "the latest year" names the data's own latest, counted from its end, never today's.
  const relative = periods.filter((p) => p.relative && !p.shift && p.window && !/^(?:the\s+)?latest\b/i.test(p.words));
  if (relative.length === 0) return { notes: [], windows: [], words: [], units: [] };
  const asToday = findPeriods(new RequestText(mendCalendarWords(readablePart(fullText), catalogWords(catalog))), todayCtx);
  const say = (iso: string) => new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'long', year: 'numeric', timeZone: 'UTC' }).format(new Date(`${iso}T00:00:00Z`));
  const notes: string[] = [];
  const windows: DateWindow[] = [];
  const words: string[] = [];
  const units: PeriodMention['unit'][] = [];
  const fromToday: string[] = [];
  const fromEnd: string[] = [];
  for (const p of relative) {
    const real = asToday.find((x) => x.start === p.start && x.end === p.end)?.window;
    if (!real || real.start <= last) continue;
    const shown = real.end > today ? today : addDays(real.end, -1);
    fromToday.push(`${p.words} (${say(real.start)} to ${say(shown)})`);
    // The same words counted back from the data's end, as the brief's anchor counts every relative period.
    fromEnd.push(`${p.words} ${fromEnd.length > 0 ? '' : 'is '}${describeWindow(p.window!, facts.coverage, 'en-GB')}`);
    windows.push(p.window!);
    words.push(p.words);
    units.push(p.unit);
  }
  // One line for every such period, so the two readings are never mixed: counted from today they
  // are after the data; counted back from its end (the card's anchor) they are these.
  if (fromToday.length > 0) {
    const many = fromToday.length > 1;
    notes.push(`${dataRunsWords(facts)}. Counted from today, ${fromToday.join(' and ')} ${many ? 'are' : 'is'} after it, so there is nothing to answer for ${many ? 'them' : 'it'}; counted back from the data's end, ${fromEnd.join(' and ')}.`);
  }
  return { notes, windows, words, units };
}

/** A say-back line that a period named lies outside the data (asked about, then settled by the answer). */
export function isOutsideDataNote(line: string): boolean {
  return /nothing to answer for (?:it|them)\b/.test(line);
}

/**
 * "The data runs from 2001 to 2017": the data's whole span in the words of its stamps (a yearly
 * stamp stands for its year, a monthly one for its month), as the window words say any window.
 */
function dataRunsWords(facts: DatasetFacts): string {
  const { firstDate, lastDate } = facts.coverage;
  if (!firstDate || !lastDate) return 'The dataset has no rows';
  const stamps = facts.stamp ?? facts.coverage.stamps;
  const full = { start: firstDate, end: dataEnd({ lastDate, ...(stamps ? { stamps } : {}) }) };
  const range = describeWindow(full, { firstDate: null, lastDate: null, rows: 0, ...(stamps ? { stamps } : {}) }, 'en-GB');
  return range.includes(' to ') ? `The data runs from ${range}` : `The data covers ${range}`;
}

/**
 * The latest whole period of a unit the data holds, and the one before it when the request
 * compared: "this year vs last year" on data that ends with 2017 is 2017 against 2016 when
 * periods count back from the data's end. Null for a unit with no whole period in the data.
 */
function latestInstead(facts: DatasetFacts, unit: PeriodMention['unit'], compared: boolean): Brief['latestInstead'] | null {
  const { firstDate, lastDate } = facts.coverage;
  if (!firstDate || !lastDate || (unit !== 'year' && unit !== 'quarter' && unit !== 'month')) return null;
  const stamps = facts.stamp ?? facts.coverage.stamps;
  const end = dataEnd({ lastDate, ...(stamps ? { stamps } : {}) });
  let window = periodHolding(addDays(end, -1), unit);
  if (window.end > end) window = shiftPeriod(window, unit, 1);
  if (window.start < firstDate) return null;
  const before = shiftPeriod(window, unit, 1);
  return { unit, window, ...(compared && before.start >= firstDate ? { compareWindow: before } : {}) };
}

/**
 * A season named relatively ("last summer vs this summer") on data that ended years ago: the
 * same words counted back from the data's end, when every one of them lies inside the data
 * (summer 2015 against summer 2014), latest first. Null otherwise.
 */
function namedInstead(facts: DatasetFacts, unit: PeriodMention['unit'], windows: readonly DateWindow[]): Brief['latestInstead'] | null {
  const { firstDate, lastDate } = facts.coverage;
  if (unit !== 'season' || !firstDate || !lastDate || windows.length === 0 || windows.length > 2) return null;
  if (windows.some((w) => w.start < firstDate || w.end > addDays(lastDate, 1))) return null;
  const [later, earlier] = [...windows].sort((a, b) => (a.start < b.start ? 1 : -1));
  if (earlier && earlier.start === later!.start) return null;
  return { unit, window: later!, ...(earlier ? { compareWindow: earlier } : {}) };
}

/**
 * Periods read otherwise than written, or that the data cannot answer, said back: a day no
 * calendar has ("30 February 2008", read as its month), a period wholly before or after the data.
 */
function periodNotes(periods: readonly PeriodMention[], facts: DatasetFacts, dataEnd: string | null): string[] {
  const out: string[] = [];
  const say = (iso: string) => new Intl.DateTimeFormat('en-GB', { month: 'long', year: 'numeric', timeZone: 'UTC' }).format(new Date(`${iso}T00:00:00Z`));
  for (const p of periods) if (p.notReal && p.window) out.push(`${p.words} is not a real date, so I read it as ${say(p.window.start)}.`);
  const first = facts.coverage.firstDate;
  const end = dataEnd ?? (facts.coverage.lastDate ? addDays(facts.coverage.lastDate, 1) : null);
  if (first && end) {
    const runs = dataRunsWords(facts);
    for (const p of periods) {
      if (!p.window || p.shift) continue;
      if (p.window.start >= end) out.push(`${runs}; ${p.words} is after it, so there is nothing to answer for it.`);
      else if (p.window.end <= first) out.push(`${runs}; ${p.words} is before it, so there is nothing to answer for it.`);
    }
  }
  return unique(out);
}

// ---------------------------------------------------------------------------------------------
// Questions

interface ClauseReading {
  clause: Clause;
  metrics: string[];
  metricWords: string[];
  dimensions: string[];
  filters: SegmentFilter[];
  contrast?: { dimension: string; values: string[] };
  group?: string;
  periods: PeriodMention[];
  kind: RequestKind | null;
  kindWords: string;
  frequency: boolean;
  pronoun: boolean;
  refines: boolean;
  launchDate?: string;
  launchWords?: string;
  rankLimit?: number;
  rankOrder?: RankOrder;
  growthRank?: GrowthRank;
  ranking: boolean;
  rateUnit?: 'year' | 'decade';
  perDay: boolean;
  /** "gross per film" with no average of the measure in the catalog: its mean and median per row are computed. */
  perRow?: string;
  table: boolean;
  /** Points back at the question before ("how does that compare", "and which teams took them"). */
  refersBack: boolean;
  /** Only context: a deadline, an audience, a greeting ("Ideally before the planning session on the 10th"). */
  context: boolean;
}

function readQuestions(st: ReadState): { questions: Question[]; ambiguous: AmbiguousValue[] } {
  const clauses = splitClauses(st.text);
  const questions: Question[] = [];
  const ambiguous: AmbiguousValue[] = [];
  // Context clauses ("Looking at 2024.") lend their period and filters to the next question.
  let pending: ClauseReading | null = null;
  // The values a frame ("For email tickets, …") restricts the request to, in force when each question was read.
  let frame: SegmentFilter[] = [];
  const framed = new Map<Question, SegmentFilter[]>();
  // The group each question's words named, compared or not.
  const groupsNamed = new Map<Question, string>();
  for (const [at, clause] of clauses.entries()) {
    const r = readClause(clause, st, ambiguous);
    const previous = questions[questions.length - 1];
    if (isFrame(r, st) && at < clauses.length - 1) {
      frame = [...frame.filter((f) => !r.filters.some((x) => x.dimension === f.dimension)), ...r.filters];
      pending = pending ? { ...r, metrics: unique([...pending.metrics, ...r.metrics]), periods: [...pending.periods, ...r.periods], filters: mergeFilters(pending.filters, r.filters), dimensions: [...pending.dimensions, ...r.dimensions] } : r;
      continue;
    }
    if (r.context) {
      // "Fares went up on 1 March 2024.": a launch stated after the question it belongs to.
      if (previous && r.launchDate && !previous.launchDate) {
        previous.launchDate = r.launchDate;
        if (previous.kind !== 'performance') previous.kind = 'performance';
      }
      continue;
    }
    // "Fares went up on 1 March 2024." after the question: the launch it asks about.
    if (previous && r.launchDate && r.metrics.length === 0 && !r.group) {
      if (!previous.launchDate) previous.launchDate = r.launchDate;
      if (previous.kind !== 'performance' && (previous.comparisonGroup || /\b(?:effect|impact|hurt|help|affect\w*|worth|change\w*)\b/i.test(previous.text))) previous.kind = 'performance';
      continue;
    }
    // "Did Early Bake work? Before and after the launch pls": the launch completes the question
    // before it, which names the group it turns on.
    if (previous && r.kind === 'performance' && r.metrics.length === 0 && !r.group && r.filters.length === 0 && r.dimensions.length === 0 && r.periods.length === 0 && refersToLaunch(r.clause.text)) {
      const named = previous.comparisonGroup ?? groupsNamed.get(previous);
      const g = st.ds.comparison_groups.find((x) => x.name === named);
      if (g) {
        previous.kind = 'performance';
        previous.comparisonGroup = g.name;
        if (!previous.launchDate && g.launch_date) previous.launchDate = g.launch_date;
        continue;
      }
    }
    // "Before and after the launch, how did bookings change?": the measure completes the question before it.
    if (previous && previous.metrics.length === 0 && !previous.frequency && r.metrics.length > 0 && !r.group && (r.kind === null || r.kind === previous.kind || previous.kind === 'performance' || r.kind === 'trend' || r.kind === 'growth') && !r.launchDate) {
      previous.metrics = unique([...previous.metrics, ...r.metrics]);
      mergeInto(previous, r, st);
      continue;
    }
    const hasContent = r.metrics.length > 0 || r.kind !== null || r.frequency || r.group !== undefined || r.table;
    // "Could you show sign-ups for both platforms, quarter by quarter?": the data for the question before.
    const elaborates = previous !== undefined && !r.group && (r.metrics.length === 0 || r.metrics.every((m) => previous.metrics.includes(m))) && /\b(?:both|either|the\s+two|each\s+of\s+them)\b/i.test(r.clause.text);
    if (previous && elaborates) {
      mergeInto(previous, r, st);
      continue;
    }
    // "top 5 airports by flights, and what share of all flights do they handle?": the share the
    // ranked few carry of the total, which the ranking answers (its concentration), not a question of its own.
    if (previous?.ranking && r.dimensions.length === 0 && !r.group && r.filters.length === 0 && r.metrics.every((m) => previous.metrics.includes(m)) && SHARE_OF_TOTAL.test(r.clause.text) && /\b(?:they|them|these|those|their|it)\b/i.test(r.clause.text)) {
      mergeInto(previous, r, st);
      continue;
    }
    const addsToPrevious = r.kind === null && !r.group && /^\s*(?:and|also|plus|as\s+well\s+as|with)\b|\b(?:too|as\s+well)\s*[?.!]*$|\b(?:could|can|would)\s+you\s+(?:also\s+)?(?:include|add)\b|^\s*(?:also\s+)?(?:include|add)\b/i.test(r.clause.text);
    if (previous && !r.launchDate && (r.refines || (!hasContent && (r.dimensions.length > 0 || r.filters.length > 0 || r.periods.length > 0)) || (r.metrics.length > 0 && addsToPrevious))) {
      mergeInto(previous, r, st);
      continue;
    }
    if (!hasContent) {
      if (r.periods.length > 0 || r.filters.length > 0 || r.dimensions.length > 0) pending = pending ? { ...r, periods: [...pending.periods, ...r.periods], filters: [...pending.filters, ...r.filters], dimensions: [...pending.dimensions, ...r.dimensions] } : r;
      continue;
    }
    const q = toQuestion(r, st, previous, pending);
    pending = null;
    if (r.group) groupsNamed.set(q, r.group);
    framed.set(q, frame);
    questions.push(q);
  }
  carryFilters(questions, framed);
  for (const [q, name] of groupsNamed) if (!q.comparisonGroup) st.notes.push(groupNotCompared(q, name, st.ds));
  for (const q of questions) if (q.comparisonGroup) keepComparison(q, st);
  // Nothing read as a question (no metric, no cue): the whole request is one, for the card to complete.
  if (questions.length === 0 && clauses.length > 0) {
    const whole: Clause = { start: clauses[0]!.start, end: clauses[clauses.length - 1]!.end, text: st.text.original.trim(), asked: true };
    questions.push(toQuestion(pending ? { ...pending, clause: whole, kind: null } : readClause(whole, st, ambiguous), st, undefined, null));
  }
  return { questions, ambiguous };
}

/**
 * "For email tickets, …": a clause with nothing to ask but values, before a question: what the
 * request is about, not a question of its own (its measure, if any, serves the questions after it).
 */
function isFrame(r: ClauseReading, st: ReadState): boolean {
  return r.filters.length > 0 && r.kind === null && r.dimensions.length === 0 && !r.group && !r.table && !r.frequency && !r.contrast && !r.launchDate
    && !st.grainSpans.some((s) => s.start >= r.clause.start && s.end <= r.clause.end) && FRAME_OPENING.test(r.clause.text);
}

/**
 * A filter said once reaches every question that does not name its own value of that breakdown
 * ("For email tickets, how have volumes moved and which teams handle most of them?"): the values
 * of the frame in force and of the first question, or, for a question that takes its measure from
 * the one before, that question's. A question that names values of its own takes only the frame's.
 * A question that breaks down by the filtered breakdown, sets two
 * of its values against each other, or asks about everything ("overall") keeps to its own words.
 */
function carryFilters(questions: Question[], framed: Map<Question, SegmentFilter[]>): void {
  const first = questions[0];
  if (!first) return;
  for (const [i, q] of questions.entries()) {
    if (i === 0) continue;
    const frame = framed.get(q) ?? [];
    // A question that names values of its own ("And for the Billing team, …") sets its own scope:
    // only a frame said for the whole request reaches it.
    const ownScope = q.filters.length > 0 && !q.metricsFromPrevious;
    const source = ownScope ? frame : q.metricsFromPrevious ? questions[i - 1]!.filters : [...frame, ...first.filters.filter((f) => !frame.some((x) => x.dimension === f.dimension))];
    if (OVERALL.test(q.text)) continue;
    const carried = source.filter((f) => !q.filters.some((x) => x.dimension === f.dimension) && !(f.exclude !== true && q.dimensions.includes(f.dimension)) && q.contrast?.dimension !== f.dimension);
    if (carried.length > 0) q.filters = mergeFilters(q.filters, carried);
  }
}

function mergeInto(q: Question, r: ClauseReading, st: ReadState): void {
  q.metrics = unique([...q.metrics, ...r.metrics]);
  q.dimensions = unique([...q.dimensions, ...r.dimensions]);
  q.filters = mergeFilters(q.filters, r.filters);
  if (r.group && !q.comparisonGroup) q.comparisonGroup = r.group;
  if (!q.window && r.periods.length > 0) Object.assign(q, windowsOf(r.periods, st, r.clause));
  if (r.contrast && !q.contrast) q.contrast = r.contrast;
  // "…by phase of flight. Which phase costs us the most?": the ranking is what the question asks.
  if (r.ranking && q.dimensions.length > 0 && (q.kind === 'trend' || q.kind === 'kpi')) q.ranking = true;
  if (r.rankLimit && !q.rankLimit) q.rankLimit = r.rankLimit;
  if (r.rankOrder && !q.rankOrder) q.rankOrder = r.rankOrder;
  if (r.growthRank && !q.growthRank && q.dimensions.length > 0) q.growthRank = r.growthRank;
  if (SHARE_ASK.test(r.clause.text.toLowerCase())) q.shareAsked = true;
}

/** A share of a whole: "what share of all flights", "what percentage of the total", "how much of the total". */
const SHARE_OF_TOTAL = /\b(?:share|percentage|proportion|percent|fraction|portion|%)\b|\bhow\s+much\s+of\s+(?:the\s+)?(?:total|whole|all)\b/i;

/**
 * Whether a clause asks which segments of a breakdown it names come first: a superlative or a word
 * of rank beside a "which", a "top N", a "rank", or right before the breakdown's noun ("the busiest
 * origin airports"). A superlative of time ("the busiest months") asks about the calendar instead.
 */
function asksRanking(t: string, dims: readonly string[]): string | undefined {
  // "which months are busiest, by phase": the superlative is the calendar's.
  if (dims.length === 0 || /\b(?:which|what)\s+(?:(?:time|part)\s+of\s+(?:the\s+)?)?(?:days?|weeks?|months?|quarters?|years?|seasons?|weekdays?|hours?)\b/.test(t)) return undefined;
  const text = t.replace(NOT_RANK, ' ').replace(new RegExp(`${RANK_WORDS.source}(?:\\s+(?:and|or|&)\\s+\\w+)?\\s+(?:the\\s+)?(?:days?|weeks?|months?|quarters?|years?|periods?|seasons?|times?|hours?|weekdays?)\\b`, 'g'), ' ');
  // The word that says an order ("top 5 with the fewest") before one that only ranks.
  const words = [...text.matchAll(new RegExp(RANK_WORDS.source, 'g'))].map((m) => m[0]);
  if (words.length === 0) return undefined;
  const word = words.find((w) => rankOrderOf(w) !== undefined) ?? words[0]!;
  return RANK_ASK.test(text) || /\b(?:top|bottom|biggest|largest|busiest|quietest|cheapest|leading|costliest|worst|best|most|fewest|least|highest|lowest|smallest)\s+(?:\d{1,2}\b|\p{L})/u.test(text) ? word : undefined;
}

function toQuestion(r: ClauseReading, st: ReadState, previous: Question | undefined, pending: ClauseReading | null): Question {
  const ds = st.ds;
  // "For email tickets, how have things moved?": the measure the frame before it named.
  let metrics = r.metrics.length === 0 && pending && pending.metrics.length > 0 ? pending.metrics : r.metrics;
  let fromPrevious = false;
  if (metrics.length === 0 && previous && (r.pronoun || !r.frequency)) {
    // "how has that moved", "is it up": the previous question's metric.
    if (r.pronoun || previous.metrics.length > 0) {
      metrics = r.pronoun || !r.group ? previous.metrics : [];
      fromPrevious = metrics.length > 0;
    }
  }
  // "how often customers travel": the customers are who is counted, not the measure.
  if (r.frequency) {
    const units = new Set(ds.comparison_groups.map((g) => g.unit_column).filter((c): c is string => !!c));
    metrics = metrics.filter((m) => { const d = ds.metrics.find((x) => x.name === m)?.definition; return !(d?.type === 'distinct_count' && units.has(d.column)); });
  }
  if (r.frequency && metrics.length === 0) {
    const count = rowCountMetric(ds) ?? ds.metrics.find((m) => m.definition.type === 'count');
    if (count) metrics = [count.name];
  }
  // A clause whose only periods are compared ("…, which channels grew against H1 2023") takes its
  // window from the context before it; one that refers back ("how does that compare with Q2?")
  // from the previous question.
  const onlyCompared = r.periods.length > 0 && r.periods.every((p) => p.compared || p.shift);
  const base = pending?.periods.filter((p) => !p.compared && !p.shift) ?? [];
  const periods = r.periods.length === 0 ? (pending?.periods ?? []) : onlyCompared && base.length > 0 ? [...base, ...r.periods] : r.periods;
  let windows: ReturnType<typeof windowsOf> = periods.length > 0 ? windowsOf(periods, st, r.clause) : {};
  if (onlyCompared && base.length === 0 && previous?.window && (r.pronoun || fromPrevious || metrics.length === 0 || r.refersBack)) {
    windows = compareWithPrevious(previous, r.periods, st) ?? windows;
  }
  // A follow-up with no cue of its own ("how does that compare with Q2?") keeps the kind asked before it, unless it compares periods.
  // "And what was their trial share?": a follow-up that points back keeps the period asked before.
  // "Since it launched" is its own period (from the launch), not a pointer back.
  const ownLaunch = !!r.launchDate || refersToLaunch(r.clause.text);
  if (!windows.window && previous?.window && !ownLaunch && /\b(?:their|its|those|these|them|they|that|it)\b/.test(r.clause.text.toLowerCase()) && r.periods.length === 0) {
    windows = { window: previous.window, ...(previous.compareWindow ? { compareWindow: previous.compareWindow } : {}) };
  }
  // A follow-up pointing back with no period of its own ("what share of them…", "was that across all countries?") is asked about the same period, in the same kind, unless it asks about a change.
  const pointsBack = previous !== undefined && r.periods.length === 0 && /\b(?:them|their|those|these|that|it|its|they)\b/.test(r.clause.text.toLowerCase());
  // "…and when in the year is it highest?" points back for its measure but asks its own thing: a season.
  const asksSeason = SEASON_ASK.test(r.clause.text.toLowerCase()) || WEEKDAY_ASK.test(r.clause.text.toLowerCase());
  if (pointsBack && !asksSeason && r.kind !== 'growth' && r.kind !== 'performance') r.kind = previous!.kind;
  const kind = r.kind ?? (asksChangeSeries(periods, r.clause.text.toLowerCase()) ? 'growth' : fromPrevious && previous && !windows.compareWindow ? previous.kind : windows.compareWindow && !(previous && fromPrevious && previous.kind === 'kpi') ? 'growth' : previous && fromPrevious ? previous.kind : 'trend');
  const q: Question = {
    text: withoutPreamble(r.clause.text),
    kind,
    metrics,
    dimensions: unique([...r.dimensions, ...(pending?.dimensions ?? [])]),
    filters: mergeFilters(r.filters, pending?.filters ?? []),
    frequency: r.frequency,
    ...windows,
  };
  if (fromPrevious) q.metricsFromPrevious = true;
  // A group named without being set against the rest ("revenue since the referral programme launched") is not compared.
  if (r.group && kind === 'performance') q.comparisonGroup = r.group;
  if (r.launchDate) q.launchDate = r.launchDate;
  if (r.contrast) q.contrast = r.contrast;
  if (r.rankLimit) q.rankLimit = r.rankLimit;
  if (r.rankOrder) q.rankOrder = r.rankOrder;
  if (r.growthRank && q.dimensions.length > 0) q.growthRank = r.growthRank;
  if (r.ranking && q.dimensions.length > 0 && (kind === 'trend' || kind === 'kpi')) q.ranking = true;
  if (r.rateUnit) q.rateUnit = r.rateUnit;
  if (r.perDay) q.perDay = true;
  // "did daily flights rise from January to June": set against each other, periods of a month or
  // more are daily figures only as each one's daily average (the days of each differ).
  if (!r.perDay && kind === 'growth' && q.window && q.compareWindow && DAILY_MEASURE.test(r.clause.text.toLowerCase()) && daysBetween(q.compareWindow.start, q.compareWindow.end) > 7) q.perDay = true;
  if (r.perRow) q.perRow = r.perRow;
  if (r.table) q.table = true;
  if (SHARE_ASK.test(r.clause.text.toLowerCase())) q.shareAsked = true;
  // A launch the text refers to ("since it launched") is the group's catalog launch date.
  if (!q.launchDate && refersToLaunch(r.clause.text)) {
    const g = ds.comparison_groups.find((x) => x.name === q.comparisonGroup) ?? (ds.comparison_groups.filter((x) => x.launch_date).length === 1 ? ds.comparison_groups.find((x) => x.launch_date) : undefined);
    if (g?.launch_date) {
      q.launchDate = g.launch_date;
      if (!q.comparisonGroup && kind === 'performance') q.comparisonGroup = g.name;
      if (/\bsince\b/.test(r.clause.text.toLowerCase()) && !q.window && !/\bbefore\b/.test(r.clause.text.toLowerCase())) {
        q.window = { start: g.launch_date, end: latestEnd(st) };
      }
    }
  }
  return q;
}

/** The previous question's window, against a comparison a follow-up names ("and how does that compare with Q2?"). */
function compareWithPrevious(previous: Question, compared: PeriodMention[], st: ReadState): { window: DateWindow; compareWindow: DateWindow } | undefined {
  const window = previous.window!;
  const other = compared[0]!;
  const main: PeriodMention = { start: 0, end: 0, window, unit: unitOf(window), relative: false, compared: false, words: '' };
  const compareWindow = compareOf(window, main, other, st);
  return compareWindow ? { window, compareWindow } : undefined;
}

/** The calendar unit a window spans exactly, for like-for-like comparison. */
function unitOf(w: DateWindow): PeriodMention['unit'] {
  const months = monthsBetween(w.start, w.end);
  if (w.start.endsWith('-01') && w.end.endsWith('-01')) return months === 1 ? 'month' : months === 3 ? 'quarter' : months === 12 ? 'year' : 'span';
  const days = daysBetween(w.start, w.end);
  return days === 1 ? 'day' : days === 7 ? 'week' : 'span';
}

function readClause(clause: Clause, st: ReadState, ambiguous: AmbiguousValue[]): ClauseReading {
  const inside = (s: Span) => s.start >= clause.start && s.end <= clause.end;
  const hits = st.hits.filter(inside);
  const lower = st.text.lower;
  const t = clause.text.toLowerCase();
  const metrics: string[] = [];
  const metricWords: string[] = [];
  const dimensions: string[] = [];
  const valueHits: { hit: CatalogHit; entries: CatalogEntry[] }[] = [];
  let group: string | undefined;
  let splitsByGroup = false;

  const metricHits: CatalogHit[] = [];
  for (const h of hits) {
    const kinds = new Set(h.entries.map((e) => e.kind));
    // A word that is both a value and a personal word ("email" the channel, "email" the address):
    // the person's only when the words around it say so.
    if (kinds.has('personal') && !(kinds.has('value') && !personalContext(h, st.text))) continue;
    if (kinds.has('group')) {
      group ??= h.entries.find((e) => e.kind === 'group')!.name;
      if (BREAKDOWN_BEFORE.test(lower.slice(Math.max(0, h.start - 40), h.start))) splitsByGroup = true;
      continue;
    }
    if (kinds.has('metric')) {
      const named = unique(h.entries.filter((e) => e.kind === 'metric').map((e) => e.name));
      if (named.length > 1 && h.entries.every((e) => e.kind !== 'metric' || e.partial)) st.sharedMetricHits.push(h);
      else metricHits.push(h);
      continue;
    }
    if (kinds.has('dimension')) {
      const dim = h.entries.find((e) => e.kind === 'dimension')!.name;
      // The breakdown a group is made of ("the pass" for SkerryPass holders) names the group.
      // Broken down by it ("revenue by pass holder"), the group is set against the rest.
      const asGroup = groupOfColumn(st.ds, dim);
      if (asGroup) {
        group ??= asGroup;
        if (isBreakdown(h, dim, hits, st)) splitsByGroup = true;
      } else if (isBreakdown(h, dim, hits, st)) dimensions.push(dim);
      continue;
    }
    const values = h.entries.filter((e) => e.kind === 'value');
    if (values.length > 0) valueHits.push({ hit: h, entries: values });
  }
  // The unit a group or a value is counted in ("premium accounts", "paid social sign-ups", "by
  // passenger nationality") is not a second measure when the clause names another; when every
  // measure named is such a unit ("email tickets compare with phone tickets"), it is the measure.
  const unitNouns = metricHits.map((h) => metricHits.length > 1 && isUnitNoun(h, hits, st.text));
  const allUnits = unitNouns.every((u) => u);
  const { hits: rowsUnit, perRow } = rowsAsUnit(metricHits, hits, clause, st);
  for (const [i, h] of metricHits.entries()) {
    if (unitNouns[i] && !allUnits) continue;
    if (rowsUnit.has(h)) continue;
    if (isHeadOfNamedPart(h, metricHits[i - 1], st)) continue;
    // "unemployment rate" where "unemployment" names a count or a sum: the rate is not that measure.
    const rateAfter = /^\s+rates?(?![\p{L}])/u.exec(st.text.lower.slice(h.end, h.end + 8));
    const own = st.ds.metrics.find((m) => m.name === metricOf(h));
    if (rateAfter && own && own.unit !== 'percent' && own.definition.type !== 'rate' && own.definition.type !== 'ratio' && !st.text.isClaimed({ start: h.end, end: h.end + rateAfter[0].length })) {
      st.ratesOfCounts.push({ start: h.start, end: h.end + rateAfter[0].length });
      continue;
    }
    // "unemployment rate" where "rate" is itself the catalog's rate: the word before says what it is a rate of.
    const rateHit = rateAfter && own && own.unit !== 'percent' ? metricHits.find((o) => o.start === h.end + rateAfter[0].search(/\S/)) : undefined;
    const rateOwn = rateHit ? st.ds.metrics.find((m) => m.name === metricOf(rateHit)) : undefined;
    if (rateOwn && (rateOwn.unit === 'percent' || rateOwn.definition.type === 'rate')) continue;
    metrics.push(metricOf(h));
    metricWords.push(st.text.quote(h));
  }
  const composed = composeShares(metrics, metricHits, clause, st);
  // "revenue per passenger": the ratio metric of the two, when the catalog has it.
  composeRatios(metrics, hits, st, clause);

  const read = readValues(valueHits, hits, st, clause, ambiguous);
  const contrast = read.contrast;
  // The value a composed rate is about ("share of tickets that were urgent") is the rate's, not a filter.
  const rateValues = composed?.definition.type === 'rate' ? [composed.definition.where.value].flat().map((v) => String(v).toLowerCase()) : [];
  const filters = read.filters.map((f) => ({ ...f, values: f.values.filter((v) => !rateValues.includes(String(v).toLowerCase())) })).filter((f) => f.values.length > 0);
  const dims = unique(dimensions);

  // "how much we refunded": the amount whose names hold the verb.
  if (metrics.length === 0) {
    const verb = /\bhow\s+much\s+(?:money\s+)?(?:did|have|do|has)?\s*(?:we|they|you)\s+([a-z]+?)(?:ed|d)?\b/.exec(t);
    if (verb) {
      const root = verb[1]!;
      const amount = st.ds.metrics.filter((m) => m.unit === 'currency' && [m.name, m.label, ...m.synonyms].some((n) => n.toLowerCase().includes(root)) && m.definition.type === 'sum');
      if (amount.length === 1) metrics.push(amount[0]!.name);
    }
  }
  // Ordinary business words ("takings", "how many") when no catalog metric is named.
  if (metrics.length === 0) {
    for (const r of st.roleHits.filter((x) => inside(x.span))) {
      if (r.metrics.length === 1) {
        metrics.push(r.metrics[0]!);
        metricWords.push(st.text.quote(r.span));
      }
    }
  }

  // "the hottest day", "the windiest month" with no measure named: the measure the quality word
  // points to (the same ranking the measure prompt offers), when one answers it.
  const extreme = st.extremes.find((e) => e.at >= clause.start && e.at < clause.end);
  if (metrics.length === 0 && extreme) {
    const best = rankMetrics(st.ds, clause.text)[0];
    if (best?.fits) {
      metrics.push(best.name);
      st.inferredMetrics.push({ metric: best.name, words: extreme.superlative });
    }
  }
  // "which day of the week is windiest": the days of the week ranked by the measure the quality word points to.
  if (metrics.length === 0 && !extreme && WEEKDAY_ASK.test(clause.text.toLowerCase())) {
    const sup = superlativeIn(st.text, clause);
    const best = sup ? rankMetrics(st.ds, clause.text)[0] : undefined;
    if (sup && best?.fits) {
      metrics.push(best.name);
      st.text.claim(sup);
      st.inferredMetrics.push({ metric: best.name, words: st.text.quote(sup) });
    }
  }

  const periods = st.periods.filter(inside);
  const launch = statedLaunch(periods, st.text);
  const kept = launch ? periods.filter((p) => p !== launch.mention || /\bsince\b/.test(p.words.toLowerCase())) : periods;
  const windows = kept.length > 0 ? windowsOf(kept, st, clause) : {};
  const plainPeriods = kept.filter((p) => p.window && !p.compared && !p.shift);
  const intent = readIntent(clause.text, {
    namesGroup: group !== undefined,
    splitsByGroup,
    refersToLaunch: launch !== undefined || refersToLaunch(clause.text),
    comparesPeriods: windows.compareWindow !== undefined,
    contrastsValues: contrast !== undefined,
    ...(windows.window && plainPeriods.length === 1
      ? { window: windows.window, windowRelative: plainPeriods[0]!.relative && plainPeriods[0]!.unit !== 'span', windowSingle: plainPeriods[0]!.unit !== 'span' || daysBetween(windows.window.start, windows.window.end) <= 93 }
      : {}),
    namesMeasure: metrics.length > 0 || st.roleHits.some((x) => inside(x.span)),
    asksGrain: st.grainSpans.some(inside),
  });
  // "top 5 routes", "worst 10", "the 5 busiest origins", "the three biggest operators": [words, the superlative, how many].
  // "the 10 airports with the fewest strikes": the number before the breakdown, the superlative after it.
  const topMatch = /\b(top|bottom|best|worst|biggest|largest|smallest|highest|lowest|busiest|quietest)\s+(\d{1,2}|three|five|ten)\b|\b(?:the|our|those|these)\s+(\d{1,2}|three|five|ten)\s+(busiest|biggest|largest|leading|smallest|quietest|costliest|most|highest|lowest|worst|best|top)\b|\b(?:the|our|those|these)\s+(\d{1,2}|three|five|ten)\s+(?:[\p{L}'-]+\s+){1,4}?(?:with|having|that\s+(?:had|have|has|saw|see))\s+the\s+(most|fewest|least|highest|lowest|biggest|largest|smallest|worst|best)\b/u.exec(t);
  const top = topMatch ? [topMatch[0], topMatch[1] ?? topMatch[4] ?? topMatch[6], topMatch[2] ?? topMatch[3] ?? topMatch[5]] : null;
  // The word that asks for a ranking ("which airports had the fewest strikes") says its order.
  const rankWord = asksRanking(t, dims);
  const rate = /\bper\s+(decade|year|annum)\b|\b(?:a|each)\s+(decade|year)\b(?=.{0,30}$)/.exec(t);
  const hasRateCue = rate && /\bhow\s+(?:fast|quickly|much)|\brate\b|\bper\s+decade\b|\ba\s+decade\b|\brising|\bfalling|\bincreas|\bdecreas|\bgrow|\bchang/.test(t);
  const reading: ClauseReading = {
    clause,
    metrics: unique(metrics),
    metricWords,
    dimensions: dims,
    filters,
    periods: kept,
    kind: intent.kind,
    kindWords: intent.words,
    frequency: FREQUENCY.test(clause.text) && (group !== undefined || /\bcustomers?\b|\busers?\b|\bmembers?\b|\bclients?\b|\bpeople\b/.test(t)),
    pronoun: /\b(?:it|its|that|this|they|them|their|those|these|same|either|both)\b/.test(t.replace(/\b(?:this|that)\s+(?:year|month|week|quarter|summer|winter|spring|autumn|season|time)\b/g, '')) && metrics.length === 0,
    refines: REFINES_PREVIOUS.test(clause.text) && metrics.length === 0 && !group,
    ranking: rankWord !== undefined,
    // "orders per day", "a day", "average daily": an average daily figure at whatever grain is
    // asked (or the default); "each day" is daily points unless another grain is named beside it.
    perDay: PER_DAY.test(t) || (/\beach\s+day\b(?![- ]of)/.test(t) && (new RegExp(CALENDAR_MONTHS.source, 'u').test(t) || GRAINS.some((g) => g !== 'day' && new RegExp(`\\b(?:${GRAIN_WORDS[g].adjective}|by ${g}|per ${g}|each ${g}|${g} by ${g})\\b`).test(t)))),
    table: /\b(?:the\s+)?(?:numbers|figures|kpis|metrics|stats)\s+(?:by|per|for each|each)\s+(?:month|week|quarter|day|year)\b|\bside\s+by\s+side\b|\b(?:as\s+a|in\s+a|one)\s+table\b|\bmonthly\s+table\b|\btable\s+of\b/.test(t),
    refersBack: /^\s*(?:and\s+|also\s+|second(?:ly)?,?\s+|then\s+)?(?:how\s+(?:does|do|did)\s+(?:that|it|this|they|those)\s+compare|(?:is|was|were|are)\s+(?:it|that|this|they)\b|which\s+\w+\s+(?:drove|took|caused|explain))/.test(t),
    context: false,
  };
  // A clause with nothing to measure whose cues are only a deadline or an audience is context.
  const onlyDeadlineOrAudience = metrics.length === 0 && dims.length === 0 && filters.length === 0 && !group && !refersToLaunch(clause.text) && kept.every((p) => !p.window) && (/\b(?:need|needed|ideally|by|before|deadline|due|would be great|is fine|no rush|thanks|cheers|regards|best)\b/.test(t) || intent.kind === null);
  if (onlyDeadlineOrAudience && !reading.frequency && !reading.table && !/\?\s*$/.test(clause.text + (clause.asked ? '?' : ''))) reading.context = true;
  if (group) reading.group = group;
  if (perRow) reading.perRow = perRow;
  if (contrast) reading.contrast = contrast;
  if (launch) {
    reading.launchDate = launch.date;
    reading.launchWords = launch.words;
  }
  // "the 3 hottest days": how many extremes.
  const many = !top && extreme ? /(?:^|\s)(\d{1,2}|three|five|ten)\s+(?:most\s+)?$/.exec(st.text.lower.slice(Math.max(clause.start, extreme.spans[0]!.start - 12), extreme.spans[0]!.start)) : null;
  if (many && extreme!.spans.length > 1) reading.rankLimit = /^\d+$/.test(many[1]!) ? Number(many[1]) : { three: 3, five: 5, ten: 10 }[many[1] as 'three' | 'five' | 'ten'];
  if (top) reading.rankLimit = /^\d+$/.test(top[2]!) ? Number(top[2]) : { three: 3, five: 5, ten: 10 }[top[2] as 'three' | 'five' | 'ten'];
  // "worst 10", "lowest 5" rank by the metric's value; "top", "largest" keep ranking by size.
  // "the fewest strikes", "bottom 5": the smallest first, with or without a number.
  const order = rankOrderOf(top?.[1] ?? '') ?? (rankWord ? rankRunOrder(t) ?? rankOrderOf(rankWord) : undefined);
  if (order) reading.rankOrder = order;
  // "the coldest month": the end of the extreme asked, by its measure ("slowest" the most delay, or the fewest rows).
  else if (extreme && dims.length === 0) reading.rankOrder = extremeOrder(extreme.superlative, st.ds.metrics.find((m) => m.name === metrics[0]));
  // "which channel is growing fastest": only where the clause names a breakdown to rank.
  const byRate = dims.length > 0 ? growthRankOf(t) : undefined;
  if (byRate) reading.growthRank = byRate;
  // "per year and per decade" asks for both; the decade is the wider statement (it carries the year's rate too).
  if (rate && hasRateCue) reading.rateUnit = (rate[1] ?? rate[2]) === 'decade' || /\b(?:per|a|each)\s+decade\b/.test(t) ? 'decade' : 'year';
  return reading;
}

/**
 * The row noun beside another measure ("gross per film", "R-rated vs PG-13 films: do they gross
 * differently") is what is counted in, not a second measure: after "per"/"each" it asks for the
 * measure per row, beside a value ("PG-13 films") it names the rows the measure is taken over.
 * Kept where the clause counts ("how many films and their gross"). "per film" with no average
 * of the measure in the catalog is said back: the totals are what can be measured.
 */
function rowsAsUnit(metricHits: CatalogHit[], hits: CatalogHit[], clause: Clause, st: ReadState): { hits: Set<CatalogHit>; perRow: string | null } {
  const out = new Set<CatalogHit>();
  let perRow: string | null = null;
  const rows = rowCountMetric(st.ds)?.name;
  if (!rows) return { hits: out, perRow };
  const inside = (s: Span) => s.start >= clause.start && s.end <= clause.end;
  const shared = st.sharedMetricHits.filter(inside);
  const others = metricHits.filter((h) => metricOf(h) !== rows);
  if (others.length === 0 && shared.length === 0) return { hits: out, perRow };
  if (COUNTING.test(clause.text)) return { hits: out, perRow };
  for (const h of metricHits) {
    if (metricOf(h) !== rows) continue;
    const before = st.text.lower.slice(Math.max(0, h.start - 12), h.start);
    const per = /\b(?:per|for\s+each|each|every|a|an)\s+$/.test(before);
    // "the cost of strikes", "strike costs", "how much did strikes cost us": the rows the other measure is taken over.
    const lower = st.text.lower;
    const ofRows = others.some((o) => o.end <= h.start && /^\s+of\s+(?:the\s+|our\s+|all\s+|these\s+|those\s+)?$/.test(lower.slice(o.end, h.start)));
    const besideOther = others.some((o) => o.start >= h.end && /^\s*$/.test(lower.slice(h.end, o.start)));
    // "how late are flights", "how busy were sailings": the rows are what the other measure describes.
    const described = others.some((o) => o.end <= h.start && /\bhow\s+$/.test(lower.slice(Math.max(0, o.start - 5), o.start)) && /^\s+(?:are|were|is|was)\s+(?:the\s+|our\s+|all\s+)?$/.test(lower.slice(o.end, h.start)));
    if (!per && !ofRows && !besideOther && !described && !isUnitNoun(h, hits, st.text) && shared.length === 0) continue;
    const measured = others.map((o) => st.ds.metrics.find((m) => m.name === metricOf(o))!);
    // "revenue per booking" the catalog has as a ratio or an average: composeRatios reads it.
    const composed = (m: Metric) => st.ds.metrics.some((x) => (x.definition.type === 'ratio' && x.definition.numerator === m.name && x.definition.denominator === rows) || (m.definition.type === 'sum' && x.definition.type === 'average' && x.definition.column === m.definition.column && !x.definition.where));
    if (per && measured.some(composed)) continue;
    out.add(h);
    if (!per) continue;
    for (const m of measured) {
      if (m.definition.type !== 'sum') continue;
      const cue = h.start - (before.length - before.search(/\S+\s+$/));
      perRow = st.text.quote(h).toLowerCase();
      st.notes.push(`"${st.text.quote({ start: cue, end: h.end })}": the catalog has no average of ${m.label} per row, so where two values are set side by side I work out its mean per ${st.text.quote(h)} (the total divided by the number with a value) and the median beside it, and elsewhere its total; an average metric of the same column in the config would give the figure per row everywhere.`);
    }
  }
  return { hits: out, perRow };
}

/** The metric a hit names; of several sharing a phrase once words are folded, the one written exactly so. */
function metricOf(h: CatalogHit): string {
  const ms = h.entries.filter((e) => e.kind === 'metric');
  const written = h.words.map((w) => w.norm).join(' ');
  return (ms.find((e) => e.phrase.toLowerCase().replace(/[^\p{L}\p{N}]+/gu, ' ').trim() === written) ?? ms[0]!).name;
}

/** "their emails", "requester email", "email addresses": the person's, not a value of the data. */
function personalContext(h: CatalogHit, text: RequestText): boolean {
  const before = text.lower.slice(Math.max(0, h.start - 24), h.start);
  const after = text.lower.slice(h.end, h.end + 16);
  const last = h.words[h.words.length - 1]!.norm;
  return /s$/.test(last) && !/ss$/.test(last) || /^\s*(?:address|addresses|number|numbers|id|ids)\b/.test(after) || /\b(?:their|his|her|requester'?s?|customer'?s?|user'?s?|client'?s?|people'?s|whose|personal|contact)\s+$/.test(before);
}

/**
 * A breakdown is asked for with "by", "per", "which", "each", "across" before the dimension's
 * noun, or by its plural ("routes", "compare channels"); a singular noun beside a value ("the app
 * channel", "the phone line", "the Denver team") names the value, and "both platforms" points at
 * values already named.
 */
function isBreakdown(h: CatalogHit, dim: string, hits: CatalogHit[], st: ReadState): boolean {
  const lower = st.text.lower;
  const before = lower.slice(Math.max(0, h.start - 40), h.start);
  if (BREAKDOWN_BEFORE.test(before) || BREAKDOWN_WH.test(before)) return true;
  // "by route and fare class": the second of a list after a breakdown is one too.
  const listed = hits.find((o) => o.end <= h.start && /^\s*(?:,|and|or|&|\/|plus)\s*(?:by\s+|the\s+)?$/.test(lower.slice(o.end, h.start)) && o.entries.some((e) => e.kind === 'dimension'));
  if (listed && isBreakdown(listed, listed.entries.find((e) => e.kind === 'dimension')!.name, hits, st)) return true;
  if (/\b(?:both|either|the\s+two|these|those|that|this|its|his|her|their)\s+$/.test(before)) return false;
  const valueBeside = hits.some((o) => o !== h && o.entries.some((e) => e.kind === 'value') && nearGap(o, h, lower) <= 1);
  if (valueBeside) return false;
  // A word the catalog does not know right before it is a value it does not have ("the rathlin route").
  const prev = st.text.words.filter((w) => w.end <= h.start).pop();
  if (prev && !st.text.isClaimed(prev) && /\s*$/.test(lower.slice(prev.end, h.start)) && lower.slice(prev.end, h.start).trim() === '' && isContentWord(prev.norm)) return false;
  const last = h.words[h.words.length - 1]!;
  const plural = /s$/.test(last.norm) && !/ss$/.test(last.norm);
  return plural || /^\s*(?:by|breakdown|split|mix|shares?|ranking|comparison)\b/.test(lower.slice(h.end, h.end + 14));
}

function isContentWord(w: string): boolean {
  return w.length >= 3 && !STOPWORDS.has(w) && !ORDINARY.has(w) && !/^\d/.test(w);
}

/**
 * The head noun of a measure already named ("construction employment", "retail trade jobs",
 * "government jobs"): a measure of the same quantity (its unit, unit label, how it adds up and its
 * kind) right after another names what that one is, not a second measure. A different quantity
 * beside it ("booking revenue", "passenger counts") is left to the other rules.
 */
function isHeadOfNamedPart(h: CatalogHit, prev: CatalogHit | undefined, st: ReadState): boolean {
  if (!prev || !/^\s+$/.test(st.text.lower.slice(prev.end, h.start))) return false;
  const [a, b] = [st.ds.metrics.find((m) => m.name === metricOf(prev)), st.ds.metrics.find((m) => m.name === metricOf(h))];
  if (!a || !b || a === b) return false;
  return a.unit === b.unit && a.unit_label === b.unit_label && a.definition.type === b.definition.type && metricKind(st.ds, a) === metricKind(st.ds, b);
}

/** A metric word right after a group or a value, or after "by"/"of" a breakdown: the unit counted, not a measure. */
function isUnitNoun(h: CatalogHit, hits: CatalogHit[], text: RequestText): boolean {
  const before = text.lower.slice(Math.max(0, h.start - 30), h.start);
  // "top 20 users by revenue": the users are ranked, revenue is the measure.
  if (/\b(?:top|bottom|best|worst|biggest|largest)\s+(?:\d+\s+|ten\s+|five\s+|three\s+)?$/.test(before) && /^\s*by\b/.test(text.lower.slice(h.end, h.end + 5))) return true;
  if (/\bby\s+$/.test(before) && isContentWord(text.wordAt(h.end)?.norm ?? '')) return true;
  const prev = hits.filter((o) => o.end <= h.start).pop();
  if (!prev || nearGap(prev, h, text.lower) > 0) return /\b(?:share|percentage|proportion|percent|%|fraction|rate)\s+of\s+(?:the\s+|our\s+|all\s+)?$/.test(before);
  return prev.entries.some((e) => e.kind === 'group' || e.kind === 'value');
}

/**
 * "What share of tickets were urgent", "share of sign-ups on a free trial", "what share of its
 * revenue do we refund": the rate or ratio metric of the catalog that the other words describe.
 */
function composeShares(metrics: string[], metricHits: CatalogHit[], clause: Clause, st: ReadState): Metric | undefined {
  const t = clause.text.toLowerCase();
  const share = /\b(?:share|percentage|proportion|percent|fraction|%)\s+of\s+(?:the\s+|our\s+|its\s+|all\s+)?/.exec(t);
  if (!share) return undefined;
  const ds = st.ds;
  // Already named as a rate or ratio of the catalog ("the share of revenue we refunded"): nothing to compose.
  const at = clause.start + share.index;
  if (metricHits.some((h) => h.start <= at && at < h.end)) return undefined;
  if (metrics.some((m) => { const d = ds.metrics.find((x) => x.name === m)?.definition.type; return d === 'rate' || d === 'ratio'; })) return undefined;
  const words = new Set(t.split(/[^\p{L}]+/u).filter((w) => w.length > 3).map(stem));
  // Every measure named, the "of revenue" of "share of revenue" included (dropped as the unit counted).
  const named = [...metrics, ...metricHits.map((h) => metricOf(h))];
  // "share of all flights": the measure right after "share of" is what is shared out, so its own
  // words ("flights") do not name a rate of it ("share of flights late"); only another word would.
  const sharedOut = metricHits.find((h) => h.start >= at + share[0].length && /^\s*(?:(?:the\s+)?(?:total|entire|whole|overall)\s+)?$/.test(st.text.lower.slice(at + share[0].length, h.start)));
  const baseStems = new Set(sharedOut ? metricNames(ds.metrics.find((x) => x.name === metricOf(sharedOut))!).flatMap((n) => n.split(/[^\p{L}]+/u)).filter((w) => w.length > 3).map(stem) : []);
  const mentions = (m: Metric) => [m.name.replaceAll('_', ' '), m.label, ...m.synonyms].some((n) => n.toLowerCase().split(/\s+/).some((w) => w.length > 3 && words.has(stem(w)) && !baseStems.has(stem(w)) && !/^(?:share|rate|revenue|tickets?|signups?|bookings?)$/.test(stem(w))));
  const candidates = ds.metrics.filter((m) => {
    const d = m.definition;
    if (d.type === 'rate') {
      const v = d.where.value;
      const values = Array.isArray(v) ? v.map(String) : v === undefined ? [] : [String(v)];
      return values.some((x) => words.has(stem(x.toLowerCase()))) || mentions(m) || words.has(stem(d.where.column.toLowerCase()));
    }
    if (d.type === 'ratio') return named.includes(d.denominator) && mentions(ds.metrics.find((x) => x.name === d.numerator)!);
    return false;
  });
  // "share of its revenue we refund": a ratio over the measure named right after "share of" first.
  const after = t.slice(share.index + share[0].length);
  const ratioFirst = candidates.filter((m) => m.definition.type === 'ratio' && after.startsWith(metricNames(ds.metrics.find((x) => x.name === (m.definition as { denominator: string }).denominator)!).find((n) => after.startsWith(n)) ?? '\u0000'));
  const pool = ratioFirst.length === 1 ? ratioFirst : candidates;
  if (pool.length !== 1) return undefined;
  const chosen = pool[0]!;
  const base = chosen.definition.type === 'ratio' ? [chosen.definition.numerator, chosen.definition.denominator] : [chosen.definition.type === 'rate' && chosen.definition.of ? chosen.definition.of : ''];
  for (let i = metrics.length - 1; i >= 0; i--) if (base.includes(metrics[i]!) || metrics[i] === chosen.name || rowCountMetric(ds)?.name === metrics[i] || words.has(stem(metrics[i]!.split('_')[0]!))) metrics.splice(i, 1);
  metrics.unshift(chosen.name);
  return chosen;
}

function metricNames(m: Metric): string[] {
  return [m.name.replaceAll('_', ' '), m.label, ...m.synonyms].map((n) => n.toLowerCase());
}

function nearGap(a: Span, b: Span, lower: string): number {
  const gap = a.end <= b.start ? lower.slice(a.end, b.start) : lower.slice(b.end, a.start);
  if (/[.;!?]/.test(gap)) return 99;
  return gap.trim().split(/\s+/).filter((w) => w.length > 0 && !/^(?:the|a|an|of|:|-)$/.test(w)).length;
}

/** The comparison group whose members a dimension's column marks (SkerryPass holders and the pass_holder column). */
function groupOfColumn(ds: DatasetConfig, dim: string): string | undefined {
  const column = ds.dimensions.find((d) => d.name === dim)?.column;
  return ds.comparison_groups.find((g) => g.column === column)?.name;
}

/** "A per B" names the ratio metric of A and B, or the average of A's column when B is the row count. */
function composeRatios(metrics: string[], hits: CatalogHit[], st: ReadState, clause: Clause): void {
  const metricHits = hits.filter((h) => h.entries.some((e) => e.kind === 'metric'));
  for (let i = 0; i + 1 < metricHits.length; i++) {
    const a = metricHits[i]!;
    const b = metricHits[i + 1]!;
    if (!/^\s*(?:per|for each|a|each|by)\s+$/.test(st.text.lower.slice(a.end, b.start))) continue;
    const [na, nb] = [a.entries.find((e) => e.kind === 'metric')!.name, b.entries.find((e) => e.kind === 'metric')!.name];
    const ratio = st.ds.metrics.find((m) => m.definition.type === 'ratio' && m.definition.numerator === na && m.definition.denominator === nb);
    const ma = st.ds.metrics.find((m) => m.name === na)!;
    const mb = st.ds.metrics.find((m) => m.name === nb)!;
    const average = ma.definition.type === 'sum' && mb.definition.type === 'count' && !('where' in mb.definition && mb.definition.where)
      ? st.ds.metrics.find((m) => m.definition.type === 'average' && m.definition.column === (ma.definition as { column: string }).column && !m.definition.where)
      : undefined;
    const replacement = ratio ?? average;
    if (!replacement) continue;
    const ia = metrics.indexOf(na);
    if (ia >= 0) metrics.splice(ia, 1, replacement.name);
    const ib = metrics.lastIndexOf(nb);
    if (ib >= 0 && ib !== ia) metrics.splice(ib, 1);
    void clause;
  }
}

/**
 * "Last season", "this season", "the previous season" with no season named (not "last summer"): a
 * sports or trading season whose start no config declares. It is read as the year of the data's
 * calendar ("last season" the last complete year, "this season" the year to date) and said on the
 * card, never dropped: a season that straddles two years (August to May) is not what the data's
 * year boundaries give, and the manager should see that.
 */
export function seasonAsYear(text: string): { text: string; notes: string[] } {
  const notes: string[] = [];
  const out = text.replace(/\b(this|last|previous|past|current|the\s+(?:last|previous|latest|current))\s+season\b(?!s)/gi, (whole: string, which: string) => {
    const w = which.toLowerCase().replace(/^the\s+/, '');
    const year = w === 'this' || w === 'current' ? 'this year' : 'last year';
    const said = year === 'this year' ? 'the data\'s current calendar year, to date' : 'the last complete calendar year of the data';
    notes.push(`"${whole}" read as ${said}: no season start is declared for this data, so a season is taken as a calendar year; for a season that runs across two years, name its first and last months.`);
    return year;
  });
  return { text: out, notes };
}

/** "nuclear" read as the energy source Nuclear Energy: a part of a value's name, said back with the value it stands for. */
function partReadAs(words: string, parts: readonly CatalogEntry[], ds: DatasetConfig): string {
  const dimension = ds.dimensions.find((d) => d.name === parts[0]!.name);
  const values = listJoin(parts.map((e) => e.value!));
  return `"${words}" read as ${dimension ? `the ${inSentence(dimension.label)} ` : ''}${values}.`;
}

/** Values named in a clause become filters, two of one breakdown set against each other a contrast. */
function readValues(valueHits: { hit: CatalogHit; entries: CatalogEntry[] }[], hits: CatalogHit[], st: ReadState, clause: Clause, ambiguous: AmbiguousValue[]): { filters: SegmentFilter[]; contrast?: { dimension: string; values: string[] } } {
  const lower = st.text.lower;
  const chosen: { dimension: string; value: string; exclude: boolean; hit: CatalogHit }[] = [];
  const pending: { amb: AmbiguousValue; hit: CatalogHit }[] = [];
  for (const { hit, entries } of valueHits) {
    const before = lower.slice(Math.max(0, hit.start - 30), hit.start);
    const after = lower.slice(hit.end, hit.end + 30);
    const strong = entries.filter((e) => !e.weak && !(e.partial && !/^\p{Lu}/u.test(hit.words[0]!.raw)));
    const ownNounBeside = hits.some((o) => o !== hit && o.entries.some((e) => e.kind === 'dimension' && entries.some((v) => v.name === e.name)) && nearGap(o, hit, lower) <= 1);
    const cueBeside =
      ownNounBeside ||
      /\b(?:only|just|excluding|except|without|exclude|leaving\s+out|leave\s+out|not\s+counting|via|through|on|in|from|at|for|vs\.?|versus|than|and|or|to|with|against)\s+(?:the\s+)?$|(?:^|\s)w\/\s*$/.test(before) ||
      hits.some((o) => o !== hit && o.entries.some((e) => e.kind === 'metric') && nearGap(o, hit, lower) <= 1) ||
      /^\s*(?:vs\.?|versus|v|than|and|or|compared)\b/.test(after);
    // Part of a value's name counts only when written as a name ("Saltreach", not "support") or
    // beside its breakdown's noun ("the saltreach route"); a value that is also a grain word
    // ("monthly", "annual") only beside its noun ("monthly plan").
    const capitalised = /^\p{Lu}/u.test(hit.words[0]!.raw);
    const grainWord = (e: CatalogEntry) => /^(?:daily|weekly|monthly|quarterly|yearly|annual|annually)$/.test((e.value ?? '').toLowerCase());
    // Or in lower case beside the measure it narrows ("retail unemployment"), or joined to a whole
    // value of its own breakdown ("construction and retail").
    const joinedToOwnValue = (e: CatalogEntry) =>
      hits.some((o) => o !== hit && o.entries.some((x) => x.kind === 'value' && x.name === e.name && !x.partial) && /^\s*(?:and|or|&|,|vs\.?|versus)\s*$/.test(o.end <= hit.start ? lower.slice(o.end, hit.start) : lower.slice(hit.end, o.start)));
    const usable = entries.filter((e) => {
      if (e.partial && !capitalised && !e.lead) return ownNounBeside || measureBeside(hit, hits, st.text) || joinedToOwnValue(e);
      if (grainWord(e)) return ownNounBeside || /\b(?:on|the|an?)\s+$/.test(before) && /^\s*(?:plans?|subscriptions?|tier|option)\b/.test(after);
      return !e.weak || cueBeside;
    });
    if (usable.length === 0) continue;
    // Candidates narrowed by a breakdown named beside the value ("the Saltreach route").
    const namedDims = hits.filter((o) => o.entries.some((e) => e.kind === 'dimension') && nearGap(o, hit, lower) <= 2).flatMap((o) => o.entries.map((e) => e.name));
    let candidates = namedDims.length > 0 ? usable.filter((e) => namedDims.includes(e.name)) : usable;
    if (candidates.length === 0) candidates = usable;
    const distinct = uniqueBy(candidates, (e) => `${e.name}\u0000${e.value}`);
    const exclude = /\b(?:excluding|except|without|exclude|leaving\s+out|leave\s+out|not\s+counting|other than|apart from|not|ex)\s+(?:the\s+)?$/.test(before);
    const plural = /s$/.test(hit.words[hit.words.length - 1]!.norm) || /\bboth\b|\ball\b/.test(before);
    const dims = unique(distinct.map((e) => e.name));
    if (distinct.length === 1 || (dims.length === 1 && plural && distinct.every((e) => e.partial))) {
      for (const e of distinct) chosen.push({ dimension: e.name, value: e.value!, exclude, hit });
      // A word that is only part of a value's name is said back with the whole value it was read as.
      const parts = distinct.filter((e) => e.partial);
      if (parts.length > 0) st.notes.push(partReadAs(st.text.quote(hit), parts, st.ds));
      for (const e of parts) (st.partWords ??= new Map()).set(`${e.name}\u0000${e.value}`, st.text.quote(hit));
    } else if (strong.length > 0 || cueBeside) {
      const text = st.text.quote(hit);
      if (!ambiguous.some((a) => a.text === text)) {
        const amb: AmbiguousValue = { text, candidates: distinct.map((e) => ({ dimension: e.name, value: e.value! })) };
        ambiguous.push(amb);
        pending.push({ amb, hit });
      }
    }
  }
  const filters: SegmentFilter[] = [];
  for (const c of chosen) {
    const f = filters.find((x) => x.dimension === c.dimension && !!x.exclude === c.exclude);
    if (f) {
      if (!f.values.includes(c.value)) f.values.push(c.value);
    } else filters.push({ dimension: c.dimension, values: [c.value], ...(c.exclude ? { exclude: true } : {}) });
  }
  // Two values of one breakdown joined by a comparison word are set against each other.
  const comparing = (a: CatalogHit, b: CatalogHit) => {
    const gap = a.end <= b.start ? lower.slice(a.end, b.start) : lower.slice(b.end, a.start);
    return (/\bwith\b/.test(gap) && /\bcompar\w*/.test(clause.text.toLowerCase())) || /\b(?:vs\.?|versus|v|than|against|compar\w*|or|beat\w*|outperform\w*|outsell\w*|overtake\w*|overtook)\b|(?:^|\s)w\/(?:\s|$)/.test(gap) || (/\band\b/.test(gap) && /\bcompar\w*|\bdifferen\w*|\bbetween\b|\bfaster|\bslower|\bbetter|\bworse|\bmore\b|\bless\b|\bhigher\b|\blower\b|\bbigger\b|\bsmaller\b/.test(clause.text.toLowerCase()));
  };
  let contrast: { dimension: string; values: string[] } | undefined;
  for (let i = 0; i + 1 < chosen.length; i++) {
    const a = chosen[i]!;
    const b = chosen[i + 1]!;
    if (a.dimension !== b.dimension || a.exclude || b.exclude) continue;
    if (comparing(a.hit, b.hit)) {
      contrast = { dimension: a.dimension, values: unique([a.value, b.value]) };
      break;
    }
  }
  // A value that needs asking about ("Bundesliga": two divisions; "Barcelona": home or away team)
  // named against another keeps the comparison: the answer to the question sets the two side by side.
  for (const { amb, hit } of pending) {
    const others = [...chosen.filter((c) => !c.exclude).map((c) => c.hit), ...pending.filter((p) => p.hit !== hit).map((p) => p.hit)];
    if (others.some((o) => o !== hit && Math.abs((o.start < hit.start ? hit.start - o.end : o.start - hit.end)) <= 40 && comparing(o, hit))) amb.versus = true;
  }
  return contrast ? { filters, contrast } : { filters };
}

// ---------------------------------------------------------------------------------------------
// Periods of a question

/** A level set against one named earlier period ("higher than in March", "lower than during Q1"). */
const LATER_THAN_NAMED = /\b(?:higher|lower|more|less|fewer|bigger|smaller|busier|quieter|better|worse|up|down)(?:\s+[a-z'-]+){0,3}?\s+than\s+(?:(?:it|they|that|this|we|there)\s+(?:was|were|did|had)\s+)?(?:in|during|over|for|at|back\s+in)\b/;

/** The question's window and the window it is compared with, like for like. */
/**
 * "each quarter compared with a year earlier", "every month vs the same month last year",
 * "year-over-year by quarter": a shift named with a grain and no period of its own asks for a
 * series of changes, one per period at that grain (plan.ts growth_series), not two windows.
 */
function asksChangeSeries(periods: readonly PeriodMention[], lowerText: string): boolean {
  if (!periods.some((p) => p.shift) || periods.some((p) => p.window && !p.compared && !p.shift)) return false;
  return /\b(?:each|every|per|by)\s+(?:day|week|month|quarter|year)\b|\b(?:daily|weekly|monthly|quarterly)\b/.test(lowerText);
}

function windowsOf(periods: PeriodMention[], st: ReadState, clause: Clause): { window?: DateWindow; compareWindow?: DateWindow; windowSoFar?: boolean; spanEnds?: SpanEndsUnit } {
  const t = clause.text.toLowerCase();
  const plain = periods.filter((p) => p.window && !p.compared && !p.shift);
  const comparing = /\bcompar\w*|\bvs\.?\b|\bversus\b|\bagainst\b|\bbeat\w*|\bthan\b|\bdifferen\w*|\bchanged?\s+(?:between|from)\b/.test(t);
  // Over a stretch of several periods ("2023 and 2024"), "growth on the year before" asks for each
  // period's change, not for a second window.
  const stretch = plain.length >= 2 && !comparing;
  const compared = periods.filter((p) => (p.compared || p.shift) && !(stretch && p.shift && !p.strong));
  let main = plain[0];
  // A second period named outright ("year over year, 2005 vs 2006") is the comparison; a shift
  // ("year over year") only says how the two are set apart.
  let other = compared.find((p) => p.window && !p.shift) ?? compared[0];
  if (!other && plain.length >= 2 && comparing) other = { ...plain[1]!, compared: true };
  // Two periods named outright, the later one first or second ("2005 vs 2006"): the later is the
  // current one and the earlier its base, as in any change from one to the other.
  if (main?.window && other?.window && !other.shift && !other.relative && !main.toLatest && other.window.start >= main.window.end) {
    [main, other] = [{ ...other, compared: false }, { ...main, compared: true }];
  }
  let window: DateWindow | undefined;
  if (main?.window) {
    // Two plain periods and no comparison: the stretch that covers both ("for 2023 and 2024").
    const spanEnd = !other && plain.length >= 2 ? plain.reduce((e, p) => (p.window!.end > e ? p.window!.end : e), main.window.end) : main.window.end;
    // "since 2024" runs to the latest data; "this year" and "2024 so far" to the latest data within their own period.
    const latest = latestEnd(st);
    window = { start: main.window.start, end: main.toLatest ? (main.bounded ? minIso(spanEnd, latest) : latest) : spanEnd };
  } else if (other?.window && !other.shift && !other.relative && other.unit !== 'span' && other.unit !== 'day' && LATER_THAN_NAMED.test(t)) {
    // "higher than in March", "is it lower than it was in Q1": a change from that period to the
    // latest complete one of the same unit (June 2001 on data ending 30 June 2001), never the
    // period running from the anchor, which holds no data when the data has ended.
    const latest = latestEnd(st);
    let current = periodHolding(addDays(latest, -1), other.unit, st.ds.hemisphere ?? 'north');
    if (current.end > latest) current = shiftPeriod(current, other.unit, 1);
    if (current.start <= other.window.start) return {};
    return { window: clip(current, st), compareWindow: clip(other.window, st) };
  } else if (asksChangeSeries(periods, t)) {
    return {};
  } else if (other && !other.shift?.unit.match(/^(?:month|week|quarter|day)$/)) {
    // A comparison with no window of its own ("is revenue up on last year?"): the year to date.
    const unit: PeriodUnit = other.shift?.unit === 'period' ? 'month' : other.shift?.unit === 'same' ? 'year' : ((other.shift?.unit as PeriodUnit | undefined) ?? (other.unit === 'span' ? 'year' : (other.unit as PeriodUnit)));
    const start = unit === 'year' || unit === 'half' || unit === 'season' ? `${yearOf(st.anchor)}-01-01` : monthWindow(yearOf(st.anchor), Number(st.anchor.slice(5, 7))).start;
    window = { start, end: latestEnd(st) };
    main = { ...other, window, unit: 'span', compared: false, relative: true, toLatest: true };
  } else if (other?.shift) {
    // "month on month" alone asks for a series of changes, not two windows.
    return {};
  }
  if (!window) return {};
  const clipped = clip(window, st);
  const so = clipped.end < window.end ? { windowSoFar: true } : {};
  // "since 2001", "over the last 10 years": a change over the stretch runs from its first whole period to its last.
  if (!other) return { window: clipped, ...so, ...(main?.startUnit ? { spanEnds: main.startUnit } : {}) };
  const compareWindow = compareOf(clipped, main!, other, st);
  return compareWindow ? { window: clipped, compareWindow, ...so } : { window: clipped, ...so };
}

/**
 * Where "the latest data" ends for a period that runs to it ("since March", "this year"): the
 * data's end, but never past the anchor's day. Rows dated after today (a date typed with the
 * wrong century, a booking not yet travelled) are not the latest data.
 */
function latestEnd(st: Pick<ReadState, 'anchor' | 'dataEnd'>): string {
  const today = addDays(st.anchor, 1);
  return st.dataEnd ? minIso(st.dataEnd, today) : st.anchor;
}

function clip(w: DateWindow, st: ReadState): DateWindow {
  return st.dataEnd && w.end > st.dataEnd && w.start < st.dataEnd ? { start: w.start, end: st.dataEnd } : w;
}

/** The compared window, like for like: the same length and the same place in the calendar. */
function compareOf(window: DateWindow, main: PeriodMention, other: PeriodMention, st: ReadState): DateWindow | undefined {
  if (other.shift) {
    const n = other.shift.n;
    const unit = other.shift.unit === 'same' ? (main.unit === 'span' ? 'year' : main.unit) : other.shift.unit;
    if (unit === 'period') {
      const days = daysBetween(window.start, window.end);
      return { start: addDays(window.start, -days), end: window.start };
    }
    const months = { year: 12, half: 6, quarter: 3, season: 12, month: 1, week: 0, day: 0 }[unit];
    if (months > 0) return yearsEarlier(window, main, months * n);
    const days = unit === 'week' ? 7 * n : n;
    return { start: addDays(window.start, -days), end: addDays(window.end, -days) };
  }
  const raw = other.window!;
  const mainRaw = main.window!;
  const sameUnit = other.unit === main.unit && other.unit !== 'span';
  const coarser = other.unit === 'year' && main.unit !== 'year' && main.unit !== 'span';
  const relativeLast = other.relative && /^(?:last|previous|prior|the\s+previous|the\s+prior|a\s+year)/i.test(other.words);
  if (sameUnit || coarser || (relativeLast && other.unit === 'year')) {
    if (other.unit === 'day' || other.unit === 'week') {
      const days = daysBetween(raw.start, mainRaw.start);
      return { start: addDays(window.start, -days), end: addDays(window.end, -days) };
    }
    const months = coarser || (relativeLast && other.unit === 'year') ? 12 * (yearOf(mainRaw.start) - yearOf(raw.start)) : monthsBetween(raw.start, mainRaw.start);
    if (months <= 0) return clip(raw, st);
    return yearsEarlier(window, main, months);
  }
  return clip(raw, st);
}

/** `months` back; whole years back from a week ("week 46 ... the same week last year") keep its ISO week number. */
function yearsEarlier(window: DateWindow, main: PeriodMention, months: number): DateWindow {
  return (main.unit === 'week' && months % 12 === 0 ? shiftWeeksYears(window, months / 12) : undefined) ?? shiftMonths(window, -months);
}

function monthsBetween(a: string, b: string): number {
  return (yearOf(b) - yearOf(a)) * 12 + (Number(b.slice(5, 7)) - Number(a.slice(5, 7)));
}

/** "it launched on 9 Jan 2023", "since the price change on 1 May": the date a before/after turns on. */
// An event's noun right after its date, with at most two words between ("2019 launch", "2024 price rise").
const EVENT_AFTER = /^\s*(?:[\p{L}-]+\s+){0,2}?(?:launch|go-live|rollout|roll-out|relaunch|reorgani[sz]ation|reorg|restructur\w*|migration|redesign|price\s+(?:rise|increase|hike|cut|change)|campaign|promotion|merger|acquisition|rebrand)\b/u;

function statedLaunch(periods: PeriodMention[], text: RequestText): { date: string; words: string; mention: PeriodMention } | undefined {
  for (const p of periods) {
    if (!p.window || p.changeEnd) continue;
    const before = text.lower.slice(Math.max(0, p.start - 60), p.start);
    const after = text.lower.slice(p.end, p.end + 30);
    // An event dated by its year or a period alone: "since the 2019 launch", "how did the 2024 price
    // rise affect bookings", "before and after 2015" (the date it turns on: the period's first day).
    const eventAfter = EVENT_AFTER.exec(after);
    // "after 1 June compared with before", "did it go up after 1 June?": the date splits the data in two.
    const afterWords = /^(?:after|post)\b/.test(p.words.toLowerCase());
    const againstBefore = afterWords && /^\s*,?\s*(?:(?:as\s+)?compared\s+(?:with|to)|vs\.?|versus|than|against|relative\s+to)\s+(?:(?:the\s+)?(?:period\s+|time\s+|months?\s+|weeks?\s+|days?\s+)?before|beforehand|prior|earlier)\b/.test(after);
    const movedAfter = afterWords && p.unit === 'span' && !p.startUnit && /\b(?:go(?:es)?|gone|went|get|got)\s+(?:up|down|better|worse)\s+$|\b(?:rise|rose|risen|fall|fell|fallen|drop(?:ped)?|increase[ds]?|decrease[ds]?|improve[ds]?|worsen(?:ed)?|change[ds]?|jump(?:ed)?|climb(?:ed)?)\s+$/.test(before);
    const beforeAndAfter = (/\bbefore\s+(?:and|or|vs\.?|versus|v|&|\/)\s+$/.test(before) && afterWords) || againstBefore || movedAfter;
    if ((eventAfter || beforeAndAfter) && !(p.relative && p.unit !== 'span')) {
      return { date: p.named ?? p.window.start, words: text.quote(p), mention: p };
    }
    if (p.unit !== 'day' && p.unit !== 'month' && p.unit !== 'week' && p.unit !== 'span') continue;
    if (p.relative && p.unit !== 'span') continue;
    const verbs = /\b(?:launch(?:ed|es)?|start(?:ed|s)?|began|begun|went\s+(?:live|up|down)|go(?:es)?\s+live|introduc(?:ed|es)|rolled\s+out|roll-?out|kicked\s+off|switch(?:ed)?|changed|effective|took\s+effect|came\s+into\s+effect|live\s+(?:from|since|on)|rose|increased|decreased|was\s+cut|were\s+cut)\b[^.;!?]{0,40}$/;
    const nouns = /\b(?:launch|rise|increase|hike|cut|change|reorgani[sz]ation|reorg|restructur\w*|migration|redesign|rollout|roll-out|switch|update|campaign|promotion|sale|outage|new\s+\w+)\s+(?:on|from|in|of)\s+(?:the\s+)?$/;
    // "how joblessness changed from 2007 through 2009", "the rise between 2007 and 2009": across a
    // stretch with two ends, words of change say what moved over it (the question's period), not
    // when something happened; only an event ("launched from 1 to 14 March") dates one.
    const closed = p.unit === 'span' && !p.toLatest && !p.fromEarliest && !p.relative;
    const word = verbs.exec(before)?.[0].split(/\s+/).slice(0, 2).join(' ') ?? nouns.exec(before)?.[0].split(/\s+/)[0] ?? /(?:launch|go-live|rollout|roll-out|switch|change|rise|increase|hike|cut|reorgani[sz]ation|reorg|migration|redesign|update|campaign|promotion)$/u.exec(/^\s*(?:\p{L}+\s+){0,2}(?:launch|go-live|rollout|roll-out|switch|change|rise|increase|hike|cut|reorgani[sz]ation|reorg|migration|redesign|update|campaign|promotion)\b/u.exec(after)?.[0] ?? '')?.[0];
    if (word && closed && !/launch|start|beg[au]n|live|introduc|roll|kicked|effect|reorg|restructur|migration|redesign|campaign|promotion|outage|sale|new/.test(word)) continue;
    // "how has generation changed since 2001", "prices rose from 2019 on": the measure moved over a
    // stretch that starts there (a change since its start), unlike "since prices rose in March"
    // or "since the launch in March", where something happened on the date.
    if (word && p.startUnit && /^(?:changed|rose|increased|decreased|was|were)\b/.test(word) && verbs.test(before)) continue;
    if (word) {
      const start = p.unit === 'span' && /\bsince\b/.test(p.words.toLowerCase()) ? p.window.start : p.window.start;
      return { date: start, words: text.quote(p), mention: p };
    }
  }
  return undefined;
}

/**
 * A comparison keeps both its sides. Values named of the breakdown the group is made of ("impact
 * of Early Bake at Harrow Lane, Millbrook and St Aidan's") name one side, so they are not a filter
 * that would leave nothing to compare with: said on the card. "Since" the launch date is the
 * launch the comparison turns on, not a window that leaves no before period.
 */
function keepComparison(q: Question, st: ReadState): void {
  const ds = st.ds;
  const g = ds.comparison_groups.find((x) => x.name === q.comparisonGroup);
  if (!g) return;
  const kept: SegmentFilter[] = [];
  for (const f of q.filters) {
    const sides = groupMadeOf(ds, g, f.dimension) && !f.exclude ? f.values.map((v) => isMemberValue(ds, g, v)) : [];
    const side = sides.length > 0 && sides.every((x) => x === sides[0]) ? sides[0] : undefined;
    if (side === undefined) {
      kept.push(f);
      continue;
    }
    const named = listJoin(f.values.map(String));
    const members = memberValues(ds, g);
    const all = side && members !== undefined && members.length === f.values.length;
    const one = f.values.length === 1;
    st.notes.push(
      all
        ? `${named} ${one ? 'is' : 'are'} the ${g.members_label}, so I compare ${one ? 'it' : 'them'} with ${g.others_label} rather than keep to ${one ? 'it' : 'them'}.`
        : `${named} ${one ? 'is' : 'are'} ${side ? `among the ${g.members_label}` : `among ${g.others_label}`}; kept to ${one ? 'it' : 'them'} there would be nothing to compare with, so I compare all ${g.members_label} with ${g.others_label}.`,
    );
  }
  q.filters = kept;
  if (g.launch_date && !q.launchDate && q.window?.start === g.launch_date && q.window.end === latestEnd(st) && !q.compareWindow) {
    q.launchDate = g.launch_date;
    delete q.window;
    delete q.windowSoFar;
  }
}

/**
 * A group named in a question that sets it against nothing ("Early Bake shops' orders by month"):
 * the answers cover every row, said on the card with the words that would compare the group.
 */
function groupNotCompared(q: Question, name: string, ds: DatasetConfig): string {
  const g = ds.comparison_groups.find((x) => x.name === name)!;
  const ask = `To set ${g.members_label} against ${g.others_label}${g.launch_date ? ' before and after the launch' : ''}, ask for "${g.members_label} vs ${g.others_label}".`;
  // "Did the Early Bake shops grow faster this year?": each group's own growth is not measured yet; said, not answered silently.
  if (q.kind === 'growth') return `"${q.text}" asks about ${g.label}, but I do not measure each group's own growth yet, so I read it as growth over all the data, not split by group. ${ask}`;
  return `"${q.text}" names ${g.label} but sets them against nothing, so I read it as a ${KIND_WORDS[q.kind]} question over all the data, not split by group. ${ask}`;
}

const KIND_WORDS: Record<RequestKind, string> = { trend: 'trend', growth: 'growth', kpi: 'snapshot', performance: 'comparison' };

function refersToLaunch(text: string): boolean {
  return /\b(?:since|after|before|post|pre)[- ](?:it|we|they|the)?\s*(?:[\p{L}-]+\s+){0,3}(?:launch(?:ed)?|went\s+live|started|rolled\s+out|introduc\w+|began|came\s+in)\b|\bsince\s+(?:the\s+)?launch\b|\bpost-launch\b|\bpre-launch\b|\bbefore\s+and\s+after\b|\blaunch(?:ed)?\b/iu.test(text);
}

// ---------------------------------------------------------------------------------------------
// Grain, audience, business words, personal values

/** The longest period over which "per day" alone is read as daily points (a month and a bit). */
const PER_DAY_POINTS_DAYS = 35;

/** An average daily figure asked for ("orders per day", "revenue a day", "average daily takings"), not daily points. */
/** "daily flights", "flights daily": a measure said by the day, which over longer periods is their daily average. */
const DAILY_MEASURE = /\bdaily\s+(?!basis\b|grain\b|breakdown\b|chart\b|series\b|view\b|points?\b|figures?\s+for\b)[\p{L}]+|\b[\p{L}]+\s+daily\b/u;

const PER_DAY = /\b(?:per|a)\s+day\b(?![- ]of\b)|\bper-day\b|\bdaily\s+(?:average|rate|mean)\b|\baverage\s+daily\b/;

/** Months of the year named as the things compared ("which months", "time of year"). */
const CALENDAR_MONTHS = /(?<![\p{L}])(?:months|which\s+month|month\s+of\s+(?:the\s+)?year|time\s+of\s+(?:the\s+)?year|seasonal(?:ity)?)(?![\p{L}])/gu;

/** The grain of the first extreme asked ("the hottest day": daily), when no grain is stated. */
function extremeGrain(extremes: readonly PeriodExtreme[]): ReturnType<typeof readGrain> {
  const first = extremes[0];
  return first ? { grain: first.grain, words: first.words, how: 'stated', spans: [] } : undefined;
}

function readGrain(text: RequestText): { grain: Grain; words: string; how: 'stated' | 'inferred'; spans: Span[]; perDayOnly?: true } | undefined {
  const found: { grain: Grain; span: Span; how: 'stated' | 'inferred' }[] = [];
  for (const g of GRAINS) {
    const w = GRAIN_WORDS[g];
    const extra = w.extra.filter((x) => !/^(?:wow|mom|qoq|dod)$/.test(x)).map((x) => x.replace(/[-\s]+/g, '[-\\s]+'));
    const stated = new RegExp(`(?<![\\p{L}])(?:${[w.adjective, ...extra].join('|')}|(?:by|per|each|every|for\\s+each|broken\\s+down\\s+by|split\\s+by)\\s+(?:the\\s+)?(?:calendar\\s+)?${w.noun})(?![\\p{L}])`, 'gu');
    for (const m of text.matches(stated)) {
      // A value of the data ("annual plans", "the monthly plan") is not a grain.
      if (text.isClaimed(m.span)) continue;
      // "per day" beside another grain is a per-day rate ("bookings per day by month"), not the grain;
      // "by day of week" asks for the days of the week.
      if (g === 'day' && (/^(?:per|a)\s/.test(m[0]) || /^[- ]of[- ](?:the[- ])?week\b/.test(text.lower.slice(m.span.end)))) continue;
      // "per year" in "how fast ... per year", "each year" after "busiest months": a rate or a season,
      // not a grain; "how many strikes did we have each year" is yearly figures.
      if (g === 'year' && /^(?:per|each|every)\s/.test(m[0]) && /\b(?:how\s+(?:fast|quickly)|rate|rising|falling|growing|grow|busiest|quietest|peak)\b/.test(text.lower) && !/\bby\s+year\b/.test(text.lower)) continue;
      found.push({ grain: g, span: m.span, how: 'stated' });
    }
  }
  const perDayAlone = [...text.matches(/(?<![\p{L}])(?:per|a)\s+day(?![\p{L}])/gu)];
  // "which months have the most bookings per day": months of the year compared per day, on a
  // monthly plan; a daily one would answer a different question (and note every unusual day).
  const months = [...text.matches(CALENDAR_MONTHS)];
  if (found.length === 0 && perDayAlone.length > 0 && months.length > 0) found.push({ grain: 'month', span: months[0]!.span, how: 'stated' });
  // "per day" alone is daily points only over a short period (see PER_DAY_POINTS_DAYS).
  if (found.length === 0 && perDayAlone.length > 0) return { grain: 'day', words: text.quote(perDayAlone[0]!.span), how: 'stated', spans: [perDayAlone[0]!.span], perDayOnly: true };
  if (found.length === 0) return undefined;
  found.sort((a, b) => (a.how === b.how ? a.span.start - b.span.start : a.how === 'stated' ? -1 : 1));
  const first = found[0]!;
  return { grain: first.grain, words: text.quote(first.span), how: first.how, spans: found.filter((f) => f.grain === first.grain).map((f) => f.span) };
}

function readAudience(text: RequestText, hits: CatalogHit[]): { audience: (typeof AUDIENCES)[number]; words: string; how: 'stated' | 'inferred'; span: Span } | undefined {
  // A cue that is a value of the data ("the Billing team") is the data's, not the audience.
  const ofData = (span: Span) => hits.some((h) => overlaps(h, span) && h.entries.some((e) => e.kind === 'value' && (!e.partial || /^\p{Lu}/u.test(h.words[0]!.raw))));
  for (const a of ['leadership', 'analysts', 'managers'] as const) {
    const all = [...text.matches(new RegExp(AUDIENCE_CUES[a].source, 'gi'))].filter((x) => !ofData(x.span));
    const m = all[0];
    if (!m) continue;
    // Every cue of any audience is context, not data ("the heads of product", "the monthly update").
    for (const other of ['leadership', 'analysts', 'managers'] as const) for (const x of text.matches(new RegExp(AUDIENCE_CUES[other].source, 'gi'))) if (!ofData(x.span)) text.claim(x.span);
    const stated = /leader|board|exec|ceo|cfo|coo|director|manager|analyst|senior/.test(m[0]);
    const span = { start: m.index, end: m.index + m[0].length };
    return { audience: a, words: text.quote(span), how: stated ? 'stated' : 'inferred', span };
  }
  return undefined;
}

/** Ordinary words for the main kinds of metric ("takings", "how many"), when exactly one metric fits. */
function findRoleWords(text: RequestText, ds: DatasetConfig): RoleHit[] {
  const out: RoleHit[] = [];
  for (const { role, pattern } of ROLE_WORDS) {
    for (const m of text.matches(new RegExp(pattern.source, 'g'))) {
      if (text.isClaimed(m.span) || out.some((o) => overlaps(o.span, m.span))) continue;
      // "how many customers": the catalog's word after it decides, not the role; "how many staff
      // hours": a word the catalog does not know decides, and is said back.
      if (role === 'count' && /how many|number of|no\.? of|count of/.test(m[0])) {
        const next = text.wordAt(m.span.end);
        if (next && (text.isClaimed(next) || (!STOPWORDS.has(next.norm) && !ORDINARY.has(next.norm)))) continue;
      }
      // "trading volume", "call volume": a word the catalog does not know says what is counted, and
      // a count of the data's rows is not a count of that. Said back as a measure it lacks.
      const qualifier = role === 'count' && /^(?:volumes?|transactions|throughput|activity)$/.test(m[0]) ? text.words.find((w) => w.end <= m.span.start && /^\s*$/.test(text.lower.slice(w.end, m.span.start))) : undefined;
      if (qualifier && /\p{L}/u.test(qualifier.norm) && !text.isClaimed(qualifier) && !out.some((o) => overlaps(o.span, qualifier)) && !STOPWORDS.has(qualifier.norm) && !ORDINARY.has(qualifier.norm) && !ORDINARY.has(stem(qualifier.norm))) {
        out.push({ span: { start: qualifier.start, end: m.span.end }, role, metrics: [], qualified: true });
        continue;
      }
      if (role === 'count' && VOLUME_WORDS.test(m[0])) {
        out.push(volumeHit(m.span, m[0], ds));
        continue;
      }
      out.push({ span: m.span, role, metrics: metricsForRole(ds, role) });
    }
  }
  return out;
}

/**
 * A bare "volume": the one count of the data it can mean, said back ("volume" read as the number
 * of tickets), or, with several (bookings, passengers), none, to be asked. Counts of rows and sums
 * counted in units qualify; a count of distinct ids (customers) is how many, not how much.
 */
function volumeHit(span: Span, words: string, ds: DatasetConfig): RoleHit {
  const counts = volumeCandidates(ds).map((name) => ds.metrics.find((m) => m.name === name)!);
  if (counts.length === 1) return { span, role: 'count', metrics: [counts[0]!.name], saidBack: `"${words}" read as the number of ${inSentence(counts[0]!.label)}.` };
  return { span, role: 'count', metrics: [], several: true };
}

const catalogWordSets = new WeakMap<PreparedCatalog, ReadonlySet<string>>();

/** Every word of the catalog's names and the data's values, which spelling mends never touch. */
function catalogWords(catalog: PreparedCatalog): ReadonlySet<string> {
  let words = catalogWordSets.get(catalog);
  if (!words) {
    words = new Set(catalog.entries.flatMap((e) => e.phrase.toLowerCase().split(/[^\p{L}\p{N}]+/u)).filter((w) => w.length > 0));
    catalogWordSets.set(catalog, words);
  }
  return words;
}

/** The counts a bare "volume" can mean: counts of rows and sums counted in units, unfiltered. */
function volumeCandidates(ds: DatasetConfig): string[] {
  const plain = (m: Metric) => !('where' in m.definition && m.definition.where);
  return ds.metrics.filter((m) => plain(m) && (m.definition.type === 'count' || (m.definition.type === 'sum' && m.unit === 'count'))).map((m) => m.name);
}

export function metricsForRole(ds: DatasetConfig, role: MetricRole): string[] {
  const plain = (m: Metric) => !('where' in m.definition && m.definition.where);
  const pick = (ms: Metric[]) => {
    const preferred = ms.filter((m) => m.higher_is_better && plain(m));
    return (preferred.length > 0 ? preferred : ms).map((m) => m.name);
  };
  switch (role) {
    case 'amount':
      return pick(ds.metrics.filter((m) => m.definition.type === 'sum' && m.unit === 'currency'));
    case 'count':
      return pick(ds.metrics.filter((m) => m.definition.type === 'count'));
    case 'distinct':
      return pick(ds.metrics.filter((m) => m.definition.type === 'distinct_count'));
    case 'average_amount':
      return pick(ds.metrics.filter((m) => m.definition.type === 'average' && m.unit === 'currency'));
  }
}

export function rowCountMetric(ds: DatasetConfig): Metric | undefined {
  return ds.metrics.find((m) => m.definition.type === 'count' && !('where' in m.definition && m.definition.where));
}

/** Text that looks like a person's email address, phone number or id: refused as a filter. */
function findPersonalValues(text: RequestText): { text: string; span: Span }[] {
  const out: { text: string; span: Span }[] = [];
  const patterns = [
    /[\p{L}\p{N}._%+-]+@[\p{L}\p{N}-]+(?:\.[\p{L}\p{N}-]+)*/gu,
    /(?<![\p{N}-])(?:\+\d{1,3}[\s-]?)?(?:\(0?\d{1,4}\)|0\d{1,4})[\s-]?\d{3,4}[\s-]?\d{3,4}(?![\p{N}-])/gu,
    /\+\d{1,3}[\s-]?\d{2,4}[\s-]?\d{3,4}[\s-]?\d{3,4}/gu,
    /\b(?:customer|user|member|client|passenger|account|person|patient|subscriber|caller|requester|employee)\s*(?:id|#|no\.?|number|ref)?\s*[:#]?\s*(?=[a-z-]{0,4}\d)[a-z]{0,4}[-_]?\d{3,}\b/gu,
  ];
  for (const re of patterns) {
    for (const m of text.matches(re)) {
      if (out.some((o) => overlaps(o.span, m.span))) continue;
      out.push({ text: text.quote(m.span), span: m.span });
      text.claim(m.span);
    }
  }
  return out;
}

// ---------------------------------------------------------------------------------------------
// Evidence and what to ask

function recordEvidence(brief: Brief, st: ReadState): void {
  const ev = st.evidence;
  const q = brief.questions;
  ev.dataset = { words: '', how: 'inferred', value: st.ds.name, reason: 'the dataset this channel uses' };
  if (q.length > 0) ev.kinds = { words: q.map((x) => x.text).join(' | '), how: 'inferred' };
  // The request's own words for its measures ("damage costs"), not the catalog's names.
  const quoted = st.hits.filter((h) => h.entries.some((e) => e.kind === 'metric' && brief.metrics.includes(e.name))).map((h) => st.text.quote(h));
  const metricWords = quoted.length > 0 ? quoted : q.filter((x) => x.metrics.length > 0).map((x) => x.metrics.join(', '));
  const inferred = st.inferredMetrics.filter((i) => brief.metrics.includes(i.metric));
  if (brief.metrics.length > 0) ev.metrics = quoted.length === 0 && inferred.length > 0 ? { words: [...new Set(inferred.map((i) => i.words))].join('; '), how: 'inferred' } : { words: [...new Set(metricWords)].join('; '), how: 'stated' };
  if (brief.dimensions.length > 0) ev.dimensions = { words: brief.dimensions.join(', '), how: 'stated' };
  const filters = q.flatMap((x) => x.filters);
  if (filters.length > 0) ev.filters = { words: filters.map((f) => (isDayFilter(f) ? (st.dayWords ?? []).join(', ') || dayScopeWords(f) : f.values.map((v) => st.partWords?.get(`${f.dimension}\u0000${v}`) ?? v).join(', '))).join('; '), how: 'stated' };
  if (brief.comparisonGroup) ev.comparisonGroup = { words: brief.comparisonGroup, how: 'stated' };
  const launched = q.find((x) => x.launchDate);
  if (launched?.launchDate) ev.launchDate = { words: launched.launchDate, how: st.periods.some((p) => p.window?.start === launched.launchDate && /launch|start|live|introduc|roll/.test(st.text.lower.slice(Math.max(0, p.start - 60), p.start))) ? 'stated' : 'inferred' };
  const windowed = st.periods.find((p) => p.window && !p.compared && !p.shift);
  if (brief.window) ev.window = { words: windowed?.words ?? '', how: windowed ? 'stated' : 'inferred' };
  const compared = st.periods.find((p) => p.compared || p.shift);
  if (brief.compareWindow) ev.compareWindow = { words: compared?.words ?? '', how: compared ? 'stated' : 'inferred' };
}

function toAsk(brief: Brief): Askable[] {
  const ask = new Set<Askable>();
  if (brief.questions.length === 0 || brief.questions.every((q) => q.metrics.length === 0 && !q.frequency)) ask.add('metrics');
  for (const u of brief.unknownTerms) {
    if (u.role === 'metric') ask.add('metrics');
    if (u.role === 'dimension') ask.add('dimensions');
    if (u.role === 'value') ask.add('values');
  }
  if ((brief.ambiguousValues ?? []).length > 0) ask.add('values');
  return [...ask];
}

// ---------------------------------------------------------------------------------------------

/** "Could the data team tell us whether X" -> "X": the question without its polite wrapping. */
function withoutPreamble(clause: string): string {
  const stripped = clause
    .replace(/^(?:hi|hello|hey|dear)\b[^,]*,\s*/i, '')
    .replace(/^(?:(?:could|can|would|will)\s+(?:you|someone|the data team|the team|we)\s+(?:please\s+)?(?:tell|show|let)\s+(?:us|me)\s+(?:know\s+)?)?(?:whether|if)\s+/i, '')
    .replace(/^(?:and|also|plus)\s+/i, '');
  return stripped.length > 0 ? stripped : clause;
}

/**
 * Each day set goes to the questions whose words hold it (every question when none does, as a
 * restriction said once for the whole request); two set against each other become the question's
 * contrast of two day sets, whose values are the sets' ISO days ("6,7" against "1,2,3,4,5").
 */
function applyDaySets(questions: Question[], reading: DayReading, text: RequestText, notes: string[]): void {
  const holding = (m: DaySetMention) => {
    const words = text.quote(m.span).toLowerCase();
    const own = questions.filter((q) => q.text.toLowerCase().includes(words));
    return own.length > 0 ? own : questions;
  };
  const contrasted = new Set(reading.contrast ?? []);
  for (const m of reading.mentions) {
    if (m.saidBack) notes.push(m.saidBack);
    if (contrasted.has(m)) continue;
    for (const q of holding(m)) q.filters = mergeFilters(q.filters, [dayFilter(m.days)]);
  }
  if (reading.contrast) {
    const [a, b] = reading.contrast;
    for (const q of holding(a)) if (!q.contrast) q.contrast = { dimension: DAY_OF_WEEK, values: [a.days.join(','), b.days.join(',')] };
  }
}

function mergeFilters(a: SegmentFilter[], b: SegmentFilter[]): SegmentFilter[] {
  const out = a.map((f) => ({ ...f, values: [...f.values] }));
  for (const f of b) {
    const same = out.find((x) => x.dimension === f.dimension && !!x.exclude === !!f.exclude);
    if (!same) {
      out.push({ ...f, values: [...f.values] });
      continue;
    }
    for (const v of f.values) if (!same.values.includes(v)) same.values.push(v);
  }
  return out;
}

function unique<T>(xs: T[]): T[] {
  return [...new Set(xs)];
}

function uniqueBy<T>(xs: T[], key: (x: T) => string): T[] {
  const seen = new Set<string>();
  return xs.filter((x) => (seen.has(key(x)) ? false : (seen.add(key(x)), true)));
}
