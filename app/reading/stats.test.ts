// Median and quantiles against their definitions on the sorted list.
import { describe, expect, it } from "vitest";
import { median, quantileOf } from "./stats";

/** The q-quantile as the sorted list gives it, interpolated between neighbouring ranks (the definition). */
function bySort(values: Float32Array, q: number) {
  const s = Float32Array.from(values).sort();
  const p = q * (s.length - 1), i = Math.floor(p), f = p - i;
  return i + 1 < s.length ? s[i] * (1 - f) + s[i + 1] * f : s[i];
}

describe("quantileOf", () => {
  it("equals the sorted list's quantile on random lists with ties, odd and even lengths", () => {
    let seed = 11;
    const rnd = () => (seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31;
    for (const n of [1, 2, 3, 10, 101, 1000]) {
      const values = Float32Array.from({ length: n }, () => Math.round(rnd() * 50) / 7);
      for (const q of [0, 0.25, 0.5, 0.75, 1]) expect(quantileOf(values, q)).toBe(bySort(values, q));
    }
  });
  it("leaves its input as it was, and is NaN for an empty list", () => {
    const values = Float32Array.from([3, 1, 2]);
    expect(quantileOf(values, 0.5)).toBe(2);
    expect([...values]).toEqual([3, 1, 2]);
    expect(quantileOf(new Float32Array(0), 0.5)).toBeNaN();
  });
});

describe("median", () => {
  it("is the middle value, or the mean of the two middle values", () => {
    expect(median([5, 1, 3])).toBe(3);
    expect(median([4, 1, 3, 2])).toBe(2.5);
    expect(median([])).toBeNaN();
  });
  it("equals the sorted list's middle on random lists with ties, odd and even lengths, NaN and infinities", () => {
    let seed = 23;
    const rnd = () => (seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31;
    for (let t = 0; t < 300; t++) {
      const n = 1 + Math.floor(rnd() * 40);
      const a = Array.from({ length: n }, () => (rnd() < 0.3 ? Math.floor(rnd() * 4) : rnd() * 10 - 5));
      if (t % 10 === 0) a[0] = NaN;
      if (t % 7 === 0) a[n - 1] = -Infinity;
      const s = Float64Array.from(a).sort(), m = n >> 1;
      expect(median(a)).toBe(n % 2 ? s[m] : (s[m - 1] + s[m]) / 2);
    }
  });
});
