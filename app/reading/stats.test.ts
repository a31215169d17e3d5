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
});
