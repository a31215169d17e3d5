// Small robust statistics shared by the engine.

/** Median of a list (NaN for an empty list). */
export function median(a: readonly number[]): number {
  if (!a.length) return NaN;
  // A typed copy sorts numerically without a comparator call per step.
  const s = Float64Array.from(a).sort();
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/**
 * The q-quantile of a list, interpolated between the two nearest ranks (as on the sorted list),
 * found by selection on a copy: no full sort.
 */
export function quantileOf(values: Float32Array, q: number): number {
  const n = values.length;
  if (n === 0) return NaN;
  const a = Float32Array.from(values);
  const p = q * (n - 1);
  const i = Math.floor(p), f = p - i;
  select(a, i);
  if (i + 1 >= n) return a[i];
  // The next rank is the smallest value right of the selected one.
  let next = Infinity;
  for (let k = i + 1; k < n; k++) if (a[k] < next) next = a[k];
  return a[i] * (1 - f) + next * f;
}

/** Reorders `a` so that a[k] is the value of rank k, smaller ones before it and larger after (quickselect). */
function select(a: Float32Array, k: number) {
  let lo = 0, hi = a.length - 1;
  while (hi > lo) {
    // Median of three as the pivot.
    const mid = (lo + hi) >> 1;
    const x = a[lo], y = a[mid], z = a[hi];
    const pivot = x < y ? (y < z ? y : x < z ? z : x) : x < z ? x : y < z ? z : y;
    let i = lo, j = hi;
    while (i <= j) {
      while (a[i] < pivot) i++;
      while (a[j] > pivot) j--;
      if (i <= j) {
        const t = a[i];
        a[i++] = a[j];
        a[j--] = t;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return;
  }
}
