// The words of every bot post. Plain text with light markdown (bold with *, lists with -),
// which each adapter renders in its platform's way.
import { personalDataRefusal } from './prompts.js';
import type { DatasetConfig } from '../config/schema.js';
import { formatPeriod } from '../analysis/format.js';
import { describeSubQuestion } from '../analysis/sub-questions/describe.js';
import type { Brief } from './brief.js';
import { readablePart, requestWasCut } from './reading/read-request.js';
import type { Plan } from './plan.js';
import type { Prompt } from './prompts.js';
import type { RunningState, ThreadState } from './thread-state.js';
import { SourceError } from '../analysis/sources/data-source.js';
import { CatalogError } from '../analysis/catalog.js';
import { inSentence, listJoin as joinWords } from '../analysis/captions/grammar.js';

export function acknowledgement(brief: Brief, ds: DatasetConfig): string {
  const ack = requestAcknowledgement(brief, ds);
  return requestWasCut(brief.requestText) ? `${ack}\n${requestTooLong(brief.requestText)}` : ack;
}

/**
 * Said when a request is longer than intake reads: how long it is, how much was read and where
 * reading stopped, and that nothing is lost.
 */
export function requestTooLong(text: string): string {
  const read = readablePart(text);
  // The last few words read (at most 60 characters, on one line), so the requester sees where reading stopped.
  const tail = read.replace(/\s+/g, ' ').trimEnd().slice(-60);
  const lastWords = tail.length === 60 ? tail.replace(/^\S*\s/, '') : tail;
  const count = (n: number) => n.toLocaleString('en');
  return (
    `Your message is ${count(text.length)} characters long, more than I read in one request, so I read the first ${count(read.length)} characters, up to "…${lastWords}". ` +
    'Anything after that is not part of this request; the whole message is kept in the request log. If something further down matters, send it as a new, shorter request.'
  );
}

function requestAcknowledgement(brief: Brief, ds: DatasetConfig): string {
  const kinds = listJoin([...new Set(brief.questions.map((q) => q.kind))].map(kindNoun));
  const metrics = listJoin([...new Set(brief.questions.flatMap((q) => q.metrics))].map((m) => inSentence(metricLabel(ds, m))));
  const n = brief.questions.length;
  const what = n > 1 ? `${n} questions (${kinds})` : `a ${kinds || 'trend'} question`;
  return metrics ? `On it: ${what} about ${metrics}. One thing first, then a brief to agree.` : `On it: ${what}. One thing first, then a brief to agree.`;
}

function listJoin(xs: string[]): string {
  return xs.length <= 1 ? (xs[0] ?? '') : `${xs.slice(0, -1).join(', ')} and ${xs[xs.length - 1]}`;
}

export function promptText(p: Prompt): string {
  const options = p.options.map((o, i) => `${i + 1}. ${o.label}`).join('\n');
  return `${p.question}\n${options}\nRecommended: *${p.recommended.label}* (${p.recommended.reason}). Reply with a number, your own words, or "ok" for the recommendation.`;
}

export { describeSubQuestion };

export function planText(plan: Plan, ds: DatasetConfig, locale: string): string {
  const out: string[] = ['Here is the plan:'];
  let kind: string | undefined;
  plan.items.forEach((sq, i) => {
    if (sq.kind !== kind) {
      kind = sq.kind;
      out.push(`*${capitalise(kindNoun(sq.kind))}*`);
    }
    out.push(`${i + 1}. ${describeSubQuestion(sq, ds, locale)}`);
  });
  if (plan.readings.length) out.push(`How I read the dates: ${plan.readings.join('; ')}.`);
  if (plan.leftOut.length) out.push(`Left out to keep this focused: ${plan.leftOut.map((sq) => describeSubQuestion(sq, ds, locale).replace(/\.$/, '')).join('; ')}.`);
  if (plan.notCovered.length) out.push(`Not in this plan: ${plan.notCovered.map(kindNoun).join(', ')} questions, which this version cannot answer yet.`);
  out.push('Reply "go" to run it, or edit it: "drop 2", "weekly" (another grain), "use 2024" (another period), "add a breakdown by channel"; or "cancel".');
  return out.join('\n');
}

function capitalise(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}

/** The plan's one-click replies, for platforms with buttons. */
/** The plan's headings and numbered items only (no date readings or edit help): for the card and reruns. */
export function planLines(plan: Plan, ds: DatasetConfig, locale: string): string[] {
  return planText(plan, ds, locale)
    .split('\n')
    .filter((l) => /^\*[^*]+\*$|^\d+\. /.test(l));
}

export const PLAN_REPLIES = [
  { value: 'go', label: 'Go: run the plan', primary: true },
  { value: 'cancel', label: 'Cancel', primary: false },
];

/** Go and Cancel under the brief card. */
export const CARD_REPLIES = [
  { value: 'go', label: 'Go: run it', primary: true },
  { value: 'cancel', label: 'Cancel', primary: false },
];

/** The card's notes drawn from the brief: what was refused, cut or not recognised. */
export function cardNotes(brief: Brief, ds: DatasetConfig): string[] {
  const out: string[] = [];
  if (requestWasCut(brief.requestText)) out.push(requestTooLong(brief.requestText));
  out.push(...(brief.saidBack ?? []));
  const personal = brief.personalData ?? [];
  if (personal.length > 0) out.push(`${personalDataRefusal(ds, personal)} The rest of the request is answered without it.`);
  const unknown = brief.unknownTerms.filter((u) => u.role !== 'metric');
  for (const u of unknown) {
    // A breakdown the data does not have ("top 5 carriers"): said, with the breakdowns it has, never dropped for the whole.
    if (u.role === 'dimension') {
      const own = ds.dimensions.filter((d) => !d.personal_data).map((d) => inSentence(d.label));
      out.push(`There is no "${u.text}" in this dataset, so nothing is broken down or ranked by it. ${own.length > 0 ? `The breakdowns it has: ${joinWords(own)} (say "by ${own[0]}" to use one).` : 'It has no breakdowns.'}`);
      continue;
    }
    const near = u.closest.length > 0 ? ` The nearest I have: ${u.closest.slice(0, 3).join(', ')}.` : '';
    out.push(`I found nothing called "${u.text}" in this dataset, so the answers cover everything without it.${near} Name a value to narrow them ("only …").`);
  }
  return out;
}

/** The card's last line once agreed. */
export function cardAgreed(items: number): string {
  return `*Agreed:* running ${items} ${items === 1 ? 'answer' : 'answers'}.`;
}

/** One line confirming what a correction changed on the card (edited in place above). */
export function cardChanged(changes: string[], problems: string[]): string {
  const done = `Updated the brief above: ${changes.join('; ')}.`;
  return problems.length > 0 ? `${done} ${problems.join(' ')}` : done;
}

/** A correction that changed nothing: what was read, and how to say it. */
export function correctionNotRead(text: string, unread: string[], problems: string[]): string {
  if (problems.length > 0) return problems.join(' ');
  const words = unread.length > 0 ? ` I didn't recognise ${unread.map((u) => `"${u}"`).join(', ')}.` : '';
  return `I couldn't read "${text.length > 80 ? `${text.slice(0, 77)}...` : text}" as a change to the brief.${words} Say "go" to run it, or change anything in your own words: "for leadership", "weekly", "only 2024", "add channel", "drop 3", "cancel".`;
}

/** A follow-up after a run: what changed, and the plan it runs now. */
export function followUpRun(changes: string[], problems: string[], plan: string[]): string {
  const note = problems.length > 0 ? ` ${problems.join(' ')}` : '';
  return [`Running it again with ${changes.join('; ')}.${note}`, ...plan].join('\n');
}

export function planEditHelp(): string {
  return 'I didn\'t catch that. Reply "go" to run the plan, "drop 2" (or "drop 1 and 3") to remove items, a grain such as "weekly", a period such as "use 2024" or "since 2023-04", "add a breakdown by channel", or "cancel".';
}

export function catalogText(ds: DatasetConfig): string {
  const metrics = ds.metrics.map((m) => `- *${m.label}* (${m.name}): ${m.description ?? m.definition.type}`).join('\n');
  const dims = ds.dimensions.filter((d) => !d.personal_data).map((d) => d.label).join(', ');
  const groups = ds.comparison_groups.map((g) => `${g.label} (${g.members_label} vs ${g.others_label})`).join(', ');
  return `I can measure these in *${ds.label}*:\n${metrics}\nBroken down by: ${dims || 'nothing yet'}.${groups ? `\nGroups I can compare: ${groups}.` : ''}`;
}

export function cancelled(): string {
  return 'Cancelled. Nothing more will be posted in this thread; start a new request any time.';
}

function kindNoun(kind: string): string {
  return { trend: 'trend', growth: 'growth', performance: 'performance', kpi: 'KPI snapshot' }[kind] ?? kind;
}

export function metricLabel(ds: DatasetConfig, name: string): string {
  return ds.metrics.find((m) => m.name === name)?.label ?? name;
}

export function progress(done: number, total: number): string {
  return done >= total ? `All ${total} done.` : `Working: ${done} of ${total} done.`;
}

/** The progress message of a run taken up again (after a restart, or by another replica): a new message, the old one is left. */
export function progressResumed(done: number, total: number): string {
  return done >= total ? `All ${total} done.` : `Carrying on where the run stopped: ${done} of ${total} done.`;
}

/** An answer the chat platform would not take: the run goes on with the rest. */
export function answerNotPosted(position: number, err: unknown): string {
  return `Answer ${position} failed: it could not be posted here (${errorText(err)}); the rest continue.`;
}

/** The summary could not be written; the answers above stand. */
export function summaryFailed(err: unknown): string {
  return `*Summary*\nThe summary could not be written (${errorText(err)}); the answers above stand.`;
}

/** A run that stopped part-way on an error: it stays agreed and carries on when the bot restarts. */
export function runStopped(done: number, total: number, err: unknown): string {
  return `The run stopped after ${done} of ${total} answers: ${errorText(err)}. It carries on from there when the bot restarts; say "cancel" to stop it.`;
}

function errorText(err: unknown): string {
  return err instanceof Error ? err.message : String(err);
}

export function subQuestionFailed(position: number, err: unknown): string {
  return `${position}. I could not answer this one: ${problemText(err)} The other answers are not affected.`;
}

/** A rerun that could not start (the data could not be read again); the plan is kept. */
export function rerunFailed(err: unknown): string {
  return `I could not rerun the plan: ${problemText(err)} The plan is kept as it was.`;
}

/** The run's data-quality check could not run: the answers come without its caveats. */
export function qualityCheckFailed(err: unknown): string {
  return `The data-quality check could not run (${problemText(err)}), so the answers below carry no notes on missing values, repeated keys or freshness.`;
}

/** The run's data-quality check failed for resources and ran again with a smaller plan. */
export function qualityCheckSmaller(failure: string, change: string): string {
  return `The data-quality check ${failure}, so it ran again with ${change}; the notes on the answers below come from that smaller check.`;
}

function problemText(err: unknown): string {
  return err instanceof SourceError
    ? {
        timeout: `${err.message}. Try a shorter period, or say "rerun" later.`,
        unreachable: `the dataset could not be reached (${err.message}). Say "rerun" once it is back.`,
        missing_table: `${err.message}. The dataset may have changed since the plan was made; say "rerun" once the table is back.`,
        dataset_changed: `${err.message}. Once the config and the table agree again (threadcount check --config FILE lists what is missing), say "rerun".`,
        query_failed: `${err.message}.`,
      }[err.code]
    : err instanceof CatalogError
      ? `${err.message}.`
      : `an unexpected error (${err instanceof Error ? err.message : String(err)}).`;
}

/** A follow-up sent during a run, kept for its end. */
export function heldFollowUp(text: string, state: RunningState): string {
  return `Noted: I'll take up "${clip(text.trim().replace(/\s+/g, ' '), 80)}" when this run finishes (${state.run.posted.length} of ${state.plan.items.length} done). Say "cancel" to stop the run instead.`;
}

/** The run finished: the follow-up it held is taken up now. */
export function takingUpHeld(text: string): string {
  return `Now taking up what you asked during the run: "${clip(text.trim().replace(/\s+/g, ' '), 80)}".`;
}

export function stillRunning(state: RunningState): string {
  return `Still working on it (${state.run.posted.length} of ${state.plan.items.length} done); answers will appear here. Say "cancel" to stop.`;
}

export function finished(): string {
  return 'This request is finished. Say "rerun" to run the same plan on fresh data, or post a new message in the channel to start another.';
}

export function emptyPlan(): string {
  return 'The plan is empty, so there is nothing to run. Say "cancel", or start a new request with a metric I can measure.';
}

export function reminder(state: ThreadState): string {
  const what = state.stage === 'planning' ? 'the plan above (reply "go" to run it)' : 'the question above';
  return `A reminder: I'm waiting on ${what}. Reply "cancel" if this is no longer needed.`;
}

export function deadlineNear(deadline: string, locale: string): string {
  return `Your deadline (${formatPeriod(deadline, 'day', locale, 'long')}) is close and the plan is not agreed yet. Reply "ok" to the question above, or "go" on the plan, to get the answers in time.`;
}

export function helpText(): string {
  return [
    'Ask me a data question in plain words, e.g. "How has revenue moved over time?" or "Did this summer beat last summer, and which routes drove it?"',
    'I ask what I need to know (who it is for, by when, which metric, what grain), propose a plan to agree, then post each answer with its chart, table and SQL.',
    'Commands: *help*; *what can you measure*; *status* (your requests); *cancel* (this request); *rerun* (the same plan on fresh data).',
  ].join('\n');
}

export function statusText(states: ThreadState[], locale: string): string {
  if (states.length === 0) return 'You have no requests with me yet.';
  const stage: Record<ThreadState['stage'], string> = {
    clarifying: 'waiting for your answer',
    planning: 'waiting for you to agree the plan',
    running: 'running',
    done: 'done',
    cancelled: 'cancelled',
  };
  const lines = states.slice(-10).map((s) => {
    const done = s.stage === 'running' ? ` (${s.run.posted.length} of ${s.plan.items.length})` : '';
    const due = s.brief.deadline && s.brief.deadline !== 'none' ? `, due ${formatPeriod(s.brief.deadline, 'day', locale)}` : '';
    return `- "${clip(s.brief.requestText, 70)}": ${stage[s.stage]}${done}${due}`;
  });
  return `Your requests:\n${lines.join('\n')}`;
}

/** A channel the config's access rules give no dataset: nothing runs. */
export function noDatasetForChannel(): string {
  return 'This channel has no dataset it may use; ask your data team to add it in the config.';
}

/** A thread whose dataset this channel may no longer use (the access rules changed). */
export function datasetNotAllowed(label: string): string {
  return `This request uses ${label}, which this channel may no longer use; nothing more will run here. Ask your data team if that is a mistake.`;
}

/** A dataset chosen from the prompt that the channel may no longer use (the rules changed while it waited). */
export function datasetNoLongerOffered(label: string): string {
  return `This channel may no longer use ${label}. Choose another from the list above, or ask your data team.`;
}

/** A thread whose dataset is no longer in the config. */
export function datasetGone(name: string): string {
  return `This request used the dataset "${name}", which is no longer configured; nothing more will run here. Start a new request.`;
}

export function datasetChosen(label: string, why?: string): string {
  return why ? `Using ${label}: ${why}.` : `Using ${label}.`;
}

export function nothingToCancel(): string {
  return 'There is no open request in this thread to cancel.';
}

export function nothingToRerun(): string {
  return 'Only a finished or cancelled request can be rerun; this thread has none.';
}

function clip(s: string, n: number): string {
  return s.length > n ? `${s.slice(0, n - 3)}...` : s;
}

// ---- scheduled reruns (bot/reading/schedule.ts reads them, bot/rerun-schedule.ts keeps them) ----

/** A due time said in the schedule's own zone: "Mon 7 Dec 2026, 09:00". */
function dueInWords(iso: string, timeZone: string): string {
  const f = new Intl.DateTimeFormat('en-GB', { weekday: 'short', day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', hourCycle: 'h23', timeZone });
  return f.format(new Date(iso)).replace(/^(\w+),/, '$1').replace(/ at /, ', ');
}

export function scheduleSet(s: { words: string; timeZone: string; nextDue: string }, assumed: string[], zoneFromConfig: boolean): string {
  const zone = zoneFromConfig ? `time zone ${s.timeZone}, the dataset's configured one` : 'time zone UTC, as none is configured';
  const read = [zone, ...assumed].join('; ');
  return `I will rerun this ${s.words} ${s.timeZone} on fresh data and post the answers in this thread; the first is due ${dueInWords(s.nextDue, s.timeZone)}. Say "stop the schedule" to end it.\n_Assumed: ${read}._`;
}

export function scheduleTold(s: { words: string; timeZone: string; nextDue: string } | undefined): string {
  if (!s) return 'This thread has no schedule. Say when to rerun it, e.g. "every Monday at 9".';
  return `This thread reruns ${s.words} ${s.timeZone}; the next is due ${dueInWords(s.nextDue, s.timeZone)}. Say "stop the schedule" to end it.`;
}

export function scheduleStopped(s: { words: string; timeZone: string } | undefined): string {
  if (!s) return 'This thread has no schedule to stop.';
  return `Stopped: this thread no longer reruns ${s.words} ${s.timeZone}. Say "rerun" to run it once more now.`;
}

export function scheduledRerun(s: { words: string; timeZone: string }): string {
  return `Scheduled rerun (${s.words} ${s.timeZone}) on fresh data. Say "stop the schedule" to end the schedule.`;
}

/** What kind of personal value a piece of a request is, as the reader found it (bot/reading). */
export function personalValueKind(value: string): 'an email address' | 'a phone number' | 'an id of a person' {
  if (value.includes('@')) return 'an email address';
  return /^[\d\s()+.-]+$/.test(value) ? 'a phone number' : 'an id of a person';
}

/** A filter on a value that picks out one person is refused; the value itself is not repeated. */
export function personalValueRefused(values: readonly string[]): string {
  const kinds = [...new Set(values.map(personalValueKind))];
  return `I can't filter on ${joinWords(kinds, 'or')}: that would pick out one person, and personal data is never filtered on or shown in any answer. I'll answer for everyone instead.`;
}
