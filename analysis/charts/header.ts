import type { ChartHeader } from './spec.js';

/** Copies the header fields out of a builder's input, so specs never share arrays with callers. */
export function headerOf(input: ChartHeader): ChartHeader {
  return {
    title: input.title,
    ...(input.chip ? { chip: input.chip } : {}),
    subtitle: input.subtitle,
    footer: [...input.footer],
    width: input.width,
    height: input.height,
    scale: input.scale,
  };
}

/** Short month names in the locale ("Jan" … "Dec"), from calendar dates in UTC. */
const monthNameCache = new Map<string, string[]>();

export function monthNames(locale: string): string[] {
  const cached = monthNameCache.get(locale);
  if (cached) return cached.slice();
  let df: Intl.DateTimeFormat;
  try {
    df = new Intl.DateTimeFormat(locale, { month: 'short', timeZone: 'UTC' });
  } catch {
    df = new Intl.DateTimeFormat('en', { month: 'short', timeZone: 'UTC' });
  }
  const names = Array.from({ length: 12 }, (_, m) => df.format(new Date(Date.UTC(2001, m, 1))));
  monthNameCache.set(locale, names);
  return names.slice();
}
