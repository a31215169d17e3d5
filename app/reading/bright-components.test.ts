// Connected components and candidate scoring on small synthetic masks.
import { describe, expect, it } from "vitest";
import { brightCandidates, components, kthLargestAbove, scoreCandidate } from "./bright-components";
import { parseChart } from "./chart";

const chart = parseChart({
  format: "strip-chart/1",
  strip: { widthMm: 5, lengthMm: 80, color: "#f4f3ef" },
  pads: [{ analyte: "ph", label: "pH", unit: "pH", centerMm: 5, sizeMm: 5, swatches: [{ value: 7, color: "#e08040" }, { value: 8, color: "#c04060" }] }],
});

function mask(w: number, h: number, rects: [number, number, number, number][]) {
  const m = new Float32Array(w * h);
  for (const [x0, y0, x1, y1] of rects) for (let y = y0; y < y1; y++) for (let x = x0; x < x1; x++) m[y * w + x] = 1;
  return m;
}

describe("components", () => {
  it("finds each rectangle with its centre, size and direction from the moments", () => {
    const m = mask(100, 60, [[10, 10, 70, 16], [80, 20, 86, 56]]);
    const cs = components(m, 0.5, 100, 60, 10).sort((a, b) => a.cx - b.cx);
    expect(cs).toHaveLength(2);
    const [h, v] = cs;
    expect(h.n).toBe(360);
    expect(h.cx).toBeCloseTo(39.5, 6);
    expect(h.cy).toBeCloseTo(12.5, 6);
    // A uniform rectangle's variance along a side of n px is (n² − 1)/12, so length ≈ √(n² − 1).
    expect(h.length).toBeCloseTo(Math.sqrt(60 * 60 - 1), 3);
    expect(h.width).toBeCloseTo(Math.sqrt(6 * 6 - 1), 3);
    expect(Math.abs(Math.sin(h.angle))).toBeLessThan(1e-6);
    expect(Math.abs(Math.cos(v.angle))).toBeLessThan(1e-6);
  });
  it("joins a U shape whose arms meet only at the bottom, and drops small specks", () => {
    const m = mask(50, 50, [[5, 5, 10, 40], [20, 5, 25, 40], [5, 40, 25, 45], [40, 40, 42, 42]]);
    const cs = components(m, 0.5, 50, 50, 10);
    expect(cs).toHaveLength(1);
    expect(cs[0].n).toBe(5 * 35 * 2 + 20 * 5);
  });
  it("gives the same components after a mask with thousands of specks (its labels' moments start afresh)", () => {
    const m = mask(100, 60, [[10, 10, 70, 16], [80, 20, 86, 56]]);
    const before = components(m, 0.5, 100, 60, 10);
    // A checkerboard: one label per bright pixel, more than the label store first holds.
    const specks = new Float32Array(200 * 200).map((_, i) => ((i % 200) + Math.floor(i / 200)) % 2);
    expect(components(specks, 0.5, 200, 200, 1)).toHaveLength(20000);
    expect(components(m, 0.5, 100, 60, 10)).toEqual(before);
  });
});

describe("scoreCandidate", () => {
  it("scores a strip-shaped rectangle and refuses a square or a thin ragged blob", () => {
    const strip = { cx: 0, cy: 0, angle: 0, length: 160, width: 10, score: 0, n: 1600 };
    const square = { ...strip, length: 40, width: 40 };
    const ragged = { ...strip, n: 600 };
    expect(scoreCandidate(strip, chart)).toBeGreaterThan(0);
    expect(scoreCandidate(square, chart)).toBe(0);
    expect(scoreCandidate(ragged, chart)).toBe(0);
  });
});

describe("brightCandidates", () => {
  it("ranks a bright strip on a darker surface first", () => {
    const w = 200, h = 120, whiteness = new Float32Array(w * h).fill(0.2);
    for (let y = 55; y < 63; y++) for (let x = 30; x < 160; x++) whiteness[y * w + x] = 0.8;
    const [best] = brightCandidates({ w, h, factor: 1, whiteness }, chart, 16);
    expect(best.cx).toBeCloseTo(94.5, 0);
    expect(best.cy).toBeCloseTo(58.5, 0);
    expect(best.length).toBeGreaterThan(120);
  });
});

describe("kthLargestAbove", () => {
  it("agrees with a full sort (the definition of the k-th largest) on random values", () => {
    let seed = 7;
    const rnd = () => ((seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31) * 3;
    const values = Float32Array.from({ length: 5000 }, rnd);
    const above = [...values].filter((v) => v > 1).sort((a, b) => b - a);
    for (const k of [1, 5, 150, above.length]) expect(kthLargestAbove(values, 1, k)).toBe(above[k - 1]);
  });
  it("is NaN when fewer than k values lie above the floor", () => {
    expect(kthLargestAbove(Float32Array.from([0.5, 2, 3]), 1, 3)).toBeNaN();
  });
});
