// Segment answers on two open datasets the project was not built on (vega-datasets): US flights
// of Q1 2001 (flights-20k.json, 20,000 flights with their delay in minutes) and FAA wildlife strikes
// 1990–2002 (birdstrikes.csv, 10,000 reports). Each is loaded into an in-memory DuckDB with a config
// written here; every number the answers are checked against is computed in this file from the raw
// file with plain JavaScript, never through DuckDB or the project's code.
import { readFileSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../../analysis/answer-sub-question.js';
import type { SegmentSharesFinding, SegmentTrendFinding } from '../../../analysis/findings/segments.js';
import { caveatNote } from '../../../analysis/captions/caveat-text.js';
import { answerCaveats } from '../../../analysis/quality/thread-notes.js';
import { screenSeries } from '../../../analysis/quality/series-outliers.js';
import { SUB_QUESTIONS, type TemplateName } from '../../../analysis/sub-questions/registry.js';
import type { SubQuestion } from '../../../analysis/types.js';
import { FLIGHTS_JSON, STRIKES_CSV, flightsWorkspace, strikesWorkspace } from './open-data-tables.js';

interface Flight {
  date: string;
  delay: number;
  origin: string;
}
const flights: Flight[] = JSON.parse(readFileSync(FLIGHTS_JSON, 'utf8'));
// The file has no quoted fields (checked: no '"' in it), so a plain split reads it.
const strikeLines = readFileSync(STRIKES_CSV, 'utf8').trim().split('\n');
const strikeHeader = strikeLines[0]!.split(',');
const strikes = strikeLines.slice(1).map((l) => {
  const cells = l.split(',');
  return { airport: cells[strikeHeader.indexOf('Airport Name')]!, date: cells[strikeHeader.indexOf('Flight Date')]!, cost: Number(cells[strikeHeader.indexOf('Cost Total $')]) };
});

function countBy<T>(rows: readonly T[], key: (r: T) => string): Map<string, number> {
  const out = new Map<string, number>();
  for (const r of rows) out.set(key(r), (out.get(key(r)) ?? 0) + 1);
  return out;
}
/** Largest first; ties by name, as the fold ranks them. */
const ranked = (m: Map<string, number>) => [...m.entries()].sort((a, b) => b[1] - a[1] || (a[0] < b[0] ? -1 : 1));

let flightsWs: Awaited<ReturnType<typeof flightsWorkspace>>;
let strikesWs: Awaited<ReturnType<typeof strikesWorkspace>>;
beforeAll(async () => {
  flightsWs = await flightsWorkspace();
  strikesWs = await strikesWorkspace();
});
afterAll(async () => {
  await flightsWs?.source.close();
  await strikesWs?.source.close();
});

type Ws = typeof flightsWs;
const question = (template: TemplateName, metric: string, dimension: string, window: SubQuestion['window'], extra: Partial<SubQuestion> = {}): SubQuestion => ({
  id: 's',
  kind: 'trend',
  lens: 'time_pattern',
  template,
  metrics: [metric],
  dimension,
  grain: 'month',
  window,
  filters: [],
  ...extra,
});
const present = async (ws: Ws, sq: SubQuestion) => {
  const answer = await answerSubQuestion(sq, ws);
  return { answer, shown: SUB_QUESTIONS[sq.template].present(answer, { dataset: ws.dataset, locale: 'en-GB', audience: 'managers', chart: { width: 1200, height: 675, scale: 1 }, dataAsOf: ws.coverage.lastDate }) };
};
const Q1 = { start: '2001-01-01', end: '2001-04-01' };
const STRIKE_YEARS = { start: '1990-01-01', end: '2002-08-01' };

describe('a breakdown ranks and names segments by the value shown, as many as asked', () => {
  it('average delay by origin: the origins with the highest mean delay are named (not the busiest), and the caption names the highest and lowest', async () => {
    const { answer, shown } = await present(flightsWs, question('segment_trend', 'avg_delay', 'origin', Q1, { grain: 'week' }));
    const named = answer.findings.filter((f): f is SegmentTrendFinding => f.type === 'segment_trend' && !f.other);
    // Independent: each origin's mean delay over its flights; origins with fewer flights than the
    // floor (1% of the flights kept between 30 and 100, at most half the busiest origin's; common
    // practice, see RANK_FLOOR) are not ranked; the 8 highest means of the rest, ties by name.
    const counts = countBy(flights, (f) => f.origin);
    const meanDelay = (o: string) => {
      const mine = flights.filter((f) => f.origin === o);
      return mine.reduce((a, f) => a + f.delay, 0) / mine.length;
    };
    const floor = Math.min(Math.ceil(0.5 * Math.max(...counts.values())), Math.max(30, Math.min(100, Math.ceil(0.01 * flights.length))));
    const byDelay = [...counts.keys()].filter((o) => counts.get(o)! >= floor).sort((a, b) => meanDelay(b) - meanDelay(a) || a.localeCompare(b)).slice(0, 8);
    expect(named.map((t) => t.segment)).toEqual(byDelay);
    const busiest = ranked(counts).slice(0, 8).map(([o]) => o);
    expect(byDelay).not.toEqual(busiest);
    const top = byDelay[0]!;
    const bottom = byDelay[byDelay.length - 1]!;
    expect(shown.caption).toContain(`${top} has the highest average delay, ${meanDelay(top).toFixed(1)}\u00a0min`);
    expect(shown.caption).toContain(`${bottom} the lowest, ${meanDelay(bottom).toFixed(1)}\u00a0min`);
    expect(shown.caption).not.toMatch(/is the largest/);
  });

  it('"top 5 origin airports by flights": five named, and the caption gives the top five share', async () => {
    const { answer, shown } = await present(flightsWs, question('segment_shares', 'flights', 'origin', Q1, { rankLimit: 5 }));
    const f = answer.findings.find((x): x is SegmentSharesFinding => x.type === 'segment_shares')!;
    const top5 = ranked(countBy(flights, (x) => x.origin)).slice(0, 5);
    expect(f.rows.filter((r) => !r.other).map((r) => r.segment)).toEqual(top5.map(([o]) => o));
    const share = top5.reduce((a, [, n]) => a + n, 0) / flights.length;
    // The newcomer's own DuckDB check on the same file gave 22.3% (DFW, ORD, ATL, LAX, PHX).
    expect(share).toBeCloseTo(0.223, 3);
    expect(f.topN).toBe(5);
    expect(f.topNShare).toBeCloseTo(share, 12);
    expect(shown.caption).toContain(`the top 5 origin airports carry ${(share * 100).toFixed(1)}%`);
    expect(shown.chart?.kind).toBe('pareto');
    if (shown.chart?.kind === 'pareto') expect(shown.chart.bars.filter((b) => !b.other)).toHaveLength(5);
  });

  it('"top 10 airports by number of strikes": ten named with their share, not the default eight', async () => {
    const { answer, shown } = await present(strikesWs, question('segment_shares', 'strikes', 'airport', STRIKE_YEARS, { rankLimit: 10 }));
    const f = answer.findings.find((x): x is SegmentSharesFinding => x.type === 'segment_shares')!;
    const top10 = ranked(countBy(strikes, (s) => s.airport)).slice(0, 10);
    expect(f.rows.filter((r) => !r.other).map((r) => r.segment)).toEqual(top10.map(([a]) => a));
    const share = top10.reduce((a, [, n]) => a + n, 0) / strikes.length;
    expect(shown.caption).toContain(`the top 10 airports carry ${(share * 100).toFixed(1)}%`);
  });

  it('"top 10" of a breakdown with fewer values says there are only that many', async () => {
    // Independent: origins with at least one flight on 1 January 2001.
    const day = flights.filter((f) => f.date.startsWith('2001/01/01'));
    const origins = new Set(day.map((f) => f.origin)).size;
    const { shown } = await present(flightsWs, question('segment_shares', 'flights', 'origin', { start: '2001-01-01', end: '2001-01-02' }, { rankLimit: origins + 5, grain: 'day' }));
    expect(shown.caption).toContain(`Only ${origins} origin airports have flights in this period.`);
  });
});

describe('unusual periods are said once each, at their own grain', () => {
  it('monthly total cost of strikes: the note counts each unusual month once and names no month twice', async () => {
    // The note goes under the series answer; the summary names them in its caption (below) and
    // carries no note of them.
    const sq: SubQuestion = { ...question('trend_summary', 'cost_total', 'airport', STRIKE_YEARS), dimension: undefined };
    const series: SubQuestion = { ...question('series', 'cost_total', 'airport', STRIKE_YEARS), dimension: undefined };
    const answer = await answerSubQuestion(series, strikesWs);
    const notes = answerCaveats(answer.caveats, strikesWs.coverage).filter((c) => c.code === 'outlier');
    expect(notes).toHaveLength(1);
    expect((await answerSubQuestion(sq, strikesWs)).caveats.filter((c) => c.code === 'outlier')).toEqual([]);
    const text = caveatNote(notes[0]!, 'en-GB');
    // Independent: monthly sums of "Cost Total $" over the complete months (February 1990 to June
    // 2002: the file starts on 8 January 1990 and ends on 25 July 2002), summed here from the file,
    // then screened by the same rule (quality/series-outliers.ts: modified z-score of what is left
    // after the yearly pattern and trend), so the engine's sums, gaps and partial months are checked.
    const byMonth = new Map<string, number>();
    for (const s of strikes) byMonth.set(s.date.slice(0, 7), (byMonth.get(s.date.slice(0, 7)) ?? 0) + s.cost);
    const months = [...byMonth.keys()].filter((m) => m >= '1990-02' && m <= '2002-06').sort();
    expect(months).toHaveLength(149);
    const screen = screenSeries(months.map((m) => ({ period: `${m}-01`, value: byMonth.get(m)!, partial: false })), 'month', 'multiplicative')!;
    expect(screen.rule).toBe('seasonal');
    const unusual = screen.unusual.length;
    expect(text.startsWith(`${unusual} months are unusual even for the time of year`)).toBe(true);
    const named = text.slice(text.lastIndexOf(':') + 1).replace(/\.$/, '').split(/, | and /).map((x) => x.trim());
    expect(named.length).toBe(5);
    expect(new Set(named).size).toBe(named.length);
    // The caption names the five months furthest out (largest |z|), not every unusual month.
    const z = screen.unusual.map((u) => ({ m: u.period.slice(0, 7), z: Math.abs(u.score) })).sort((a, b) => b.z - a.z);
    const monthName = (ym: string) => new Date(`${ym}-01T00:00:00Z`).toLocaleString('en-GB', { month: 'long', year: 'numeric', timeZone: 'UTC' });
    const { shown } = await present(strikesWs, sq);
    expect(unusual).toBeGreaterThan(5);
    expect(shown.caption).toContain(`${unusual} months stand out once the usual yearly pattern and the trend are taken out; the 5 furthest out: `);
    const listed = /furthest out: (.*?)\.(?:\s|$)/.exec(shown.caption)![1]!;
    for (const { m } of z.slice(0, 5)) expect(listed).toContain(monthName(m));
    expect(listed).not.toContain(monthName(z[5]!.m));
  });
});

describe('a change in a metric that can be zero or negative, or over less than a year, is said in units', () => {
  it('average delay by origin over one quarter: the Sen slope in minutes a week, never a percentage a year, and no origin named as trending', async () => {
    const { answer, shown } = await present(flightsWs, question('segment_trend', 'avg_delay', 'origin', Q1, { grain: 'week' }));
    expect(`${shown.title} ${shown.caption}`).not.toMatch(/%|a year/);
    const named = answer.findings.filter((f): f is SegmentTrendFinding => f.type === 'segment_trend' && !f.other);
    expect(named.every((t) => t.slopePerYearRelative === null)).toBe(true);
    // Independent: weekly mean delay per origin over the 12 complete Monday weeks (1 January 2001
    // was a Monday; the week of 26 March ends after the data), and Sen's slope (Sen 1968): the
    // median of the pairwise slopes.
    const weekOf = (d: string) => Math.floor((Date.UTC(+d.slice(0, 4), +d.slice(5, 7) - 1, +d.slice(8, 10)) - Date.UTC(2001, 0, 1)) / (7 * 86_400_000));
    const sen = (origin: string) => {
      const sums = Array.from({ length: 12 }, () => ({ s: 0, n: 0 }));
      for (const f of flights) {
        const w = weekOf(f.date);
        if (f.origin === origin && w < 12) {
          sums[w]!.s += f.delay;
          sums[w]!.n += 1;
        }
      }
      const y = sums.map((c) => c.s / c.n);
      const slopes: number[] = [];
      for (let i = 0; i < y.length; i++) for (let j = i + 1; j < y.length; j++) slopes.push((y[j]! - y[i]!) / (j - i));
      slopes.sort((a, b) => a - b);
      const m = slopes.length;
      return m % 2 ? slopes[(m - 1) / 2]! : (slopes[m / 2 - 1]! + slopes[m / 2]!) / 2;
    };
    for (const t of named) expect(t.slopePerPeriod).toBeCloseTo(sen(t.segment!), 9);
    // Over one quarter a slope is the season as much as a trend (newcomer trial 4 #12): no origin is named as rising most.
    expect(shown.title).toBe("Average delay by origin airport: too short a span to tell each one's trend from the season");
    expect(shown.caption).not.toMatch(/rose most|fell least|\(trend\)/);
  });
});

describe('the typical value per row is a statistic of the rows, and the period statistics say they are of periods', () => {
  it('average delay: "median week" for the weekly values, and the mean and median over the flights themselves', async () => {
    const sq: SubQuestion = { ...question('trend_summary', 'avg_delay', 'origin', Q1, { grain: 'week' }), dimension: undefined };
    const { shown } = await present(flightsWs, sq);
    // Independent: mean and median of the 20,000 delays (the newcomer's DuckDB check: 7.70 and 0).
    const delays = flights.map((f) => f.delay).sort((a, b) => a - b);
    const mean = delays.reduce((a, b) => a + b, 0) / delays.length;
    const median = (delays[delays.length / 2 - 1]! + delays[delays.length / 2]!) / 2;
    expect(median).toBe(0);
    expect(shown.caption).toContain(`Across the 20,000 flights themselves: mean ${mean.toFixed(1)}\u00a0min, median ${median.toFixed(1)}\u00a0min.`);
    expect(shown.caption).toMatch(/\(median week \d/);
  });
});

describe('each segment growth is labelled with the years it was computed over', () => {
  it('strikes by airport: every bar and the caption name the full years each airport’s rate really spans', async () => {
    const { answer, shown } = await present(strikesWs, question('segment_trend', 'strikes', 'airport', STRIKE_YEARS, { rankLimit: 8 }));
    const named = answer.findings.filter((f): f is SegmentTrendFinding => f.type === 'segment_trend' && !f.other && f.growth?.cagr != null);
    expect(named.length).toBeGreaterThan(1);
    // Independent: for each airport, the calendar years inside the data it was there throughout: strikes
    // in all twelve months, or any year between its first and last years with strikes (analysis/presence.ts).
    const fullYears = (airport: string) => {
      const months = new Map<number, Set<string>>();
      for (const s of strikes.filter((x) => x.airport === airport)) {
        const y = Number(s.date.slice(0, 4));
        months.set(y, (months.get(y) ?? new Set()).add(s.date.slice(5, 7)));
      }
      const inside = [...months.entries()].filter(([y]) => y <= 2001 && `${y}-01-01` >= (strikesWs.coverage.firstDate ?? ''));
      const seen = inside.map(([y]) => y);
      return inside.filter(([y, m]) => m.size === 12 || (y > Math.min(...seen) && y < Math.max(...seen))).map(([y]) => y).sort();
    };
    const spans = new Set<string>();
    for (const t of named) {
      const years = fullYears(t.segment!);
      expect([t.growth!.fromYear, t.growth!.toYear]).toEqual([years[0], years[years.length - 1]]);
      spans.add(`${t.growth!.fromYear}–${t.growth!.toYear}`);
    }
    if (spans.size > 1 && shown.chart?.kind === 'bars') {
      for (const t of named) expect(shown.chart.bars.map((b) => b.label)).toContain(`${t.segment} (${t.growth!.fromYear}–${t.growth!.toYear})`);
      expect(shown.chart.subtitle).toContain("between each one's first and last full calendar years");
    }
    // Each year span the caption states is one a named airport's rate really covers.
    for (const m of shown.caption.matchAll(/from (\d{4}) to (\d{4})/g)) expect(spans).toContain(`${m[1]}–${m[2]}`);
  });
});
