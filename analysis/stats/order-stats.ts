// Order statistics shared by the stats families: selection instead of full sorts where it pays.

/** Rearranges `a` in place so a[k] holds the k-th smallest value (Hoare's quickselect, median-of-three pivot). */
export function selectInPlace(a: Float64Array, k: number, lo = 0, hi = a.length - 1): number {
  let left = lo;
  let right = hi;
  while (left < right) {
    const mid = (left + right) >>> 1;
    // Median-of-three keeps sorted and reverse-sorted input (common for time series) away from O(n^2).
    if (a[mid]! < a[left]!) swap(a, mid, left);
    if (a[right]! < a[left]!) swap(a, right, left);
    if (a[right]! < a[mid]!) swap(a, right, mid);
    const pivot = a[mid]!;
    let i = left;
    let j = right;
    while (i <= j) {
      while (a[i]! < pivot) i++;
      while (a[j]! > pivot) j--;
      if (i <= j) {
        swap(a, i, j);
        i++;
        j--;
      }
    }
    if (k <= j) right = j;
    else if (k >= i) left = i;
    else break;
  }
  return a[k]!;
}

/** Median of a buffer, reordering it in place; NaN for an empty buffer (callers guard). */
export function medianInPlace(a: Float64Array, length = a.length): number {
  if (length === 0) return Number.NaN;
  const half = length >>> 1;
  const upper = selectInPlace(a, half, 0, length - 1);
  if (length % 2 === 1) return upper;
  // After selection everything left of `half` is <= upper, so the lower middle is their maximum.
  let lower = a[0]!;
  for (let i = 1; i < half; i++) if (a[i]! > lower) lower = a[i]!;
  return lower + (upper - lower) / 2;
}

/** Median of finite numbers without touching the input; null when empty. */
export function median(values: readonly number[]): number | null {
  if (values.length === 0) return null;
  return medianInPlace(Float64Array.from(values));
}

/** Quantile by linear interpolation between order statistics (Hyndman & Fan 1996 type 7); `sorted` must be ascending. */
export function quantileSorted(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) return Number.NaN;
  const h = (n - 1) * Math.min(1, Math.max(0, p));
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  const a = sorted[lo]!;
  return a + (h - lo) * (sorted[hi]! - a);
}

function swap(a: Float64Array, i: number, j: number): void {
  const t = a[i]!;
  a[i] = a[j]!;
  a[j] = t;
}
