// Rendering: every kind decodes at the stated size (1× and 2×), is not blank, and its marks
// are where the geometry says, in the colours the spec implies.
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { buildLine } from '../../../analysis/charts/build-line.js';
import { growthColour } from '../../../analysis/charts/draw-growth-grid.js';
import { addMonths } from '../../../analysis/periods.js';
import type { Box, ChartGeometry } from '../../../analysis/charts/geometry.js';
import { renderDigest } from '../../../analysis/charts/render-digest.js';
import { renderChart, renderChartToFile, renderChartWithGeometry } from '../../../analysis/charts/render.js';
import type { ChartSpec } from '../../../analysis/charts/spec.js';
import { CHIP, INK, OKABE_ITO, SENTIMENT } from '../../../analysis/charts/theme.js';
import { layoutFrame } from '../../../analysis/charts/frame.js';
import { createCanvas } from '@napi-rs/canvas';
import {
  allSamples,
  barsSpec,
  groupCompareSpec,
  growthGridSpec,
  kpiRefundSpec,
  kpiSpec,
  barsSignedSpec,
  EUR,
  header,
  LOCALE,
  lineEventsSpec,
  lineOverlaySpec,
  lineSpec,
  monthlyRevenue,
  paretoFoldedSpec,
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

  it('keeps a low label on the first point inside the plot, clear of the y-axis tick labels', async () => {
    // Average fare per passenger (demo-like, € per passenger): the low is January 2022, the first point.
    const fares = [19.58, 20.22, 20.2, 19.92, 19.8, 19.93, 19.97, 20.07, 20.04, 20.19, 20.01, 20.14, 20.99, 20.83, 20.55, 20.27, 20.45, 20.43];
    const spec = buildLine({
      ...header('Average fare per passenger', 'Monthly'),
      seriesLabel: 'Average fare',
      grain: 'month',
      points: fares.map((value, i) => ({ period: addMonths('2022-01-01', i), value, partial: false })),
      format: { ...EUR, decimals: 2 },
    });
    const { img, geometry } = await render(spec);
    const low = geometry.marks.find((m) => m.role === 'low')!;
    expect(low.x).toBeCloseTo(geometry.points[0]!.x, 5);
    for (const m of geometry.marks) {
      expect(m.box!.left).toBeGreaterThanOrEqual(geometry.plot.left - 0.5);
      expect(m.box!.right).toBeLessThanOrEqual(geometry.plot.right + 0.5);
    }
    // Left of the plot, level with the label, only the axis' own tick text: no label ink spills there.
    const gutter = { left: 0, top: low.box!.top, right: geometry.plot.left - 1, bottom: low.box!.bottom };
    const tickInk = countColour(img, gutter, hex(INK.muted), 60);
    expect(countColour(img, gutter, hex(INK.title), 20)).toBeLessThanOrEqual(tickInk);
  });

  it('keeps high and low labels off the overlay line (members start low at a launch, others above)', async () => {
    const all = monthlyRevenue();
    const members = all.map((p, i) => ({ ...p, value: i < 15 ? null : i === 15 ? 428 : Math.round(p.value! / 700) }));
    const cases = [
      lineOverlaySpec(),
      lineEventsSpec(),
      buildLine({
        ...header('Bookings before and after the SkerryPass launch', 'Bookings per month'),
        seriesLabel: 'Pass holders',
        grain: 'month',
        points: members,
        format: { unit: 'count', locale: LOCALE },
        overlay: { label: 'Other customers', values: all.map((p) => Math.round(p.value! / 250)) },
      }),
    ];
    for (const spec of cases) {
      const { geometry } = await render(spec);
      const overlay = geometry.lines.filter((l) => l.role === 'overlay');
      expect(overlay.length).toBeGreaterThan(5);
      for (const m of geometry.marks.filter((k) => k.role === 'high' || k.role === 'low')) {
        // Sampled independently of the renderer's own clipping test: 50 points along every segment.
        for (const l of overlay) {
          for (let t = 0; t <= 1; t += 0.02) {
            const x = l.x1 + (l.x2 - l.x1) * t;
            const y = l.y1 + (l.y2 - l.y1) * t;
            const inBox = x > m.box!.left && x < m.box!.right && y > m.box!.top && y < m.box!.bottom;
            expect(inBox, `${m.role} label of "${spec.title}" sits on the overlay`).toBe(false);
          }
        }
        expect(m.box!.left).toBeGreaterThanOrEqual(geometry.plot.left - 0.5);
      }
    }
  });

  it('marks an event with a thin dashed rule through the plot and its label above it', async () => {
    const spec = lineEventsSpec();
    const { img, geometry } = await render(spec);
    const rule = geometry.lines.find((l) => l.role === 'event')!;
    const label = geometry.marks.find((m) => m.role === 'event')!;
    expect(rule.x1).toBeCloseTo(geometry.points[spec.events![0]!.index]!.x, 5);
    expect(rule.y2).toBeCloseTo(geometry.plot.bottom, 5);
    // Dashed: along the rule, stretches of dark ink alternate with gaps.
    let runs = 0;
    let inDash = false;
    for (let y = Math.ceil(geometry.plot.top); y < geometry.plot.bottom; y++) {
      const dark = countDark(img, { left: rule.x1 - 1, top: y, right: rule.x1 + 2, bottom: y + 1 }) > 0;
      if (dark && !inDash) runs++;
      inDash = dark;
    }
    expect(runs).toBeGreaterThan(20);
    // The label sits in the band above the plot, so it covers no data, and does not touch the marks' labels.
    expect(label.box!.bottom).toBeLessThanOrEqual(geometry.plot.top);
    expect(countDark(img, label.box!)).toBeGreaterThan(150);
    for (const m of geometry.marks.filter((k) => k.role !== 'event')) {
      const a = label.box!;
      const b = m.box!;
      expect(a.right < b.left || b.right < a.left || a.bottom < b.top || b.bottom < a.top).toBe(true);
    }
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

describe('bars with negative values', () => {
  it('keeps value labels inside the plot, draws a clear zero rule and colours rises and falls', async () => {
    const spec = barsSignedSpec();
    const { img, geometry } = await render(spec);
    const zero = geometry.lines.find((l) => l.role === 'zero')!;
    // The zero rule: dark, full height of the plot.
    expect(countDark(img, { left: zero.x1 - 1, top: geometry.plot.top, right: zero.x1 + 2, bottom: geometry.plot.bottom })).toBeGreaterThan((geometry.plot.bottom - geometry.plot.top) * 0.9);
    const values = geometry.marks.filter((m) => m.role === 'value');
    expect(values).toHaveLength(spec.bars.length);
    spec.bars.forEach((bar, i) => {
      const label = values[i]!.box!;
      const box = geometry.cells[i]!;
      // Value labels stay right of the category names (left of the plot) and off their own bar.
      expect(label.left).toBeGreaterThanOrEqual(geometry.plot.left);
      expect(bar.value < 0 ? label.right <= box.left : label.left >= box.right).toBe(true);
      expect(countDark(img, label)).toBeGreaterThan(30);
      // Rises in the good blue, falls in vermillion (revenue: higher is better), the fold grey.
      const colour = bar.other ? INK.other : bar.value > 0 ? SENTIMENT.good : SENTIMENT.bad;
      expect(close(pixel(img, (box.left + box.right) / 2, (box.top + box.bottom) / 2), hex(colour), 6)).toBe(true);
      // Bars start at zero.
      expect(Math.abs((bar.value < 0 ? box.right : box.left) - zero.x1)).toBeLessThan(1.5);
    });
    // The fold stays last though its value is not the smallest.
    expect(spec.bars[spec.bars.length - 1]).toMatchObject({ label: 'All others (2)', other: true });
    // A legend names the two colours.
    const legend = { left: 0, top: geometry.plot.top - 45, right: 600, bottom: geometry.plot.top - 10 };
    expect(countColour(img, legend, hex(SENTIMENT.good), 10)).toBeGreaterThan(100);
    expect(countColour(img, legend, hex(SENTIMENT.bad), 10)).toBeGreaterThan(100);
  });
});

describe('pareto', () => {
  it('shares gridlines between the value axis and the 0–100% axis', async () => {
    for (const spec of [paretoSpec(), paretoFoldedSpec()]) {
      const { img, geometry } = await render(spec);
      const valueTicks = geometry.lines.filter((l) => l.role === 'value-tick').map((l) => l.y1);
      const shareTicks = geometry.lines.filter((l) => l.role === 'share-tick').map((l) => l.y1);
      expect(shareTicks.length).toBeGreaterThanOrEqual(5);
      expect(valueTicks).toHaveLength(shareTicks.length);
      valueTicks.forEach((y, i) => expect(y).toBeCloseTo(shareTicks[i]!, 3));
      // A gridline is drawn at every share tick above zero (left of the first bar, where nothing else is drawn).
      const x = geometry.plot.left + 3;
      // (Skipping a tick the dashed 80% line is drawn over.)
      const ref = geometry.lines.find((l) => l.role === 'threshold')!.y1;
      for (const y of shareTicks.slice(1).filter((t) => Math.abs(t - ref) > 2)) {
        const row = { left: x, top: y - 1.5, right: x + 6, bottom: y + 1.5 };
        expect(countColour(img, row, hex(INK.grid), 12)).toBeGreaterThanOrEqual(6);
      }
    }
  });

  it('puts the threshold label where it covers no bar and no running-share label, even beside a tall folded tail', async () => {
    const spec = paretoFoldedSpec();
    const { img, geometry } = await render(spec);
    const label = geometry.marks.find((m) => m.role === 'threshold-label')!.box!;
    const overlaps = (a: Box, b: Box) => a.left < b.right && b.left < a.right && a.top < b.bottom && b.top < a.bottom;
    // The tallest bar is the fold, last, reaching over the 80% line where the label used to go.
    const last = geometry.cells[geometry.cells.length - 1]!;
    const ref = geometry.lines.find((l) => l.role === 'threshold')!;
    expect(last.top).toBeLessThan(ref.y1);
    expect(close(pixel(img, (last.left + last.right) / 2, geometry.plot.bottom - 4), hex(INK.other), 6)).toBe(true);
    for (const bar of geometry.cells) expect(overlaps(label, bar)).toBe(false);
    for (const m of geometry.marks.filter((k) => k.role === 'cumulative')) expect(overlaps(label, m.box!)).toBe(false);
    expect(inside(label, img)).toBe(true);
    expect(countDark(img, label)).toBeGreaterThan(100);
  });

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
  it('fills every cell by its state: diverging colour with its value, grey "n/a", hatched "partial", blank after the data', async () => {
    const spec = growthGridSpec();
    // One month without a year-earlier base, to see the "n/a" cell next to the others.
    spec.rows[0]!.cells[3] = null;
    spec.rows[0]!.texts[3] = 'n/a';
    spec.rows[0]!.states[3] = 'not_comparable';
    const { img, geometry } = await render(spec);
    const values = spec.rows.flatMap((r) => r.cells);
    const states = spec.rows.flatMap((r) => r.states);
    expect(geometry.cells).toHaveLength(values.length);
    expect(new Set(states)).toEqual(new Set(['value', 'not_comparable', 'partial', 'no_data']));
    geometry.cells.forEach((cell, k) => {
      const v = values[k]!;
      const inner = { left: cell.left + 3, top: cell.top + 3, right: cell.right - 3, bottom: cell.bottom - 3 };
      const area = (inner.right - inner.left) * (inner.bottom - inner.top);
      switch (states[k]) {
        case 'value':
          expect(close(pixel(img, cell.left + 4, cell.top + 4), hex(growthColour(v!, spec.domain, spec.higherIsBetter)), 3)).toBe(true);
          expect(countDark(img, cell) + countColour(img, cell, WHITE, 10)).toBeGreaterThan(20);
          break;
        case 'not_comparable':
          expect(close(pixel(img, cell.left + 4, cell.top + 4), hex(INK.na), 3)).toBe(true);
          break;
        case 'no_data':
          // Blank: the whole cell is page white, no "n/a" and no text.
          expect(countColour(img, inner, WHITE, 2)).toBe((Math.ceil(inner.right) - Math.floor(inner.left)) * (Math.ceil(inner.bottom) - Math.floor(inner.top)));
          break;
        case 'partial':
          // A dashed grey outline and hatching, no growth colour, the word "partial" in muted ink.
          expect(countColour(img, { ...cell, bottom: cell.top + 3 }, hex('#9AA3AD'), 30)).toBeGreaterThan(20);
          expect(countColour(img, inner, hex(INK.muted), 40)).toBeGreaterThan(30);
          expect(countColour(img, inner, hex(OKABE_ITO.blue), 60) + countColour(img, inner, hex(OKABE_ITO.vermillion), 60)).toBe(0);
          expect(countColour(img, inner, WHITE, 2)).toBeLessThan(area * 0.5);
          break;
      }
    });
    // The legend explains both kinds of grey cell: "n/a" and the hatched "partial" swatch.
    const last = geometry.cells[geometry.cells.length - 1]!;
    const legend = { left: 0, top: last.bottom + 5, right: img.width, bottom: last.bottom + 110 };
    expect(countColour(img, legend, hex(INK.na), 2)).toBeGreaterThan(200);
    expect(countColour(img, legend, hex('#9AA3AD'), 30)).toBeGreaterThan(40);
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
    // The year earlier first, then the month before (issue 17 item 8).
    expect(kpiSpec().comparisons.map((c) => c.sentiment)).toEqual(['bad', 'good']);
    expect(kpiRefundSpec().comparisons.map((c) => c.sentiment)).toEqual(['good', 'bad']);
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

describe('digest', () => {
  it('redraws a chart from its spec at thumbnail size, so its text stays larger than a scaled-down PNG', async () => {
    const spec = lineSpec();
    const base = { title: 'Skerrywake bookings: key findings', subtitle: 'Answering: "test"', takeaways: [{ text: 'Revenue peaks every summer' }], footer: 'Source: demo' };
    const png = await renderChart(spec);
    const scaled = await decodePng(await renderDigest({ ...base, charts: [{ png }] }));
    const redrawn = await decodePng(await renderDigest({ ...base, charts: [{ png, spec }] }));
    expect([redrawn.width, redrawn.height]).toEqual([scaled.width, scaled.height]);
    // The bottom of the chart's slot (its small print and lowest tick label, above the digest's
    // own footer): the same texts leave more ink when drawn at their own size.
    const band = { left: 48, top: scaled.height - 160, right: 48 + 728, bottom: scaled.height - 80 };
    const ink = (img: Decoded) => countColour(img, band, hex(INK.muted), 40);
    expect(ink(redrawn)).toBeGreaterThan(ink(scaled) * 1.2);
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

describe('header', () => {
  // Issue 17 item 18: our own header, a chip naming the metric and a full-width hairline under it,
  // with no short solid bar above the title.
  it('draws the chip where the layout puts it, the hairline margin to margin, and nothing above the title', async () => {
    const spec = { ...lineSpec(), chip: 'Revenue' };
    const layout = layoutFrame(createCanvas(10, 10).getContext('2d'), spec);
    const { img } = await render(spec);
    const chip = layout.chip!;
    expect(chip.text).toBe('Revenue');
    expect(countColour(img, chip.box, hex(CHIP.fill), 6)).toBeGreaterThan(200);
    expect(countColour(img, chip.box, hex(CHIP.text), 40)).toBeGreaterThan(30);
    // The subtitle starts right of the chip.
    expect(layout.subtitle.left).toBeGreaterThan(chip.box.right);
    const ruleRow = { left: 0, top: Math.floor(layout.rule.y), right: img.width, bottom: Math.floor(layout.rule.y) + 1 };
    expect(countColour(img, ruleRow, hex(CHIP.rule), 20)).toBeGreaterThan(img.width - 2 * layout.margin - 4);
    // Above the title: white only (the old accent bar sat there).
    expect(countDark(img, { left: 0, top: 0, right: img.width, bottom: layout.title.top - 2 })).toBe(0);
    expect(countColour(img, { left: 0, top: 0, right: img.width, bottom: layout.title.top - 2 }, BLUE, 60)).toBe(0);
  });

  it('leaves the subtitle at the margin without a chip', () => {
    const layout = layoutFrame(createCanvas(10, 10).getContext('2d'), lineSpec());
    expect(layout.chip).toBeNull();
    expect(layout.subtitle.left).toBe(layout.margin);
  });
});
