// Rendering: every kind decodes at the stated size (1× and 2×), is not blank, and its marks
// are where the geometry says, in the colours the spec implies.
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { growthColour } from '../../../analysis/charts/draw-growth-grid.js';
import type { Box, ChartGeometry } from '../../../analysis/charts/geometry.js';
import { renderChart, renderChartToFile, renderChartWithGeometry } from '../../../analysis/charts/render.js';
import type { ChartSpec } from '../../../analysis/charts/spec.js';
import { INK, OKABE_ITO, SENTIMENT } from '../../../analysis/charts/theme.js';
import {
  allSamples,
  barsSpec,
  groupCompareSpec,
  growthGridSpec,
  kpiRefundSpec,
  kpiSpec,
  lineOverlaySpec,
  lineSpec,
  paretoSpec,
  seasonalSpec,
} from './samples.js';
import { around, close, countColour, countDark, decodePng, hex, pixel, pngSize, richness, type Decoded } from './pixels.js';

const BLUE = hex(OKABE_ITO.blue);
const WHITE = hex(INK.background);

async function render(spec: ChartSpec): Promise<{ img: Decoded; geometry: ChartGeometry; png: Buffer }> {
  const { png, geometry } = await renderChartWithGeometry(spec);
  return { img: await decodePng(png), geometry, png };
}

function inside(box: Box, img: Decoded): boolean {
  return box.left >= 0 && box.top >= 0 && box.right <= img.width && box.bottom <= img.height;
}

describe.each([1, 2] as const)('every kind at scale %i', (scale) => {
  for (const [name, spec] of Object.entries(allSamples({ scale }))) {
    it(`${name}: decodes at ${spec.width * scale}×${spec.height * scale} and is not blank`, async () => {
      const { img, geometry, png } = await render(spec);
      expect(pngSize(png)).toEqual({ width: 1200 * scale, height: 675 * scale });
      expect([img.width, img.height]).toEqual([1200 * scale, 675 * scale]);
      expect([geometry.width, geometry.height]).toEqual([1200 * scale, 675 * scale]);
      // Background white at the corners; plenty of drawing in the plot area.
      expect(close(pixel(img, 2, 2), WHITE, 2)).toBe(true);
      expect(close(pixel(img, img.width - 3, img.height - 3), WHITE, 2)).toBe(true);
      const r = richness(img, geometry.plot);
      expect(r.colours).toBeGreaterThan(12);
      expect(r.nonWhite).toBeGreaterThan(0.015);
      // The title is drawn: dark text in the header band.
      expect(countDark(img, { left: 0, top: 30 * scale, right: img.width, bottom: 80 * scale })).toBeGreaterThan(500 * scale);
    });
  }
});

describe('line', () => {
  it('puts the high and low marks on the highest and lowest complete points, labels inside the image', async () => {
    const spec = lineSpec();
    const { img, geometry } = await render(spec);
    const complete = spec.points.map((p, i) => ({ v: p.value!, i })).filter((_, i) => !spec.points[i]!.partial);
    const maxIndex = complete.reduce((a, b) => (b.v > a.v ? b : a)).i;
    const minIndex = complete.reduce((a, b) => (b.v < a.v ? b : a)).i;
    const high = geometry.marks.find((m) => m.role === 'high')!;
    const low = geometry.marks.find((m) => m.role === 'low')!;
    expect(high.x).toBeCloseTo(geometry.points[maxIndex]!.x, 5);
    expect(low.x).toBeCloseTo(geometry.points[minIndex]!.x, 5);
    // The highest point is the topmost: smallest y among the drawn points.
    expect(Math.min(...geometry.points.slice(0, -1).map((p) => p.y))).toBeCloseTo(high.y, 5);
    // Marker: filled in the series blue with a white ring.
    expect(countColour(img, around(high.x, high.y, 3), BLUE)).toBeGreaterThan(20);
    expect(countColour(img, around(low.x, low.y, 3), BLUE)).toBeGreaterThan(20);
    for (const m of [high, low]) {
      expect(inside(m.box!, img)).toBe(true);
      expect(countDark(img, m.box!)).toBeGreaterThan(150);
    }
    // High label above its point, low label below.
    expect(high.box!.bottom).toBeLessThan(high.y);
    expect(low.box!.top).toBeGreaterThan(low.y);
    // Labels do not overlap each other.
    const a = high.box!;
    const b = low.box!;
    expect(a.right < b.left || b.right < a.left || a.bottom < b.top || b.bottom < a.top).toBe(true);
  });

  it('draws the partial last period as a hollow marker', async () => {
    const spec = lineSpec();
    const { img, geometry } = await render(spec);
    const last = geometry.points[geometry.points.length - 1]!;
    expect(spec.points[spec.points.length - 1]!.partial).toBe(true);
    expect(close(pixel(img, last.x, last.y), WHITE, 30)).toBe(true);
    expect(countColour(img, around(last.x, last.y, 7), BLUE, 40)).toBeGreaterThan(15);
  });

  it('draws the same-period-last-year overlay in a lighter colour, with a legend', async () => {
    const { img, geometry } = await render(lineOverlaySpec());
    expect(countColour(img, geometry.plot, hex('#8FBFE0'), 12)).toBeGreaterThan(300);
    // Legend row between subtitle and plot.
    const legend = { left: 0, top: geometry.plot.top - 45, right: 600, bottom: geometry.plot.top - 15 };
    expect(countColour(img, legend, hex('#8FBFE0'), 12)).toBeGreaterThan(20);
  });

  it('keeps the marks at 2× in the same relative places', async () => {
    const one = await render(lineSpec());
    const two = await render(lineSpec({ scale: 2 }));
    const h1 = one.geometry.marks.find((m) => m.role === 'high')!;
    const h2 = two.geometry.marks.find((m) => m.role === 'high')!;
    expect(h2.x).toBeCloseTo(h1.x * 2, 0);
    expect(h2.y).toBeCloseTo(h1.y * 2, 0);
    expect(countColour(two.img, around(h2.x, h2.y, 6), BLUE)).toBeGreaterThan(80);
  });
});

describe('bars', () => {
  it('draws bars longest first, the folded tail in grey, each with a value label', async () => {
    const spec = barsSpec();
    const { img, geometry } = await render(spec);
    expect(geometry.points).toHaveLength(spec.bars.length);
    const named = geometry.points.slice(0, -1).map((p) => p.x);
    expect(named).toEqual([...named].sort((a, b) => b - a));
    geometry.points.forEach((p, i) => {
      const colour = spec.bars[i]!.other ? hex(INK.other) : BLUE;
      expect(close(pixel(img, p.x - 4, p.y), colour, 6)).toBe(true);
      expect(countDark(img, { left: p.x + 4, top: p.y - 8, right: p.x + 60, bottom: p.y + 8 })).toBeGreaterThan(30);
    });
    // Axis from zero: all bars start at the same left edge.
    expect(close(pixel(img, geometry.plot.left + 3, geometry.points[0]!.y), BLUE, 6)).toBe(true);
  });
});

describe('pareto', () => {
  it('draws the 80% reference line, the cumulative line points and head/tail bar colours', async () => {
    const spec = paretoSpec();
    const { img, geometry } = await render(spec);
    const ref = geometry.lines.find((l) => l.role === 'threshold')!;
    // Dashed dark line: many dark pixels along its row.
    expect(countDark(img, { left: ref.x1, top: ref.y1 - 1, right: ref.x2, bottom: ref.y1 + 2 })).toBeGreaterThan(300);
    // 80% sits at 80% of the plot height above the baseline.
    const frac = (geometry.plot.bottom - ref.y1) / (geometry.plot.bottom - geometry.plot.top);
    expect(frac).toBeCloseTo(0.8, 2);
    const cumulative = geometry.marks.filter((m) => m.role === 'cumulative');
    expect(cumulative).toHaveLength(spec.bars.length);
    for (const m of cumulative) expect(countColour(img, around(m.x, m.y, 2), hex(OKABE_ITO.orange), 30)).toBeGreaterThan(5);
    // Cumulative points rise left to right (y shrinks).
    const ys = cumulative.map((m) => m.y);
    expect(ys).toEqual([...ys].sort((a, b) => b - a));
    geometry.points.forEach((p, i) => {
      const expected = i <= spec.thresholdIndex ? BLUE : hex(OKABE_ITO.skyBlue);
      expect(close(pixel(img, p.x - 20, geometry.plot.bottom - 4), expected, 6)).toBe(true);
    });
  });
});

describe('growth grid', () => {
  it('fills every cell with its diverging colour and writes its value; n/a cells grey', async () => {
    const spec = growthGridSpec();
    const { img, geometry } = await render(spec);
    const values = spec.rows.flatMap((r) => r.cells);
    expect(geometry.cells).toHaveLength(values.length);
    geometry.cells.forEach((cell, k) => {
      const v = values[k]!;
      const fill = v === null ? hex(INK.na) : hex(growthColour(v, spec.domain, spec.higherIsBetter));
      expect(close(pixel(img, cell.left + 4, cell.top + 4), fill, 3)).toBe(true);
      expect(countDark(img, cell) + countColour(img, cell, WHITE, 10)).toBeGreaterThan(20);
    });
    // The scale diverges: good growth blue-ish, bad growth orange-ish.
    const best = values.reduce<number>((a, b) => (b !== null && b > a ? b : a), -Infinity);
    const [r, , b] = hex(growthColour(best, spec.domain, true));
    expect(b).toBeGreaterThan(r);
    const [r2, , b2] = hex(growthColour(-best, spec.domain, true));
    expect(r2).toBeGreaterThan(b2);
  });
});

describe('KPI card', () => {
  it('colours arrows by whether the change is good for the metric', async () => {
    for (const spec of [kpiSpec(), kpiRefundSpec()]) {
      const { img, geometry } = await render(spec);
      spec.comparisons.forEach((c, i) => {
        const mark = geometry.marks[i]!;
        expect(mark.role).toBe(c.direction);
        expect(countColour(img, around(mark.x, mark.y, 10), hex(SENTIMENT[c.sentiment]), 20)).toBeGreaterThan(40);
      });
      expect(countDark(img, geometry.cells[0]!)).toBeGreaterThan(2000);
    }
    expect(kpiSpec().comparisons.map((c) => c.sentiment)).toEqual(['good', 'bad']);
    expect(kpiRefundSpec().comparisons.map((c) => c.sentiment)).toEqual(['bad', 'good']);
  });
});

describe('group comparison', () => {
  it('draws whiskers at the interval ends', async () => {
    const spec = groupCompareSpec();
    const { img, geometry } = await render(spec);
    const ends = geometry.marks;
    expect(ends).toHaveLength(spec.groups.length * 2);
    for (const m of ends) expect(countDark(img, around(m.x, m.y, 3))).toBeGreaterThan(6);
    expect(close(pixel(img, geometry.points[1]!.x - 10, geometry.points[1]!.y + 10), hex(OKABE_ITO.orange), 6)).toBe(true);
    // The wider group's estimate is further right.
    expect(geometry.points[0]!.x).toBeGreaterThan(geometry.points[1]!.x);
  });
});

describe('seasonal profile', () => {
  it('draws the 1.0 reference line, whiskers and month bars coloured by side of the line', async () => {
    const spec = seasonalSpec();
    const { img, geometry } = await render(spec);
    const ref = geometry.lines.find((l) => l.role === 'reference')!;
    expect(countDark(img, { left: ref.x1, top: ref.y1 - 1, right: ref.x2, bottom: ref.y1 + 2 })).toBeGreaterThan(200);
    const highs = geometry.marks.filter((m) => m.role === 'range-high');
    expect(highs).toHaveLength(12);
    geometry.points.forEach((p, i) => {
      const above = spec.months[i]!.index! >= 1;
      expect(close(pixel(img, p.x - 12, geometry.plot.bottom - 5), hex(above ? OKABE_ITO.blue : OKABE_ITO.skyBlue), 6)).toBe(true);
      expect(above).toBe(p.y < ref.y1);
    });
  });
});

describe('robustness', () => {
  it('renders degenerate specs without throwing', async () => {
    const empty = { ...lineSpec(), points: [], marks: [] };
    const allNull = { ...lineSpec(), points: lineSpec().points.map((p) => ({ ...p, value: null })), marks: [] };
    const long = { ...barsSpec(), title: 'A very long title '.repeat(12), footer: ['Caveat '.repeat(80)] };
    for (const spec of [empty, allNull, long] as ChartSpec[]) {
      const png = await renderChart(spec);
      expect(pngSize(png)).toEqual({ width: 1200, height: 675 });
    }
  });

  it('writes the PNG to a file', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'threadcount-chart-'));
    try {
      const path = join(dir, 'kpi.png');
      await renderChartToFile(kpiSpec(), path);
      expect(pngSize(readFileSync(path))).toEqual({ width: 1200, height: 675 });
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
