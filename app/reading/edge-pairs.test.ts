// Candidates from pairs of parallel edges, on a search copy where the strip's blob merges with
// a bright patch beside it (so that thresholded components cannot separate it).
import { describe, expect, it } from "vitest";
import { parseChart } from "./chart";
import { boxBlur3, edgePairCandidates, logBlur3, logInto } from "./edge-pairs";

const chart = parseChart({
  format: "strip-chart/1",
  strip: { widthMm: 5, lengthMm: 80, color: "#f4f3ef" },
  pads: [{ analyte: "ph", label: "pH", unit: "pH", centerMm: 5, sizeMm: 5, swatches: [{ value: 7, color: "#e08040" }, { value: 8, color: "#c04060" }] }],
});

describe("edgePairCandidates", () => {
  it("finds a bright band by its two long edges, with its width and direction", () => {
    const w = 240, h = 160, whiteness = new Float32Array(w * h).fill(0.5);
    // A band 8 px wide along x at y 76–84, x 40–200, and a bright patch touching it from above.
    for (let y = 76; y < 84; y++) for (let x = 40; x < 200; x++) whiteness[y * w + x] = 0.9;
    for (let y = 30; y < 76; y++) for (let x = 60; x < 90; x++) whiteness[y * w + x] = 0.9;
    const cands = edgePairCandidates({ w, h, factor: 1, whiteness }, chart);
    const band = cands.find((c) => Math.abs(c.cy - 80) < 2 && Math.abs(Math.sin(c.angle)) < 0.05);
    expect(band).toBeDefined();
    expect(band!.width).toBeGreaterThan(6);
    expect(band!.width).toBeLessThan(10);
    expect(band!.length).toBeGreaterThan(120);
  });
  it("finds the same candidates after a larger search copy was searched (nothing of it is left behind)", () => {
    const band = (w: number, h: number) => {
      const whiteness = new Float32Array(w * h).fill(0.5);
      for (let y = 76; y < 84; y++) for (let x = 40; x < 200; x++) whiteness[y * w + x] = 0.9;
      return { w, h, factor: 1, whiteness };
    };
    const before = edgePairCandidates(band(240, 160), chart);
    const big = band(400, 300);
    for (let i = 0; i < big.whiteness.length; i += 7) big.whiteness[i] = 0.95; // edges everywhere
    edgePairCandidates(big, chart);
    expect(edgePairCandidates(band(240, 160), chart)).toEqual(before);
  });
});

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

describe("edgePairCandidates on a textured surface", () => {
  it("finds a strip only slightly darker than a woven surface", () => {
    // Weave: a checker of ±4 % in whiteness; the band is 10 % darker than the surface.
    const w = 240, h = 160, whiteness = new Float32Array(w * h);
    for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) whiteness[y * w + x] = 0.6 * ((x + y) % 2 ? 1.04 : 0.96);
    const a = (-20 * Math.PI) / 180, ux = Math.cos(a), uy = Math.sin(a);
    for (let y = 0; y < h; y++)
      for (let x = 0; x < w; x++) {
        const dx = x - 120, dy = y - 80, t = dx * ux + dy * uy, s = -dx * uy + dy * ux;
        if (Math.abs(t) < 90 && Math.abs(s) < 4) whiteness[y * w + x] *= 0.9;
      }
    const cands = edgePairCandidates({ w, h, factor: 1, whiteness }, chart);
    const band = cands.find((c) => Math.abs(-(c.cx - 120) * uy + (c.cy - 80) * ux) < 1.5 && Math.hypot(c.cx - 120, c.cy - 80) < 15 && Math.abs(Math.sin(c.angle - a)) < 0.05);
    expect(band).toBeDefined();
  });
});

describe("edgePairCandidates across the wrap of directions", () => {
  it("finds a band upright or a degree or two off it, whose edges' votes wrap round 0° and 180°", () => {
    // A bright band upright or a degree or two off: its long edges' gradients lie within a step or
    // two of 0° (180°), where some of their votes pass that end and land at the other, each at the
    // line's offset in its own row (a vote at the mirrored offset would split the line in two).
    for (const tilt of [-2, -1, 0, 1, 2]) {
      const w = 200, h = 240, whiteness = new Float32Array(w * h).fill(0.3);
      const a = ((90 + tilt) * Math.PI) / 180, ux = Math.cos(a), uy = Math.sin(a);
      for (let y = 0; y < h; y++)
        for (let x = 0; x < w; x++) {
          const dx = x - 100, dy = y - 120, t = dx * ux + dy * uy, s = -dx * uy + dy * ux;
          if (Math.abs(t) < 95 && Math.abs(s) < 6) whiteness[y * w + x] = 0.8;
        }
      const cands = edgePairCandidates({ w, h, factor: 1, whiteness }, chart);
      const band = cands.find((c) => Math.hypot(c.cx - 100, c.cy - 120) < 10 && Math.abs(Math.sin(c.angle - a)) < 0.05 && Math.abs(c.width - 12) <= 2);
      expect(band, `tilt ${tilt}°`).toBeDefined();
      expect(band!.length).toBeGreaterThan(150);
    }
  });
});
