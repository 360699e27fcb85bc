/**
 * The k-th smallest value of an array (0-based), in expected linear time: Hoare's selection
 * ("FIND", CACM 1961) with median-of-three pivots and a three-way partition, on a scratch copy
 * so the input is untouched.
 * Replaces sorting where only a median is needed (thousands of values per frame).
 */
export function selectKth(values: ArrayLike<number>, k: number, scratch?: Float64Array): number {
  const n = values.length;
  const a = scratch && scratch.length >= n ? scratch : new Float64Array(n);
  for (let i = 0; i < n; i++) a[i] = values[i];
  let lo = 0, hi = n - 1;
  while (hi > lo) {
    const pivot = medianOf3(a[lo], a[(lo + hi) >> 1], a[hi]);
    // Three-way partition (Dijkstra's "Dutch national flag"): a[lo..lt-1] < pivot,
    // a[lt..gt] = pivot, a[gt+1..hi] > pivot. Values equal to the pivot are settled at once, so
    // many ties (identical frames, flat regions, clipped pixels) cost linear time; a two-way
    // partition took quadratic time on them (80 ms instead of 2.5 ms for a gain fit of two
    // identical 320x180 frames).
    let lt = lo, i = lo, gt = hi;
    while (i <= gt) {
      const v = a[i];
      if (v < pivot) {
        a[i++] = a[lt];
        a[lt++] = v;
      } else if (v > pivot) {
        a[i] = a[gt];
        a[gt--] = v;
      } else i++;
    }
    if (k < lt) hi = lt - 1;
    else if (k > gt) lo = gt + 1;
    else return pivot;
  }
  return a[k];
}

function medianOf3(x: number, y: number, z: number): number {
  if (x < y) return y < z ? y : x < z ? z : x;
  return x < z ? x : y < z ? z : y;
}

/** The upper median (the value at index floor(n/2) of the sorted array), as sorting would give. */
export const upperMedian = (values: ArrayLike<number>, scratch?: Float64Array): number => selectKth(values, values.length >> 1, scratch);

/** The median of a short list of numbers (sorted copy; the mean of the middle two for an even
 *  count; NaN for none). */
export function median(v: readonly number[]): number {
  if (!v.length) return NaN;
  const s = [...v].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}
