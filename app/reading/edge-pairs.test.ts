// Candidates from pairs of parallel edges, on a search copy where the strip's blob merges with
// a bright patch beside it (so that thresholded components cannot separate it).
import { describe, expect, it } from "vitest";
import { parseChart } from "./chart";
import { edgePairCandidates } from "./edge-pairs";

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
