// Title and caption for a growth_series answer, written only from its findings: the complete
// years' growth, the latest year so far against the same dates a year earlier, compound growth,
// and the latest complete period against a year earlier.
import { labelAtStart, verbFor } from './grammar.js';
import type { Metric } from '../../config/schema.js';
import type {
  GrowthCagrFinding,
  GrowthLevelRateFinding,
  GrowthPoint,
  GrowthSeriesFinding,
  GrowthYearsFinding,
  GrowthYtdFinding,
} from '../findings/growth.js';
import { metricDirection } from '../catalog.js';
import { formatChange, formatDayOfYear, formatPeriod } from '../format.js';
import { levelGrowthVerdict, levelGrowthWords } from './growth-level-caption.js';
import type { Verdict, VerdictDirection } from './verdict-words.js';
import type { Audience, Finding, Grain } from '../types.js';
import { capitalise, directionOf, growthInUnits, lower, movedBy, periodText, unsignedPercent, valueText, yearText } from './growth-words.js';

export interface GrowthWords {
  title: string;
  caption: string;
}

export interface GrowthSeriesFindings {
  series?: GrowthSeriesFinding;
  years?: GrowthYearsFinding;
  ytd?: GrowthYtdFinding;
  cagr?: GrowthCagrFinding;
  level?: GrowthLevelRateFinding;
}

export function pickGrowthSeriesFindings(findings: Finding[], metric: string): GrowthSeriesFindings {
  const out: GrowthSeriesFindings = {};
  for (const f of findings) {
    if (!('metric' in f) || f.metric !== metric) continue;
    if (f.type === 'growth_series') out.series = f;
    else if (f.type === 'growth_years') out.years = f;
    else if (f.type === 'growth_ytd') out.ytd = f;
    else if (f.type === 'growth_cagr') out.cagr = f;
    else if (f.type === 'growth_level_rate') out.level = f;
  }
  return out;
}

/** The latest period that is not partial and has a value, with its rates. */
export function latestComplete(series: GrowthSeriesFinding | undefined): GrowthPoint | null {
  if (!series) return null;
  for (let i = series.points.length - 1; i >= 0; i--) {
    const p = series.points[i]!;
    if (!p.partial && p.value !== null) return p;
  }
  return null;
}

export function growthSeriesWords(metric: Metric, grain: Grain, f: GrowthSeriesFindings, locale: string, audience: Audience): GrowthWords {
  // A level (a reading) changes in its own units; a compound percentage would misstate it.
  if (growthInUnits(metric, f.series)) return levelGrowthWords(metric, grain, f, locale, audience);
  const label = labelAtStart(metric.label);
  const yearsWithRate = (f.years?.years ?? []).filter((y) => y.yoy !== null);
  const recent = yearsWithRate.slice(-2);
  const ytd = f.ytd && f.ytd.relative !== null ? f.ytd : undefined;
  const latest = latestComplete(f.series);

  const headline: string[] = recent.map((y, i) => `${i > 0 ? 'then ' : ''}${movedBy(y.yoy, locale)} in ${yearText(y.year, locale)}`);
  let title: string;
  if (headline.length > 0) {
    title = `${label} ${headline.join(', ')}`;
    if (ytd) title += `; ${yearText(ytd.current.year, locale)} so far: ${formatChange(ytd.relative, locale)}`;
  } else if (ytd) {
    title = `${label} so far in ${yearText(ytd.current.year, locale)}: ${formatChange(ytd.relative, locale)} on the same dates of ${yearText(ytd.prior.year, locale)}`;
  } else if (latest && latest.yoy !== null) {
    title = `${label} in ${periodText(latest.period, grain, locale, 'long')}: ${formatChange(latest.yoy, locale)} on a year earlier`;
  } else if (latest && latest.pop !== null) {
    title = `${label} in ${periodText(latest.period, grain, locale, 'long')}: ${formatChange(latest.pop, locale)} on the ${grain} before`;
  } else {
    return {
      title: `${label}: not enough complete periods to measure growth`,
      caption: `There are not two comparable complete periods of ${lower(label)} in this window, so no growth rate can be given.`,
    };
  }

  const sentences: string[] = [];
  const fmt = (v: number | null, signed = false) => valueText(v, metric, locale, signed);
  if (audience === 'analysts') {
    if (yearsWithRate.length > 0) {
      const all = f.years!.years;
      const list = yearsWithRate.map((y) => {
        const prev = all[all.indexOf(y) - 1];
        return `${yearText(y.year, locale)} ${formatChange(y.yoy, locale)} (${fmt(y.value)} vs ${fmt(prev?.value ?? null)})`;
      });
      sentences.push(`Year over year, complete years: ${list.join('; ')}.`);
    }
    if (f.ytd) sentences.push(ytdSentenceAnalyst(f.ytd, metric, locale));
    if (f.cagr) {
      sentences.push(
        `CAGR ${yearText(f.cagr.from.year, locale)}–${yearText(f.cagr.to.year, locale)}: ${formatChange(f.cagr.rate, locale)} a year ((${fmt(f.cagr.to.value)} / ${fmt(f.cagr.from.value)})^(1/${f.cagr.years}) − 1).`,
      );
    }
    if (latest) sentences.push(latestSentence(latest, f.series!, grain, locale, true));
  } else {
    if (ytd) {
      sentences.push(
        `Year to date (to ${formatPeriod(ytd.through, 'day', locale, 'long')}), ${lower(label)} ${ytdMove(ytd, locale)} the same dates of ${yearText(ytd.prior.year, locale)}${audience === 'managers' ? ` (${fmt(ytd.current.value)} against ${fmt(ytd.prior.value)})` : ''}.`,
      );
    }
    if (audience === 'managers') {
      if (recent.length > 0) {
        sentences.push(
          recent
            .map((y) => `${yearText(y.year, locale)}: ${fmt(y.value)}, ${formatChange(y.yoy, locale)} on the year before`)
            .join('; ') + '.',
        );
      }
      if (f.cagr && f.cagr.rate !== null) {
        sentences.push(
          `Averaged over ${yearText(f.cagr.from.year, locale)} to ${yearText(f.cagr.to.year, locale)}, it ${compoundMove(f.cagr.rate, locale)} a year (compound).`,
        );
      }
      if (latest) sentences.push(latestSentence(latest, f.series!, grain, locale, false));
    }
    if (sentences.length === 0 && latest) sentences.push(latestSentence(latest, f.series!, grain, locale, false));
  }
  return { title, caption: sentences.join(' ') || `${title}.` };
}

function compoundMove(rate: number, locale: string): string {
  const dir = directionOf(rate);
  if (dir === 'up') return `grew ${unsignedPercent(rate, locale)}`;
  if (dir === 'down') return `shrank ${unsignedPercent(rate, locale)}`;
  return `was about flat (${formatChange(rate, locale)})`;
}

function ytdMove(ytd: GrowthYtdFinding, locale: string): string {
  const dir = directionOf(ytd.relative);
  if (dir === 'up') return `ran ${unsignedPercent(ytd.relative!, locale)} above`;
  if (dir === 'down') return `ran ${unsignedPercent(ytd.relative!, locale)} below`;
  if (dir === 'flat') return `held level with`;
  return 'cannot be compared with';
}

function ytdSentenceAnalyst(ytd: GrowthYtdFinding, metric: Metric, locale: string): string {
  const through = formatPeriod(ytd.through, 'day', locale);
  return `Year to date through ${through}: ${valueText(ytd.current.value, metric, locale)} vs ${valueText(ytd.prior.value, metric, locale)} for the same dates of ${yearText(ytd.prior.year, locale)} (${formatChange(ytd.relative, locale)}).`;
}

function latestSentence(p: GrowthPoint, series: GrowthSeriesFinding, grain: Grain, locale: string, analyst: boolean): string {
  const when = periodText(p.period, grain, locale, 'long');
  const parts: string[] = [];
  if (p.yoy !== null) parts.push(`${formatChange(p.yoy, locale)} on a year earlier`);
  if (p.pop !== null) parts.push(`${formatChange(p.pop, locale)} on the ${grain} before`);
  if (p.trailing !== null && series.trailingWindow !== null) {
    parts.push(
      analyst
        ? `trailing-${series.trailingWindow} sum ${formatChange(p.trailing, locale)} on the prior trailing-${series.trailingWindow}`
        : `the last ${series.trailingWindow} ${grain}s together ${formatChange(p.trailing, locale)} on the ${series.trailingWindow} before`,
    );
  }
  if (parts.length === 0) return `${capitalise(when)} is the latest complete ${grain}; it has no comparable base.`;
  return `Latest complete ${grain}, ${when}: ${parts.join('; ')}.`;
}

/**
 * The verdict on a year earlier: the year so far against the same dates a year before when the
 * last year is unfinished, else the latest complete year against the one before; null without either.
 */
export function growthVerdict(metric: Metric, f: GrowthSeriesFindings, locale: string): Verdict | null {
  const label = lower(metric.label);
  if (growthInUnits(metric, f.series)) return levelGrowthVerdict(metric, f, locale);
  const ytd = f.ytd && f.ytd.relative !== null ? f.ytd : undefined;
  if (ytd) {
    const span = `${formatDayOfYear(ytd.current.year, locale, 'month')} to ${formatDayOfYear(ytd.through, locale)}`;
    const direction = verdictDirection(ytd.relative!);
    const where =
      direction === 'level'
        ? `level with last year so far (${formatChange(ytd.relative, locale)}, ${span})`
        : `${unsignedPercent(ytd.relative!, locale)} ${direction === 'up' ? 'above' : 'below'} last year so far (${span})`;
    return { direction, higherIsBetter: metricDirection(metric), statement: `${label} ${verbFor(label)} ${where}` };
  }
  const year = (f.years?.years ?? []).filter((y) => y.yoy !== null).at(-1);
  if (year) {
    const direction = verdictDirection(year.yoy!);
    const prior = yearText(`${Number(year.year.slice(0, 4)) - 1}-01-01`, locale);
    const where =
      direction === 'level'
        ? `level with ${prior} (${formatChange(year.yoy, locale)})`
        : `${unsignedPercent(year.yoy!, locale)} ${direction === 'up' ? 'above' : 'below'} ${prior}`;
    return { direction, higherIsBetter: metricDirection(metric), statement: `${label} in ${yearText(year.year, locale)} ${verbFor(label, 'was')} ${where}` };
  }
  return null;
}

export function verdictDirection(relative: number): VerdictDirection {
  const d = directionOf(relative);
  return d === 'up' || d === 'down' ? d : 'level';
}
