// Where things landed on the image, in device pixels; tests and debugging read this.
export interface Point {
  x: number;
  y: number;
}

export interface Box {
  left: number;
  top: number;
  right: number;
  bottom: number;
}

export interface PlacedMark extends Point {
  role: string;
  /** The mark's text label, when it has one. */
  box?: Box;
  /** The label's text and font size (device pixels), where tests read the ink back. */
  text?: string;
  fontSize?: number;
}

export interface PlacedLine {
  role: string;
  x1: number;
  y1: number;
  x2: number;
  y2: number;
}

export interface ChartGeometry {
  /** Image size in device pixels (layout size × scale). */
  width: number;
  height: number;
  /** The data area (inside the axes). */
  plot: Box;
  /** The main data elements: line points, bar ends, grid cell centres. */
  points: Point[];
  marks: PlacedMark[];
  lines: PlacedLine[];
  /** Grid cells, row-major (growth grid), card tiles (KPI card), or the bars (Pareto, bars). */
  cells: Box[];
  /** The value axis's range, in data units, where the chart has one (lines, bars, intervals). */
  valueAxis?: { min: number; max: number };
}

export function emptyGeometry(width: number, height: number, plot: Box): ChartGeometry {
  return { width, height, plot, points: [], marks: [], lines: [], cells: [] };
}

export function scaleBox(box: Box, s: number): Box {
  return { left: box.left * s, top: box.top * s, right: box.right * s, bottom: box.bottom * s };
}

export function scalePoint(p: Point, s: number): Point {
  return { x: p.x * s, y: p.y * s };
}

export interface DrawResult {
  geometry: ChartGeometry;
  /** Frees what drawing held (a chart.js instance); call after the pixels are read. */
  release: () => void;
}
