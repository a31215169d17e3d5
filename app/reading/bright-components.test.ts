// Connected components and candidate scoring on small synthetic masks.
import { describe, expect, it } from "vitest";
import { brightCandidates, components, componentsOfRuns, kthLargestAbove, runsAbove, scoreCandidate, type Runs } from "./bright-components";
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

/** Components by a plain flood fill (4-connected), each as [pixel count, Σx, Σy, Σx², Σy², Σxy]. */
function floodFill(values: Float32Array, t: number, w: number, h: number): number[][] {
  const seen = new Uint8Array(w * h), out: number[][] = [];
  for (let i = 0; i < w * h; i++) {
    if (seen[i] || !(values[i] > t)) continue;
    const m = [0, 0, 0, 0, 0, 0], stack = [i];
    seen[i] = 1;
    while (stack.length) {
      const j = stack.pop()!, x = j % w, y = (j - x) / w;
      m[0]++, (m[1] += x), (m[2] += y), (m[3] += x * x), (m[4] += y * y), (m[5] += x * y);
      for (const [nx, ny] of [[x - 1, y], [x + 1, y], [x, y - 1], [x, y + 1]])
        if (nx >= 0 && ny >= 0 && nx < w && ny < h && !seen[ny * w + nx] && values[ny * w + nx] > t) (seen[ny * w + nx] = 1), stack.push(ny * w + nx);
    }
    out.push(m);
  }
  return out;
}

describe("components against a flood fill", () => {
  it("finds the same components with the same moments on random masks (spirals, combs and specks included)", () => {
    let seed = 12345;
    const rand = () => ((seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31);
    for (let trial = 0; trial < 20; trial++) {
      const w = 20 + Math.floor(rand() * 60), h = 10 + Math.floor(rand() * 50);
      // Smooth-ish random values so that components of many shapes appear at each threshold.
      const v = new Float32Array(w * h).map(() => rand());
      for (let pass = 0; pass < trial % 3; pass++) for (let i = 1; i < w * h; i++) v[i] = (v[i] + v[i - 1] + (i >= w ? v[i - w] : 0)) / (i >= w ? 3 : 2);
      const t = 0.35 + rand() * 0.3;
      const ref = floodFill(v, t, w, h);
      const got = components(v, t, w, h, 1);
      expect(got.length).toBe(ref.length);
      // Raster order of each component's first pixel, as the flood fill finds them.
      got.forEach((c, k) => {
        const [n, sx, sy] = ref[k];
        expect(c.n).toBe(n);
        expect(c.cx).toBeCloseTo(sx / n, 9);
        expect(c.cy).toBeCloseTo(sy / n, 9);
      });
    }
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

describe("runsAbove within a lower level's runs", () => {
  it("gives the same runs as a scan of every row, level after level, and the same components", () => {
    let seed = 777;
    const rand = () => ((seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31);
    for (let trial = 0; trial < 10; trial++) {
      const w = 15 + Math.floor(rand() * 70), h = 8 + Math.floor(rand() * 40);
      const v = new Float32Array(w * h).map(() => rand());
      for (let pass = 0; pass < trial % 3; pass++) for (let i = 1; i < w * h; i++) v[i] = (v[i] + v[i - 1]) / 2;
      let below: Runs | undefined;
      for (const t of [0.2, 0.35, 0.5, 0.6, 0.8]) {
        const alone = runsAbove(v, t, w, h);
        below = runsAbove(v, t, w, h, below);
        expect([...below.rowStart]).toEqual([...alone.rowStart]);
        expect([...below.x.subarray(0, 2 * below.rowStart[h])]).toEqual([...alone.x.subarray(0, 2 * alone.rowStart[h])]);
        expect(below.pixels).toBe(alone.pixels);
        expect(componentsOfRuns(below, 1)).toEqual(components(v, t, w, h, 1));
      }
    }
  });
});
