// Which kind of question a clause asks, from scored cues that keep their evidence: a group set
// against the rest (performance), a snapshot of one period (kpi), a change between periods
// (growth), or a pattern over time, a ranking or a share (trend). The most specific kind with a
// cue wins, in that order; a clause with no cue is a trend question.
import type { RequestKind } from '../../analysis/types.js';
import type { DateWindow } from '../../analysis/types.js';
import { KIND_CUES } from './lexicon.js';

export interface IntentFeatures {
  /** The clause names a comparison group of the catalog. */
  namesGroup: boolean;
  /** A launch or start date is stated, or the text refers to a launch. */
  refersToLaunch: boolean;
  /** The clause compares its period with another. */
  comparesPeriods: boolean;
  /** Two values of one breakdown set against each other. */
  contrastsValues: boolean;
  /** The clause's own period, when it names one, and the anchor ("today"). */
  window?: DateWindow;
  windowUnit?: string;
  anchor: string;
}

export interface IntentReading {
  kind: RequestKind | null;
  /** The words that decided it. */
  words: string;
  scores: Record<RequestKind, number>;
}

export function readIntent(clause: string, f: IntentFeatures): IntentReading {
  const t = clause.toLowerCase();
  const scores: Record<RequestKind, number> = { performance: 0, kpi: 0, growth: 0, trend: 0 };
  const words: Record<RequestKind, string[]> = { performance: [], kpi: [], growth: [], trend: [] };
  for (const kind of Object.keys(KIND_CUES) as RequestKind[]) {
    const cues = KIND_CUES[kind];
    for (const [i, cue] of cues.entries()) {
      const m = cue.exec(t);
      if (m) {
        // "change", "compare", "vs" alone lean to growth less than "grew" or "beat" do.
        scores[kind] += kind === 'growth' && i === cues.length - 1 ? 0.5 : 1;
        words[kind].push(m[0]);
      }
    }
  }
  if (f.comparesPeriods) {
    scores.growth += 1;
    words.growth.push('two periods compared');
  }
  if (f.contrastsValues) {
    scores.growth += 0.5;
  }
  const snapshot = f.window && isRecentSinglePeriod(f.window, f.windowUnit, f.anchor);
  // A group or a launch makes a comparison or an effect cue a performance question.
  const performance = scores.performance > 0 && (f.namesGroup || f.refersToLaunch);
  const groupCompared = f.namesGroup && /\b(?:than|vs\.?|versus|compared|against|differ\w*|more|less|fewer|higher|lower|better|worse|rest|others|everyone|non-?\w+)\b/.test(t);
  const choose = (kind: RequestKind, why: string[]): IntentReading => ({ kind, words: why.join(', '), scores });
  if (performance || groupCompared) return choose('performance', words.performance.length ? words.performance : ['a group set against the rest']);
  if (scores.kpi > 0) return choose('kpi', words.kpi);
  // A ranking or share in one recent period is a snapshot ("top 5 routes last month").
  if (snapshot && scores.growth === 0 && !/\btrend\w*|\bover time\b|\bseason\w*|\bmonth by month\b|\bpattern/.test(t)) return choose('kpi', [`one recent period`]);
  if (scores.growth > 0 && !(scores.trend > scores.growth && !f.comparesPeriods)) return choose('growth', words.growth);
  if (scores.trend > 0) return choose('trend', words.trend);
  if (scores.growth > 0) return choose('growth', words.growth);
  return { kind: null, words: '', scores };
}

/** One period of at most a quarter that holds the anchor or ends just before it. */
function isRecentSinglePeriod(w: DateWindow, unit: string | undefined, anchor: string): boolean {
  if (!unit || !['day', 'week', 'month', 'quarter'].includes(unit)) return false;
  const days = (Date.parse(anchor) - Date.parse(w.end)) / 86_400_000;
  return w.start < anchor ? days <= 0 || days < 95 : false;
}
