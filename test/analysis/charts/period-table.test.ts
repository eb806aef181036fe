// The period table's specs and pixels: every filled change cell carries the colour of its sign on
// the metric's good direction, with an arrow that reads without colour; the marked cells are each
// metric's extremes over its complete periods; a partial period is hatched and never coloured;
// long windows come as pages of at most 13 periods.
import { describe, expect, it } from 'vitest';
import { buildPeriodTablePages, domainOf, MAX_PAGES, pageRows, PAGE_ROWS, type PeriodTableInput } from '../../../analysis/charts/build-period-table.js';
import { MARK_COLOUR, tableCellColour } from '../../../analysis/charts/draw-period-table.js';
import type { ChartGeometry } from '../../../analysis/charts/geometry.js';
import { renderChartWithGeometry } from '../../../analysis/charts/render.js';
import type { PeriodTableSpec } from '../../../analysis/charts/spec.js';
import { INK, OKABE_ITO } from '../../../analysis/charts/theme.js';
import { addMonths } from '../../../analysis/periods.js';
import { close, countColour, countDark, decodePng, hex, pixel, pngSize, type Decoded } from './pixels.js';
import { periodTableInput } from './samples.js';

async function render(spec: PeriodTableSpec): Promise<{ img: Decoded; geometry: ChartGeometry }> {
  const { png, geometry } = await renderChartWithGeometry(spec);
  return { img: await decodePng(png), geometry };
}

/** Cells of the spec in drawing order (row-major), beside their geometry boxes. */
function cellsOf(spec: PeriodTableSpec) {
  return spec.rows.flatMap((row, i) => row.cells.map((cell, j) => ({ row, i, j, cell, column: spec.columns[j]! })));
}

describe.each([1, 2] as const)('the period table at scale %i', (scale) => {
  const input = periodTableInput({ scale }, 10);
  const spec = buildPeriodTablePages(input)[0]!;

  it('fills each change cell with the colour of its tone, and the tone’s sign is the change’s sign on the good direction', async () => {
    const { img, geometry } = await render(spec);
    const cells = cellsOf(spec);
    expect(geometry.cells).toHaveLength(cells.length);
    let filled = 0;
    for (const [k, c] of cells.entries()) {
      if (c.column.role !== 'change' || c.cell.tone === null) continue;
      const box = geometry.cells[k]!;
      // Inside the fill, clear of the arrow and the number.
      expect(close(pixel(img, box.left + 2 * scale, box.top + 2 * scale), hex(tableCellColour(c.cell.tone)), 3)).toBe(true);
      const source = input.rows[c.i]!.cells[c.column.group]!;
      const change = spec.columns[c.j - 1]!.role === 'value' ? source.vsPrevious : source.vsYearEarlier;
      const good = input.metrics[c.column.group]!.metric.higher_is_better;
      if (c.cell.direction === 'flat') expect(c.cell.tone).toBe(0);
      else {
        expect(Math.sign(c.cell.tone)).toBe(Math.sign(change!) * (good ? 1 : -1));
        expect(c.cell.direction).toBe(change! > 0 ? 'up' : 'down');
        // Blue for better, vermillion for worse (Okabe–Ito): the fill leans to the right hue.
        const [r, , b] = pixel(img, box.left + 2 * scale, box.top + 2 * scale);
        if (Math.abs(c.cell.tone) > 0.2) expect(c.cell.tone > 0 ? b > r : r > b).toBe(true);
      }
      filled++;
    }
    expect(filled).toBeGreaterThan(20);
  });

  it('draws an arrow in every cell with a direction, so rises and falls read in grey', async () => {
    const { img, geometry } = await render(spec);
    for (const [k, c] of cellsOf(spec).entries()) {
      if (!c.cell.direction || c.cell.direction === 'flat') continue;
      const box = geometry.cells[k]!;
      const arrowArea = { left: box.left, top: box.top, right: box.left + 22 * scale, bottom: box.bottom };
      // Dark ink, or white ink on a deep fill.
      const ink = countDark(img, arrowArea) + countColour(img, arrowArea, hex(INK.background), 20);
      expect(ink).toBeGreaterThan(8 * scale * scale);
    }
  });

  it('marks each metric’s best and worst complete period, which are its extremes by its good direction', async () => {
    const { img, geometry } = await render(spec);
    const cells = cellsOf(spec);
    expect(geometry.marks.filter((m) => m.role === 'best')).toHaveLength(input.metrics.length);
    expect(geometry.marks.filter((m) => m.role === 'worst')).toHaveLength(input.metrics.length);
    for (const mark of geometry.marks) {
      const k = geometry.cells.findIndex((b) => mark.x >= b.left && mark.x <= b.right && mark.y >= b.top && mark.y <= b.bottom);
      const c = cells[k]!;
      expect(c.column.role).toBe('value');
      expect(c.cell.mark).toBe(mark.role);
      const m = c.column.group;
      const complete = input.rows.filter((r) => !r.partial).map((r) => r.cells[m]!.value!);
      const value = input.rows[c.i]!.cells[m]!.value!;
      const higher = input.metrics[m]!.metric.higher_is_better;
      const wantsMax = (mark.role === 'best') === higher;
      expect(value).toBe(wantsMax ? Math.max(...complete) : Math.min(...complete));
      // The symbol and outline in the mark's colour, not colour alone.
      expect(countColour(img, mark.box!, hex(MARK_COLOUR[mark.role as 'best' | 'worst']), 30)).toBeGreaterThan(40 * scale * scale);
    }
  });

  it('hatches a partial period, with no change and no colour in it', async () => {
    const { img, geometry } = await render(spec);
    const cells = cellsOf(spec);
    const partial = cells.filter((c) => c.row.kind === 'partial');
    expect(partial.length).toBe(input.metrics.length * 3);
    for (const c of partial) {
      const box = geometry.cells[cells.indexOf(c)]!;
      expect(c.cell.mark).toBeNull();
      if (c.column.role === 'change') {
        expect(c.cell).toMatchObject({ text: '–', tone: null, direction: null });
        expect(countColour(img, box, hex(OKABE_ITO.blue), 60) + countColour(img, box, hex(OKABE_ITO.vermillion), 60)).toBe(0);
      }
    }
  });

  it('puts the totals row last, under a heavier rule, with no change cells', async () => {
    const last = spec.rows[spec.rows.length - 1]!;
    expect(last.kind).toBe('total');
    expect(last.cells.filter((c) => c.tone !== null || c.direction !== null || c.mark !== null)).toEqual([]);
    expect(last.cells[0]!.text).toBe(new Intl.NumberFormat('en-IE').format(input.total!.values[0]!));
    const { img, geometry } = await render(spec);
    const first = geometry.cells[cellsOf(spec).findIndex((c) => c.row === last)]!;
    // A dark rule across the table just above the totals row's cells.
    const band = { left: geometry.plot.left, top: first.top - 2.5 * scale, right: geometry.plot.right, bottom: first.top - 0.5 * scale };
    expect(countDark(img, band)).toBeGreaterThan(0.8 * (band.right - band.left));
  });
});

describe('pages', () => {
  it('splits 30 months into three images at year ends, each the same size, the totals row on the last', async () => {
    const input: PeriodTableInput = { ...periodTableInput({}, 4), grain: 'month' };
    const rows = Array.from({ length: 30 }, (_, i) => ({ ...input.rows[i % 3]!, period: addMonths('2023-01-01', i), partial: false, note: '' }));
    const pages = buildPeriodTablePages({ ...input, rows });
    expect(pages.map((p) => p.rows.length)).toEqual([12, 12, 7]);
    expect(pages.map((p) => p.rows.at(-1)!.kind)).toEqual(['period', 'period', 'total']);
    expect(new Set(pages.map((p) => `${p.width}x${p.height}`)).size).toBe(1);
    expect(pages[0]!.subtitle).toMatch(/^Page 1 of 3: Jan 2023 to Dec 2023; the whole period row is on page 3 · /);
    for (const p of pages) {
      const png = (await renderChartWithGeometry(p)).png;
      expect(pngSize(png)).toEqual({ width: p.width, height: p.height });
    }
  });

  it('draws at most MAX_PAGES pages of a long history, the latest, and says what is left to the CSV and which marks it holds', async () => {
    // A century of months (January 1929 to December 2046, 1,416 of them) would be 118 images.
    const input: PeriodTableInput = { ...periodTableInput({}, 4), grain: 'month' };
    const rows = Array.from({ length: 1416 }, (_, i) => {
      const period = addMonths('1929-01-01', i);
      const base = input.rows[i % 3]!;
      // Bookings' best month long ago, its worst among the months drawn.
      const mark = (k: number): 'best' | 'worst' | null => (k === 0 && period === '1972-03-01' ? 'best' : k === 0 && period === '2045-06-01' ? 'worst' : null);
      return { ...base, period, partial: false, note: '', cells: base.cells.map((c, k) => ({ ...c, mark: mark(k) })) };
    });
    const pages = buildPeriodTablePages({ ...input, rows });
    expect(pages).toHaveLength(MAX_PAGES);
    expect(pages.map((p) => p.rows.length)).toEqual([12, 12, 12, 13]);
    expect(pages[0]!.rows[0]!.label).toBe('Jan 2043');
    expect(pages.at(-1)!.rows.at(-1)!.kind).toBe('total');
    expect(pages[0]!.subtitle).toMatch(/^Latest months, page 1 of 4: Jan 2043 to Dec 2043; the whole period row is on page 4 · /);
    for (const p of pages) {
      expect(p.notes[0]).toBe(
        "Drawn: the latest 48 of 1,416 months (Jan 2043 to Dec 2046); the earlier 1,368 are in the attached CSV; the whole period row and the ★ and ✖ marks cover all of them. Marked among the earlier ones: Bookings' best (Mar 1972).",
      );
    }
    const png = (await renderChartWithGeometry(pages[0]!)).png;
    expect(pngSize(png)).toEqual({ width: pages[0]!.width, height: pages[0]!.height });
    // At MAX_PAGES pages or fewer nothing is cut and nothing is said about it.
    const four = buildPeriodTablePages({ ...input, rows: rows.slice(-48) });
    expect(four).toHaveLength(4);
    expect(four[0]!.subtitle).toMatch(/^Page 1 of 4: /);
    expect(four[0]!.notes.join(' ')).not.toMatch(/Drawn:/);
  });

  it('never puts more than PAGE_ROWS periods on a page, and balances the breaks', () => {
    const months = (n: number, from = '2023-01-01') => Array.from({ length: n }, (_, i) => addMonths(from, i));
    const sizes = (periods: string[], grain: Parameters<typeof pageRows>[1]) => pageRows(periods, grain).map((p) => p.to - p.from);
    expect(sizes(months(13), 'month')).toEqual([13]);
    expect(sizes(months(24), 'month')).toEqual([12, 12]);
    // Fourteen quarters: 8 and 6 at a year end rather than 12 and 2.
    expect(sizes(Array.from({ length: 14 }, (_, i) => addMonths('2022-01-01', 3 * i)), 'quarter')).toEqual([8, 6]);
    // A window starting in October: three months, then whole years.
    expect(sizes(months(27, '2022-10-01'), 'month')).toEqual([3, 12, 12]);
    expect(sizes(Array.from({ length: 40 }, (_, i) => `2024-01-${String(i + 1).padStart(2, '0')}`), 'day')).toEqual([10, 10, 10, 10]);
    for (const n of [1, 14, 26, 27, 40, 100]) {
      const s = sizes(months(n), 'month');
      expect(s.reduce((a, b) => a + b, 0)).toBe(n);
      expect(Math.max(...s)).toBeLessThanOrEqual(PAGE_ROWS);
    }
  });
});

describe('colour scale per column', () => {
  it('is the growth grid’s round domain for percent and points, and a round 90th percentile for units', () => {
    expect(domainOf('percent', [0.01, -0.03, 0.04, null])).toBe(0.05);
    expect(domainOf('points', [0.001, 0.002])).toBe(0.02);
    expect(domainOf('units', [0.3, -1.7, 2.2, 0.1, 0.4, 0.9, -0.2, 0.5, 1.1, 12])).toBe(2.5);
    expect(domainOf('units', [])).toBe(1);
  });
});

describe('degenerate tables', () => {
  it('draws no rows, one metric, or nothing but n/a without throwing', async () => {
    const input = periodTableInput({}, 4);
    const cases: PeriodTableInput[] = [
      { ...input, rows: [], total: null },
      { ...input, metrics: input.metrics.slice(0, 1), rows: input.rows.map((r) => ({ ...r, cells: r.cells.slice(0, 1) })), total: { label: 'Total', values: [1] } },
      { ...input, rows: input.rows.map((r) => ({ ...r, cells: r.cells.map(() => ({ value: null, vsPrevious: null, vsYearEarlier: null, mark: null })) })) },
      { ...input, title: 'A very long title '.repeat(10), notes: ['note '.repeat(200)] },
    ];
    for (const c of cases) {
      for (const spec of buildPeriodTablePages(c)) {
        const { png } = await renderChartWithGeometry(spec);
        expect(pngSize(png)).toEqual({ width: spec.width, height: spec.height });
      }
    }
  });
});
