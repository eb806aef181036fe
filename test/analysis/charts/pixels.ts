// Reads a rendered PNG back through an independent decoder (the canvas library's) and offers
// small pixel queries for checking that marks landed where the geometry says.
import { createCanvas, loadImage } from '@napi-rs/canvas';
import type { Box } from '../../../analysis/charts/geometry.js';

export interface Decoded {
  width: number;
  height: number;
  data: Uint8ClampedArray;
}

export type Rgb = [number, number, number];

export async function decodePng(png: Buffer): Promise<Decoded> {
  const image = await loadImage(png);
  const canvas = createCanvas(image.width, image.height);
  const ctx = canvas.getContext('2d');
  ctx.drawImage(image, 0, 0);
  const { data } = ctx.getImageData(0, 0, image.width, image.height);
  return { width: image.width, height: image.height, data };
}

/** Width and height from the PNG header (IHDR is always the first chunk). */
export function pngSize(png: Buffer): { width: number; height: number } {
  const signature = png.subarray(0, 8).toString('hex');
  if (signature !== '89504e470d0a1a0a' || png.subarray(12, 16).toString('ascii') !== 'IHDR') {
    throw new Error('not a PNG');
  }
  return { width: png.readUInt32BE(16), height: png.readUInt32BE(20) };
}

export function hex(colour: string): Rgb {
  const h = colour.replace('#', '');
  return [0, 2, 4].map((i) => parseInt(h.slice(i, i + 2), 16)) as Rgb;
}

export function pixel(img: Decoded, x: number, y: number): Rgb {
  const xi = Math.min(img.width - 1, Math.max(0, Math.round(x)));
  const yi = Math.min(img.height - 1, Math.max(0, Math.round(y)));
  const o = (yi * img.width + xi) * 4;
  return [img.data[o]!, img.data[o + 1]!, img.data[o + 2]!];
}

export function close(a: Rgb, b: Rgb, tolerance = 24): boolean {
  return Math.abs(a[0] - b[0]) <= tolerance && Math.abs(a[1] - b[1]) <= tolerance && Math.abs(a[2] - b[2]) <= tolerance;
}

/** How many pixels inside `box` are within `tolerance` of `colour`. */
export function countColour(img: Decoded, box: Box, colour: Rgb, tolerance = 24): number {
  let n = 0;
  for (let y = Math.max(0, Math.floor(box.top)); y < Math.min(img.height, Math.ceil(box.bottom)); y++) {
    for (let x = Math.max(0, Math.floor(box.left)); x < Math.min(img.width, Math.ceil(box.right)); x++) {
      if (close(pixel(img, x, y), colour, tolerance)) n++;
    }
  }
  return n;
}

export function around(x: number, y: number, r: number): Box {
  return { left: x - r, top: y - r, right: x + r + 1, bottom: y + r + 1 };
}

/** Pixels darker than a mid grey: text and dark strokes. */
export function countDark(img: Decoded, box: Box): number {
  let n = 0;
  for (let y = Math.max(0, Math.floor(box.top)); y < Math.min(img.height, Math.ceil(box.bottom)); y++) {
    for (let x = Math.max(0, Math.floor(box.left)); x < Math.min(img.width, Math.ceil(box.right)); x++) {
      const [r, g, b] = pixel(img, x, y);
      if (r + g + b < 3 * 90) n++;
    }
  }
  return n;
}

/** Distinct colours (quantised to 4 bits a channel) and the share of non-white pixels in `box`. */
export function richness(img: Decoded, box: Box): { colours: number; nonWhite: number } {
  const seen = new Set<number>();
  let nonWhite = 0;
  let total = 0;
  for (let y = Math.max(0, Math.floor(box.top)); y < Math.min(img.height, Math.ceil(box.bottom)); y += 1) {
    for (let x = Math.max(0, Math.floor(box.left)); x < Math.min(img.width, Math.ceil(box.right)); x += 1) {
      const [r, g, b] = pixel(img, x, y);
      seen.add(((r >> 4) << 8) | ((g >> 4) << 4) | (b >> 4));
      if (r < 245 || g < 245 || b < 245) nonWhite++;
      total++;
    }
  }
  return { colours: seen.size, nonWhite: total ? nonWhite / total : 0 };
}
