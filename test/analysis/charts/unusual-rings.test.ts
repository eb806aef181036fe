// Unusual periods ringed on the series chart (analysis/charts/build-line.ts, draw-line.ts), checked on public records
// in vega-datasets: NOAA's Mauna Loa CO2 (co2-concentration.csv, one month PLANTED 3 ppm high) and NOAA daily
// precipitation for Seattle (weather.csv).
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { buildLine } from '../../../analysis/charts/build-line.js';
import { renderChartWithGeometry } from '../../../analysis/charts/render.js';
import { screenSeries } from '../../../analysis/quality/series-outliers.js';
import type { PeriodPoint } from '../../../analysis/types.js';
import { vegaDataFile } from '../../helpers/open-data.js';

function csv(name: string): Record<string, string>[] {
  const [header, ...lines] = readFileSync(vegaDataFile(name), 'utf8').trim().split('\n');
  const cols = header!.split(',');
  return lines.map((l) => Object.fromEntries(l.split(',').map((v, i) => [cols[i]!, v])));
}

const overlap = (a: { left: number; top: number; right: number; bottom: number }, b: typeof a) =>
  a.left < b.right && b.left < a.right && a.top < b.bottom && b.top < a.bottom;

async function chartOf(points: PeriodPoint[], model: 'additive' | 'multiplicative', unit: string) {
  const screen = screenSeries(points, 'month', model)!;
  const spec = buildLine({
    title: 'Test chart',
    subtitle: 'monthly',
    footer: ['Source: vega-datasets'],
    width: 1200,
    height: 675,
    scale: 1,
    seriesLabel: 'Value',
    grain: 'month',
    points,
    format: { unit: 'number', label: unit, locale: 'en-GB' },
    unusual: { legend: 'Unusual for its season', periods: screen.unusual.map((u) => ({ period: u.period, score: u.score })) },
  });
  return { screen, spec, ...(await renderChartWithGeometry(spec)) };
}

describe('the series chart rings the periods the outlier screen flags', () => {
  it('CO2 2010–2020 with 3 ppm planted in May 2015: a labelled ring there, the high and low kept, no label over another', async () => {
    const points: PeriodPoint[] = csv('co2-concentration.csv').slice(-120).map((r) => ({ period: r.Date!, value: Number(r.CO2) + (r.Date === '2015-05-01' ? 3 : 0), partial: false }));
    const { screen, spec, geometry, png } = await chartOf(points, 'additive', 'ppm');
    expect(png.length).toBeGreaterThan(1000);
    expect(spec.marks.map((m) => m.role)).toEqual(['high', 'low']);
    // The file's own arithmetic: the high is April 2020's reading, the maximum of the window.
    expect(spec.points[spec.marks[0]!.index]!.value).toBe(Math.max(...points.map((p) => p.value!)));
    const may = spec.unusual!.points.find((u) => spec.points[u.index]!.period === '2015-05-01')!;
    expect(may.labelled).toBe(true);
    expect(may.above).toBe(true);
    expect(may.text).toContain('May 2015');
    expect(may.text).toContain('407');
    expect(spec.unusual!.points.length).toBe(screen.unusual.length);
    // Drawn: one ring per flagged period, on its point; labels apart from each other and from the high/low labels.
    const rings = geometry.marks.filter((m) => m.role === 'unusual');
    expect(rings.length).toBe(screen.unusual.length);
    const at = points.findIndex((p) => p.period === '2015-05-01');
    expect(rings.some((r) => Math.abs(r.x - geometry.points[at]!.x) < 1 && Math.abs(r.y - geometry.points[at]!.y) < 1)).toBe(true);
    const labels = geometry.marks.filter((m) => ['high', 'low', 'unusual-label'].includes(m.role)).map((m) => m.box!);
    expect(labels.length).toBe(2 + spec.unusual!.points.filter((u) => u.labelled).length);
    labels.forEach((a, i) => labels.slice(i + 1).forEach((b) => expect(overlap(a, b)).toBe(false)));
  });

  it('Seattle monthly precipitation: December 2015, the wettest month, keeps its high label and gets a ring without a second label', async () => {
    const sums = new Map<string, number>();
    for (const r of csv('weather.csv')) if (r.location === 'Seattle') sums.set(`${r.date!.slice(0, 7)}-01`, (sums.get(`${r.date!.slice(0, 7)}-01`) ?? 0) + Number(r.precipitation));
    const points: PeriodPoint[] = [...sums].sort(([a], [b]) => a.localeCompare(b)).map(([period, value]) => ({ period, value, partial: false }));
    const { spec, geometry } = await chartOf(points, 'multiplicative', 'mm');
    const high = spec.marks.find((m) => m.role === 'high')!;
    expect(spec.points[high.index]!.period).toBe('2015-12-01');
    const ring = spec.unusual!.points.find((u) => u.index === high.index)!;
    expect(ring.labelled).toBe(false);
    expect(geometry.marks.filter((m) => m.role === 'unusual').length).toBe(spec.unusual!.points.length);
  });
});
