// The house look: Okabe–Ito hues (Okabe & Ito 2008, colour-blind safe) on white, one font.
export const OKABE_ITO = {
  black: '#000000',
  orange: '#E69F00',
  skyBlue: '#56B4E9',
  bluishGreen: '#009E73',
  yellow: '#F0E442',
  blue: '#0072B2',
  vermillion: '#D55E00',
  reddishPurple: '#CC79A7',
} as const;

/** Neutral greys for text and chart furniture (not data). */
export const INK = {
  title: '#16191D',
  text: '#3A4148',
  muted: '#67707A',
  axis: '#B4BBC3',
  grid: '#E7EAEE',
  other: '#A9B1B9',
  na: '#EDEFF2',
  background: '#FFFFFF',
} as const;

/**
 * The header's own marks: a pale chip with dark blue text naming the metric (contrast about 8:1,
 * readable without colour vision), and the grey hairline that closes the header.
 */
export const CHIP = { fill: '#EAF3FA', edge: '#B9D6EC', text: '#0B4A75', rule: '#C3CAD1' } as const;

/** Good news is blue, bad news vermillion: distinguishable without red–green vision. */
export const SENTIMENT = { good: OKABE_ITO.blue, bad: OKABE_ITO.vermillion, neutral: INK.muted } as const;

export const FONT_FAMILY = 'DejaVu Sans';

export function font(size: number, bold = false): string {
  return `${bold ? 'bold ' : ''}${round1(size)}px "${FONT_FAMILY}"`;
}

/**
 * Layout unit: 1 at the default 1200×675. It grows and shrinks more slowly than the image
 * (power 0.6), so text on a small chart stays legible instead of shrinking in proportion.
 */
export function layoutUnit(width: number, height: number): number {
  const raw = Math.min(width / 1200, height / 675);
  return Math.min(2.5, Math.max(0.55, Math.pow(raw, 0.6)));
}

function round1(n: number): number {
  return Math.round(n * 10) / 10;
}
