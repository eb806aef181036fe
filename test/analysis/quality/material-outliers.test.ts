// A series with little noise scores a small wobble far past the modified z-score's 3.5 (Iglewicz &
// Hoaglin 1993): flights a day on vega-datasets' flights-3m.parquet (US domestic flights, January to
// June 2001, FAA on-time data as packaged by vega-datasets) scores a dozen days past it, most of them
// 4–8% off their usual. A period of a proportional series is called unusual only when it is also
// MATERIAL_SHARE (10%, our own choice) off its usual. Checked with the test's own SQL: each day
// flagged is at least that far from the median of the same weekday in the three weeks either side.
import { DuckDBInstance } from '@duckdb/node-api';
import { describe, expect, it } from 'vitest';
import { MATERIAL_SHARE, screenSeries } from '../../../analysis/quality/series-outliers.js';
import type { PeriodPoint } from '../../../analysis/types.js';
import { vegaDataFile } from '../../helpers/open-data.js';

const FLIGHTS = vegaDataFile('flights-3m.parquet');

describe('unusual days of a smooth daily count (flights-3m.parquet)', () => {
  it('flags only days materially off their usual, New Year\'s Day among them', async () => {
    const db = await DuckDBInstance.create(':memory:');
    const c = await db.connect();
    const days = `SELECT CAST(date AS DATE) AS d, CAST(COUNT(*) AS DOUBLE) AS n FROM read_parquet('${FLIGHTS}') WHERE date < DATE '2001-07-01' GROUP BY 1`;
    const rows = (await c.runAndReadAll(`SELECT strftime(d, '%Y-%m-%d'), n FROM (${days}) ORDER BY 1`)).getRows() as [string, number][];
    // The same weekday's median over the three weeks either side, the day itself left out.
    const near = (await c.runAndReadAll(`WITH t AS (${days})
      SELECT strftime(a.d, '%Y-%m-%d'), median(b.n) FROM t a JOIN t b ON dayofweek(a.d) = dayofweek(b.d) AND b.d <> a.d AND abs(b.d - a.d) <= 21 GROUP BY 1`)).getRows() as [string, number][];
    c.closeSync();
    const usualNear = new Map(near.map(([d, m]) => [d, Number(m)]));
    const points: PeriodPoint[] = rows.map(([d, n]) => ({ period: d, value: Number(n), partial: false }));
    const screen = screenSeries(points, 'day', 'multiplicative')!;
    expect(screen.rule).toBe('seasonal');
    expect(screen.cycle).toBe(7);
    const flagged = screen.unusual.map((u) => u.period);
    // A US public holiday (recalled, not from the file): 1 January.
    expect(flagged).toContain('2001-01-01');
    for (const u of screen.unusual) {
      expect(Math.abs(u.value / u.expected! - 1)).toBeGreaterThanOrEqual(MATERIAL_SHARE);
      expect(Math.abs(u.value / usualNear.get(u.period)! - 1)).toBeGreaterThanOrEqual(MATERIAL_SHARE);
    }
    // The floor bites: days past the score but under 10% off are judged and left unflagged.
    const wobbles = screen.judged.filter((j) => Math.abs(j.score) > screen.threshold && Math.abs(j.value / j.expected! - 1) < MATERIAL_SHARE);
    expect(wobbles.length).toBeGreaterThan(0);
    for (const w of wobbles) expect(flagged).not.toContain(w.period);
  }, 120_000);
});
