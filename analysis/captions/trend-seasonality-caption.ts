// Title and caption for the seasonal pattern (monthly indices and weekdays), from findings only.
import type { Metric } from '../../config/schema.js';
import type { CalendarMonthPattern, TrendSeasonalityFinding, TrendWeekdayFinding } from '../findings/segments.js';
import { formatPeriod } from '../format.js';
import type { Audience, Finding } from '../types.js';
import type { Words } from './trend-test-caption.js';
import { formatIndex, formatRelativeSize, grainNoun, lowerLabel, monthName, monthPair, weekdayName } from './trend-words.js';

export function seasonalityWords(metric: Metric, additive: boolean, findings: readonly Finding[], audience: Audience, locale: string): Words {
  const s = findings.find((f): f is TrendSeasonalityFinding => f.type === 'trend_seasonality' && f.metric === metric.name);
  const w = findings.find((f): f is TrendWeekdayFinding => f.type === 'trend_weekday' && f.metric === metric.name);
  const weekday = w ? weekdaySentence(w, additive, audience, locale) : '';
  if (!s) {
    const series = findings.find((f): f is Extract<Finding, { type: 'series' }> => f.type === 'series' && f.metric === metric.name);
    const months = series ? series.points.filter((p) => !p.partial && p.value !== null).length : 0;
    return {
      title: `${metric.label}: too little history to measure seasonality`,
      caption: `Seasonality needs at least two full years of monthly data; this period has ${months} complete ${grainNoun('month', months)}.${weekday ? ` ${weekday}` : ''}`,
    };
  }
  const byMonth = (m: number) => s.months[m - 1]!;
  const [b0, b1] = s.busiest;
  const [q0, q1] = s.quietest;
  const years = s.fullYears.length;
  const together = Math.min(byMonth(b0).topTwoIn, byMonth(b1).topTwoIn);
  const held = years > 0 ? ` (top two in ${together} of ${years} full ${years === 1 ? 'year' : 'years'})` : '';
  const title = additive
    ? `${monthPair(b0, b1, locale)} are the busiest months${held}`
    : `${metric.label} is highest in ${monthPair(b0, b1, locale)}${held}`;

  const name = (m: number) => monthName(m, locale);
  const rel = (m: CalendarMonthPattern) => formatRelativeSize(m.index - 1, locale);
  const noun = lowerLabel(metric.label);
  let caption: string;
  if (audience === 'analysts') {
    const idx = (m: number) => {
      const p = byMonth(m);
      const range = p.min !== null && p.max !== null && s.rangeFromYear !== null ? `, range ${formatIndex(p.min, locale)}–${formatIndex(p.max, locale)}` : '';
      return `${name(m)} ${formatIndex(p.index, locale)}${range}`;
    };
    const rangeYears = s.rangeFromYear !== null && s.rangeToYear !== null ? ` (ranges over ${s.rangeFromYear}–${s.rangeToYear})` : '';
    const counts = years > 0 ? ` Top-two and bottom-two counts are by raw monthly value over the full calendar years ${s.fullYears.join(', ')}: ${name(q0)} and ${name(q1)} were in the bottom two in ${Math.min(byMonth(q0).bottomTwoIn, byMonth(q1).bottomTwoIn)} of ${years}.` : '';
    caption = `Classical multiplicative decomposition (2×12 centred moving average) of ${formatPeriod(s.firstPeriod, 'month', locale, 'long')} to ${formatPeriod(s.lastPeriod, 'month', locale, 'long')}${rangeYears}: ${idx(b0)}; ${idx(b1)}; ${idx(q0)}; ${idx(q1)}.${counts}`;
  } else if (audience === 'managers') {
    caption = `${name(b0)} (index ${formatIndex(byMonth(b0).index, locale)}) and ${name(b1)} (${formatIndex(byMonth(b1).index, locale)}) run about ${rel(byMonth(b0))} and ${rel(byMonth(b1))} above an average month; ${name(q0)} (${formatIndex(byMonth(q0).index, locale)}) and ${name(q1)} (${formatIndex(byMonth(q1).index, locale)}) are the ${additive ? 'quietest' : 'lowest'}, about ${rel(byMonth(q0))} and ${rel(byMonth(q1))} below.`;
  } else {
    const band = (a: number, b: number) => {
      const [x, y] = [Math.abs(byMonth(a).index - 1), Math.abs(byMonth(b).index - 1)].sort((u, v) => u - v);
      const lo = formatRelativeSize(x!, locale);
      const hi = formatRelativeSize(y!, locale);
      return lo === hi ? hi : `${lo.replace(/\s*%/, '')}–${hi}`;
    };
    caption = `${monthPair(b0, b1, locale)} are about ${band(b0, b1)} above an average month for ${noun}; ${monthPair(q0, q1, locale)} about ${band(q0, q1)} below.`;
  }
  return { title, caption: weekday ? `${caption} ${weekday}` : caption };
}

function weekdaySentence(w: TrendWeekdayFinding, additive: boolean, audience: Audience, locale: string): string {
  const days = w.days.filter((d): d is typeof d & { index: number } => d.index !== null);
  if (days.length < 2) return '';
  let hi = days[0]!;
  let lo = days[0]!;
  for (const d of days) {
    if (d.index > hi.index) hi = d;
    if (d.index < lo.index) lo = d;
  }
  if (hi.index === lo.index) return '';
  const day = (n: number) => weekdayName(n, locale);
  const basis = additive ? 'an average day' : 'the average weekday';
  if (audience === 'analysts') {
    const list = w.days.map((d) => `${day(d.isoDay).slice(0, 3)} ${formatIndex(d.index, locale)}`).join(', ');
    return `Weekday indices (${additive ? 'per-day level' : 'level'} against the mean of the seven): ${list}.`;
  }
  return `By day of week, ${day(hi.isoDay)} is the ${additive ? 'busiest' : 'highest'} (about ${formatRelativeSize(hi.index - 1, locale)} above ${basis}) and ${day(lo.isoDay)} the ${additive ? 'quietest' : 'lowest'} (about ${formatRelativeSize(lo.index - 1, locale)} below).`;
}
