// Small robust statistics shared by the engine.

/** Median of a list (NaN for an empty list). */
export function median(a: readonly number[]): number {
  const n = a.length;
  if (!n) return NaN;
  const s = Float64Array.from(a);
  const m = n >> 1;
  for (let i = 0; i < n; i++)
    if (s[i] !== s[i]) {
      // NaN among them: the sorted list's middle, as a sort orders them (NaN last).
      s.sort();
      return n % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
    }
  // By selection (no full sort): the value of rank m, and for an even count the largest below it.
  select(s, m);
  if (n % 2) return s[m];
  let below = -Infinity;
  for (let k = 0; k < m; k++) if (s[k] > below) below = s[k];
  return (below + s[m]) / 2;
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
export function select(a: Float32Array | Float64Array, k: number) {
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
