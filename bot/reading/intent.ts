// Which kind of question a clause asks, from scored cues that keep their evidence, in this order
// (the most specific wins): a group or a launch set against the rest (performance); a snapshot of
// one period (kpi: "where does X stand", "how did April go", "what was X last month", or a measure
// over one recent period with no word of change); a change between periods (growth); otherwise a
// pattern over time, a ranking or a share (trend). docs/reading.md gives the rules.
import type { DateWindow, RequestKind } from '../../analysis/types.js';
import { KIND_CUES } from './lexicon.js';

export interface IntentFeatures {
  /** The clause names a comparison group of the catalog. */
  namesGroup: boolean;
  /** The clause breaks down by the column that marks a group's members ("by pass holder"). */
  splitsByGroup?: boolean;
  /** A launch or start date is stated, or the text refers to a launch. */
  refersToLaunch: boolean;
  /** The clause compares its period with another. */
  comparesPeriods: boolean;
  /** Two values of one breakdown set against each other. */
  contrastsValues: boolean;
  /** The clause's own period, if it names one: how many mentions, and whether it is relative ("last month"). */
  window?: DateWindow;
  windowRelative?: boolean;
  /** The clause names a measure (a metric, or a business word for one). */
  namesMeasure: boolean;
  /** The period is one named stretch ("2024", "Q3", "last month", "the last 7 days"), not a run of several ("the last 2 years", "2022 to 2024"). */
  windowSingle?: boolean;
  /** The clause asks for a grain ("by month", "weekly"): a pattern over time. */
  asksGrain: boolean;
}

export interface IntentReading {
  kind: RequestKind | null;
  /** The words that decided it. */
  words: string;
  scores: Record<RequestKind, number>;
}

// A snapshot phrase around one period: "what was revenue in March", "how many tickets yesterday".
// "whats" is "what's" typed without its apostrophe.
const ASKS_AMOUNT = /\b(?:what(?:'s|s|\s+is|\s+are|\s+was|\s+were)|how\s+many|how\s+much|how\s+(?:quiet|busy|good|bad|strong|weak)\s+(?:was|were|is|are)|give\s+me|tell\s+me)\b/;
// "How did April go", "how was last week": one period, in the past tense.
const HOW_DID_IT_GO = /\bhow\s+(?:did|was|were)\b.{0,60}\b(?:go|do|look|turn\s+out|land|perform|end\s+up|shape\s+up)\b|\bhow\s+(?:was|were)\s+(?:last|this|the|our|yesterday|[a-z]+day)\b|\bhow(?:'s|s|'re|\s+is|\s+are)\b.{0,50}\b(?:doing|going|looking|performing)\b/;
// "how many users do we have": how things stand now.
const HOW_MANY_NOW = /\bhow\s+(?:many|much)\b.{0,60}\b(?:do\s+we\s+have|have\s+we\s+got|are\s+there|is\s+there)\b/;
// Whether something worked: "did X work", "is it working", "a success", "made a difference", "moved the needle", "any good".
const WORKED = /\b(?:work(?:s|ed|ing)?|succe(?:ss|ssful|eded|ed|eds)|(?:make|made|making|makes)\s+(?:a|any|much\s+of\s+a|the)?\s*difference|mov(?:e|ed|ing)\s+the\s+needle|any\s+good|do(?:ne)?\s+anything|deliver(?:s|ed|ing)?|result(?:s|ed)?|outcomes?|lift|uplift)\b/;
const CHANGE = /\b(?:trend\w*|over\s+time|mov\w*|evolv\w*|chang\w*|gr[eo]w\w*|declin\w*|increas\w*|decreas\w*|improv\w*|worsen\w*)\b/;
const CHANGE_OR_PATTERN = /\b(?:trend\w*|over\s+time|pattern\w*|season\w*|month\s+by\s+month|week\s+by\s+week|quarter\s+by\s+quarter|year\s+by\s+year|mov\w*|evolv\w*|chang\w*|gr[eo]w\w*|declin\w*|increas\w*|decreas\w*|improv\w*|worsen\w*|been\s+going|been\s+doing|compar\w*|over\s+the)\b/;

const TRENDING_DIRECTION = /\btrend(?:ing|ed|s)?\s+(?:up|down|upwards?|downwards?|higher|lower)\b|\b(?:an?|the)\s+(?:upward|downward|rising|falling)\s+trend\b/;

export function readIntent(clause: string, f: IntentFeatures): IntentReading {
  const t = clause.toLowerCase().replace(/\b(?:growth|sales|finance|marketing|product|ops|support)\s+(?:team|meeting|review|leads?)\b/g, ' ');
  const scores: Record<RequestKind, number> = { performance: 0, kpi: 0, growth: 0, trend: 0 };
  const words: Record<RequestKind, string[]> = { performance: [], kpi: [], growth: [], trend: [] };
  for (const kind of Object.keys(KIND_CUES) as RequestKind[]) {
    for (const cue of KIND_CUES[kind]) {
      const m = cue.exec(t);
      if (m) {
        scores[kind] += 1;
        words[kind].push(m[0]);
      }
    }
  }
  if (f.comparesPeriods) {
    scores.growth += 1;
    words.growth.push('two periods compared');
  }
  const choose = (kind: RequestKind, why: string[]): IntentReading => ({ kind, words: why.join(', '), scores });
  // A group or a launch makes a comparison, a cause or an effect a performance question; so does
  // asking whether it worked, in any register ("did Early Bake work?", "was the pass a success").
  const causal = /\b(?:than|vs\.?|versus|compar\w*|against|differ\w*|more|less|fewer|higher|lower|better|worse|rest|others|everyone|non-?\w+|affect\w*|effect\w*|impact\w*|hurt|help\w*|boost\w*|speed\w*\s+up|slow\w*\s+down|change[sd]?\b|worth|pay\w*\s+off|go\s+(?:up|down)|went\s+(?:up|down)|before\s+and\s+after)\b/.test(t) || WORKED.test(t);
  if ((scores.performance > 0 || causal || f.splitsByGroup === true) && (f.namesGroup || f.refersToLaunch)) return choose('performance', words.performance.length ? words.performance : ['a group or a launch set against the rest']);
  const span = f.window ? (Date.parse(f.window.end) - Date.parse(f.window.start)) / 86_400_000 : 0;
  const onePeriod = f.window !== undefined && (f.windowSingle === true || span <= 93);
  if (scores.kpi > 0 && !(f.window && span > 400 && !f.windowSingle)) return choose('kpi', words.kpi);
  if (onePeriod && HOW_DID_IT_GO.exec(t)) return choose('kpi', [HOW_DID_IT_GO.exec(t)![0]]);
  if (HOW_MANY_NOW.test(t) && !f.comparesPeriods) return choose('kpi', ['how many now']);
  if (onePeriod && ASKS_AMOUNT.test(t) && !f.comparesPeriods && !CHANGE.test(t) && !f.asksGrain) return choose('kpi', ['an amount in one period']);
  // A measure over one recent period, with no word of change or pattern: where it stands.
  if (f.window && f.windowRelative && span <= 370 && f.namesMeasure && !f.comparesPeriods && !f.asksGrain && !CHANGE_OR_PATTERN.test(t) && scores.growth === 0) return choose('kpi', ['one recent period']);
  // "is X trending up?", "trending down since 2015": whether there is a trend, and its direction, over the
  // window: the trend test, not a change between two periods.
  const trending = TRENDING_DIRECTION.exec(t);
  if (trending && !f.comparesPeriods) return choose('trend', [trending[0]]);
  if (scores.growth > 0) return choose('growth', words.growth);
  if (scores.trend > 0) return choose('trend', words.trend);
  return { kind: null, words: '', scores };
}
