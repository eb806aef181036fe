// Weekly "same period last year" uses the ISO 8601 week calendar: a week is compared with the
// week of the same ISO week number in the previous ISO week-numbering year, and a week 53 whose
// previous year has only 52 weeks has no comparison point. Checked three ways:
// - facts of ISO 8601 (weeks start on Monday; week 1 is the week holding 4 January; 2015, 2020,
//   2026 and 2032 have 53 weeks): stated by the standard's rule, the dates recalled from memory
//   and confirmed by the reference library below;
// - the reference library date-fns 4.4.0 (npm, pinned as a dev dependency): getISOWeek,
//   getISOWeekYear, getISOWeeksInYear and startOfISOWeek, over every day from 1990 to 2040;
// - the templates end to end on a real in-memory DuckDB over a CSV written here (invented data, a
//   unit case of the calendar rule), with expected rates worked out in JS from the raw rows.
import { mkdtemp, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { getISOWeek, getISOWeekYear, getISOWeeksInYear, startOfISOWeek } from 'date-fns';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { answerSubQuestion } from '../../analysis/answer-sub-question.js';
import { addDays, isoWeekOf, isoWeeksInYear, isoWeekStart, sameIsoWeekLastYear } from '../../analysis/periods.js';
import { sameLastYear } from '../../analysis/templates/kpi-periods.js';
import type { Answer, Finding, SubQuestion } from '../../analysis/types.js';
import { openWorkspace, type Workspace } from '../../analysis/workspace.js';
import { parseConfigText } from '../../config/load.js';

/** date-fns works on local Date objects; noon local time keeps every zone on the same calendar day. */
const local = (iso: string) => new Date(Number(iso.slice(0, 4)), Number(iso.slice(5, 7)) - 1, Number(iso.slice(8, 10)), 12);
const isoOfLocal = (d: Date) => `${d.getFullYear()}-${String(d.getMonth() + 1).padStart(2, '0')}-${String(d.getDate()).padStart(2, '0')}`;

describe('ISO 8601 week calendar', () => {
  it('agrees with ISO 8601 facts (recalled from memory; confirmed by date-fns below)', () => {
    // Years with 53 ISO weeks: those starting on a Thursday, and leap years starting on a Wednesday.
    expect([2015, 2020, 2026, 2032].map(isoWeeksInYear)).toEqual([53, 53, 53, 53]);
    expect([2019, 2021, 2024, 2025, 2027].map(isoWeeksInYear)).toEqual([52, 52, 52, 52, 52]);
    // 1 January 2021 (a Friday) is in week 53 of 2020; week 1 of 2021 starts on Monday 4 January.
    expect(isoWeekOf('2021-01-01')).toEqual({ year: 2020, week: 53 });
    expect(isoWeekStart(2021, 1)).toBe('2021-01-04');
    // 29 December 2025 (a Monday) already starts week 1 of 2026; 2026's week 53 starts on 28 December 2026.
    expect(isoWeekOf('2025-12-29')).toEqual({ year: 2026, week: 1 });
    expect(isoWeekStart(2026, 53)).toBe('2026-12-28');
  });

  it('agrees with date-fns on every day from 1990 to 2040', () => {
    let mismatches = 0;
    for (let day = '1990-01-01'; day < '2041-01-01'; day = addDays(day, 1)) {
      const d = local(day);
      const ours = isoWeekOf(day);
      if (ours.week !== getISOWeek(d) || ours.year !== getISOWeekYear(d)) mismatches++;
    }
    expect(mismatches).toBe(0);
    for (let y = 1990; y <= 2040; y++) {
      expect(isoWeeksInYear(y), String(y)).toBe(getISOWeeksInYear(local(`${y}-07-01`)));
      expect(isoWeekStart(y, 1), String(y)).toBe(isoOfLocal(startOfISOWeek(local(`${y}-01-04`))));
    }
  });

  it('the same week last year keeps the ISO week number; a week 53 without a counterpart has none', () => {
    for (let y = 1991; y <= 2040; y++) {
      for (let w = 1; w <= isoWeeksInYear(y); w++) {
        const start = isoWeekStart(y, w);
        const before = sameIsoWeekLastYear(start);
        if (w === 53 && getISOWeeksInYear(local(`${y - 1}-07-01`)) === 52) {
          expect(before, `${y}-W${w}`).toBeNull();
          continue;
        }
        // date-fns: the counterpart is a Monday, in ISO year y - 1, with the same week number.
        const d = local(before!);
        expect([getISOWeekYear(d), getISOWeek(d), d.getDay()], `${y}-W${w}`).toEqual([y - 1, w, 1]);
      }
    }
    // The fixed 52-week step this replaces is one week off for all of 2021 (after 53-week 2020).
    expect(sameLastYear('2021-01-04', 'week')).toBe('2019-12-30');
    expect(addDays('2021-01-04', -364)).toBe('2020-01-06');
    expect(sameLastYear('2020-12-28', 'week')).toBeNull();
    expect(sameLastYear('2027-12-27', 'week')).toBe('2026-12-21');
    // Days still go back 52 weeks so the weekday lines up (common practice).
    expect(sameLastYear('2021-01-04', 'day')).toBe('2020-01-06');
  });
});

// A weekly series from Monday 31 December 2018 (2019-W01) to Sunday 16 January 2022: every day
// has one row, with a fare that depends on the ISO week, so each week's total is known in JS.
const FIRST = '2018-12-31';
const END = '2022-01-17';
const fareOf = (day: string) => {
  const { year, week } = isoWeekOf(day);
  return (year - 2018) * 100 + week;
};
const weekTotal = (start: string) => [0, 1, 2, 3, 4, 5, 6].reduce((a, k) => a + fareOf(addDays(start, k)), 0);

const CONFIG = `version: 1
datasets:
  - name: trips
    label: Weekly trips
    source: { kind: csv, paths: [trips.csv] }
    table: trips
    time_column: sail_date
    timezone: Europe/Dublin
    metrics:
      - { name: revenue, label: Revenue, definition: { type: sum, column: fare_total }, unit: currency, currency: EUR, higher_is_better: true }
    dimensions:
      - { name: route, column: route, label: Route }
`;

const typeOf = <T extends Finding['type']>(a: Answer, type: T) => a.findings.filter((f): f is Extract<Finding, { type: T }> => f.type === type);

describe('weekly same period last year, end to end (in-memory DuckDB)', () => {
  let ws: Workspace;
  beforeAll(async () => {
    const dir = await mkdtemp(join(tmpdir(), 'threadcount-iso-weeks-'));
    const lines = ['sail_date,route,fare_total'];
    for (let day = FIRST; day < END; day = addDays(day, 1)) lines.push(`${day},North,${fareOf(day)}`);
    await writeFile(join(dir, 'trips.csv'), `${lines.join('\n')}\n`);
    ws = await openWorkspace(parseConfigText(CONFIG, join(dir, 'threadcount.yaml')));
  });
  afterAll(async () => {
    await ws?.source.close();
  });

  const sq = (over: Partial<SubQuestion>): SubQuestion => ({
    id: 'w',
    kind: 'growth',
    lens: 'time_pattern',
    template: 'growth_series',
    metrics: ['revenue'],
    grain: 'week',
    window: { start: FIRST, end: END },
    filters: [],
    ...over,
  });

  it('growth_series: each week against the same ISO week a year earlier; 2020-W53 has no comparison point', async () => {
    const a = await answerSubQuestion(sq({}), ws);
    const series = typeOf(a, 'growth_series')[0]!;
    const at = new Map(series.points.map((p) => [p.period, p]));
    // 2021-W01 (from 4 January 2021) against 2020-W01 (from 30 December 2019), 53 weeks back.
    const w1 = at.get('2021-01-04')!;
    expect(w1.yoy).toBeCloseTo(weekTotal('2021-01-04') / weekTotal('2019-12-30') - 1, 12);
    // 2020-W53 (from 28 December 2020): 2019 has 52 weeks, so there is no year-earlier week.
    expect(at.get('2020-12-28')!.value).toBeCloseTo(weekTotal('2020-12-28'), 9);
    expect(at.get('2020-12-28')!.yoy).toBeNull();
    // Every week with a counterpart in the series: the counterpart found by date-fns' week numbers.
    let checked = 0;
    for (const p of series.points) {
      const { year, week } = { year: getISOWeekYear(local(p.period)), week: getISOWeek(local(p.period)) };
      const base = series.points.find((b) => getISOWeekYear(local(b.period)) === year - 1 && getISOWeek(local(b.period)) === week);
      if (!base || base.value === null || p.value === null) continue;
      expect(p.yoy, p.period).toBeCloseTo(p.value / base.value - 1, 12);
      checked++;
    }
    expect(checked).toBeGreaterThan(100);
  });

  it('kpi_snapshot: the latest week 53 gets no last-year point; the week after compares with 53 weeks earlier', async () => {
    const w53 = await answerSubQuestion(sq({ kind: 'kpi', lens: 'summary', template: 'kpi_snapshot', window: { start: '2020-06-01', end: '2021-01-04' } }), ws);
    const f53 = typeOf(w53, 'kpi_snapshot')[0]!;
    expect(f53.period).toBe('2020-12-28');
    expect(f53.previous.period).toBe('2020-12-21');
    expect(f53.lastYear).toBeNull();

    const w1 = await answerSubQuestion(sq({ kind: 'kpi', lens: 'summary', template: 'kpi_snapshot', window: { start: '2020-06-01', end: '2021-01-11' } }), ws);
    const f1 = typeOf(w1, 'kpi_snapshot')[0]!;
    expect(f1.period).toBe('2021-01-04');
    expect(f1.lastYear).toMatchObject({ period: '2019-12-30', value: weekTotal('2019-12-30') });
    expect(f1.lastYear!.relative).toBeCloseTo(weekTotal('2021-01-04') / weekTotal('2019-12-30') - 1, 12);
  });
});
