// Unit tests of the log and blur passes the edge search runs on the search copy.
import { describe, expect, it } from "vitest";
import { boxBlur3, logBlur3, logInto } from "./log-blur";

describe("boxBlur3", () => {
  it("spreads a single spike evenly over its 3 × 3 neighbourhood", () => {
    const a = new Float32Array(25);
    a[12] = 9;
    boxBlur3(a, 5, 5);
    expect(a[12]).toBeCloseTo(1, 6);
    expect(a[6]).toBeCloseTo(1, 6);
    expect(a[0]).toBe(0);
  });
  it("averages the pixels inside the image at the borders and corners, on rows and columns of one pixel too", () => {
    // 3 × 2: corner (0,0) averages its 2 × 2, an edge pixel its 3 × 2.
    const a = Float32Array.from([1, 2, 3, 4, 5, 6]);
    boxBlur3(a, 3, 2);
    expect(a[0]).toBeCloseTo((1 + 2 + 4 + 5) / 4, 6);
    expect(a[1]).toBeCloseTo((1 + 2 + 3 + 4 + 5 + 6) / 6, 6);
    const row = Float32Array.from([3, 6, 9]);
    boxBlur3(row, 3, 1);
    expect([...row]).toEqual([4.5, 6, 7.5]);
    const col = Float32Array.from([3, 6, 9]);
    boxBlur3(col, 1, 3);
    expect([...col]).toEqual([4.5, 6, 7.5]);
  });
});

describe("logBlur3", () => {
  it("gives the blur of the logarithms exactly, as logInto then boxBlur3 do", () => {
    for (const [w, h] of [[1, 1], [1, 4], [5, 1], [7, 5], [40, 30]]) {
      const src = new Float32Array(w * h).map((_, i) => 0.002 + ((i * 7919) % 1000) / 1000);
      const a = new Float32Array(w * h), b = new Float32Array(w * h);
      logInto(src, a);
      boxBlur3(a, w, h);
      logBlur3(src, w, h, b);
      expect([...b]).toEqual([...a]);
    }
  });
});

describe("logInto", () => {
  it("gives Math.log's values to within float32's rounding, over the whiteness range and beyond", () => {
    const src = new Float32Array(20001), out = new Float32Array(src.length);
    for (let i = 0; i < src.length; i++) src[i] = 0.001 * Math.pow(2000, i / (src.length - 1)); // 0.001 … 2
    logInto(src, out);
    for (let i = 0; i < src.length; i++) expect(Math.abs(out[i] - Math.fround(Math.log(src[i])))).toBeLessThan(1e-6);
    logInto(Float32Array.from([1, Math.E, 0.5]), out);
    expect(out[0]).toBe(0);
    expect(out[1]).toBeCloseTo(1, 6);
    expect(out[2]).toBeCloseTo(-Math.LN2, 7);
  });
});
