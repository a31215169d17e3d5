// Small robust statistics shared by the engine.

/** Median of a list (NaN for an empty list). */
export function median(a: readonly number[]): number {
  if (!a.length) return NaN;
  // A typed copy sorts numerically without a comparator call per step.
  const s = Float64Array.from(a).sort();
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}
