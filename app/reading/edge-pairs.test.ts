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
});
