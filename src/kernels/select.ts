/**
 * The k-th smallest value of an array (0-based), in expected linear time: Hoare's selection
 * ("FIND", CACM 1961) with median-of-three pivots, on a scratch copy so the input is untouched.
 * Replaces sorting where only a median is needed (thousands of values per frame).
 */
export function selectKth(values: ArrayLike<number>, k: number, scratch?: Float64Array): number {
  const n = values.length;
  const a = scratch && scratch.length >= n ? scratch : new Float64Array(n);
  for (let i = 0; i < n; i++) a[i] = values[i];
  let lo = 0, hi = n - 1;
  while (hi > lo) {
    const mid = (lo + hi) >> 1;
    // Median of three as the pivot, moved to hi.
    if (a[mid] < a[lo]) swap(a, mid, lo);
    if (a[hi] < a[lo]) swap(a, hi, lo);
    if (a[mid] < a[hi]) swap(a, mid, hi);
    const pivot = a[hi];
    let i = lo;
    for (let j = lo; j < hi; j++) if (a[j] < pivot) swap(a, i++, j);
    swap(a, i, hi);
    if (i === k) return a[i];
    if (i < k) lo = i + 1;
    else hi = i - 1;
  }
  return a[k];
}

function swap(a: Float64Array, i: number, j: number): void {
  const t = a[i];
  a[i] = a[j];
  a[j] = t;
}

/** The upper median (the value at index floor(n/2) of the sorted array), as sorting would give. */
export const upperMedian = (values: ArrayLike<number>, scratch?: Float64Array): number => selectKth(values, values.length >> 1, scratch);
