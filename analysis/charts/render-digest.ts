// The one-page digest: the key takeaways and up to four charts on a single image, for
// forwarding in one piece. Charts arrive as PNGs already rendered; nothing is queried.
import { createCanvas, loadImage } from '@napi-rs/canvas';
import { ensureFonts } from './fonts.js';
import { encodePng } from './png.js';
import { drawChart } from './render.js';
import type { ChartSpec } from './spec.js';
import { ellipsize, wrapText } from './text.js';
import { CHIP, INK, font } from './theme.js';

export interface DigestInput {
  title: string;
  subtitle: string;
  /**
   * In the order to read them; each is one or two sentences. No pointer back to the thread: a
   * forwarded image cannot follow one.
   */
  takeaways: { text: string }[];
  /**
   * Up to four charts. With its spec, a chart is drawn again at thumbnail size (text then keeps a
   * readable size instead of shrinking with the picture); otherwise the PNG is scaled down.
   */
  charts: { png: Buffer; spec?: ChartSpec }[];
  footer: string;
}

const WIDTH = 1600;
const MARGIN = 48;
const CHART_W = (WIDTH - MARGIN * 3) / 2;
const CHART_H = Math.round((CHART_W * 675) / 1200);

export async function renderDigest(input: DigestInput): Promise<Buffer> {
  ensureFonts();
  const measure = createCanvas(10, 10).getContext('2d');
  measure.font = font(22);
  const lines = input.takeaways.slice(0, 5).flatMap((t, i) => wrapText(measure, `${i + 1}. ${t.text}`, WIDTH - MARGIN * 2 - 20, 3));
  // The title is a finding, often a long sentence: up to two lines.
  measure.font = font(40, true);
  const titleLines = wrapText(measure, input.title, WIDTH - MARGIN * 2, 2);
  const fitted = (text: string, f: string) => {
    measure.font = f;
    return ellipsize(measure, text, WIDTH - MARGIN * 2);
  };
  const charts = input.charts.slice(0, 4);
  const rows = Math.ceil(charts.length / 2);
  const titleH = titleLines.length * 50;
  const headerH = 100 + titleH;
  const takeawaysH = lines.length > 0 ? 40 + lines.length * 32 : 0;
  const height = headerH + takeawaysH + rows * (CHART_H + MARGIN) + 70;
  const canvas = createCanvas(WIDTH, height);
  const ctx = canvas.getContext('2d');
  ctx.fillStyle = INK.background;
  ctx.fillRect(0, 0, WIDTH, height);

  ctx.fillStyle = INK.title;
  ctx.font = font(40, true);
  titleLines.forEach((line, i) => ctx.fillText(line, MARGIN, 72 + i * 50));
  ctx.fillStyle = INK.text;
  ctx.font = font(22);
  ctx.fillText(fitted(input.subtitle, font(22)), MARGIN, 60 + titleH);
  // The same closing hairline as every chart's header.
  const ruleY = Math.round(84 + titleH) + 0.5;
  ctx.strokeStyle = CHIP.rule;
  ctx.lineWidth = 1;
  ctx.beginPath();
  ctx.moveTo(MARGIN, ruleY);
  ctx.lineTo(WIDTH - MARGIN, ruleY);
  ctx.stroke();

  let y = headerH + 20;
  if (lines.length > 0) {
    ctx.fillStyle = INK.title;
    ctx.font = font(24, true);
    ctx.fillText('Also found', MARGIN, y);
    y += 36;
  }
  ctx.font = font(22);
  ctx.fillStyle = INK.text;
  for (const line of lines) {
    ctx.fillText(line, MARGIN + 10, y);
    y += 32;
  }
  y += 10;
  for (const [i, chart] of charts.entries()) {
    const x = MARGIN + (i % 2) * (CHART_W + MARGIN);
    const top = y + Math.floor(i / 2) * (CHART_H + MARGIN);
    if (chart.spec) {
      const drawn = thumbnail(chart.spec);
      try {
        ctx.drawImage(drawn.canvas, x, top, CHART_W, CHART_H);
      } finally {
        drawn.release();
      }
    } else ctx.drawImage(await loadImage(chart.png), x, top, CHART_W, CHART_H);
    ctx.strokeStyle = INK.grid;
    ctx.lineWidth = 1;
    ctx.strokeRect(x + 0.5, top + 0.5, CHART_W - 1, CHART_H - 1);
  }
  ctx.fillStyle = INK.muted;
  ctx.font = font(18);
  ctx.fillText(fitted(input.footer, font(18)), MARGIN, height - 28);
  return encodePng(canvas.data(), canvas.width, canvas.height);
}

/** The chart laid out for the digest's slot, at the slot's own pixels: drawn once, never resampled. */
function thumbnail(spec: ChartSpec): ReturnType<typeof drawChart> {
  return drawChart({ ...spec, width: CHART_W, height: CHART_H, scale: 1 } as ChartSpec);
}
