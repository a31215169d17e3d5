// The strip's two long edges as the lines most cross-sections agree on, on small synthetic
// sections: a faint straight edge wins over stronger steps that only some sections show.
import { describe, expect, it } from "vitest";
import { consensusEdges, type EdgeSections } from "./edge-consensus";

/** Sections of n samples 1 px apart (range n/2), with a step of `size` at s = edge(t) for each edge. */
function sections(ts: number[], n: number, edges: { at: (t: number) => number; size: number; only?: (k: number) => boolean }[]): EdgeSections {
  const range = (n - 1) / 2;
  const grads = ts.map((t, k) => {
    const g = new Float64Array(n);
    for (const e of edges) {
      if (e.only && !e.only(k)) continue;
      // A step as the colour steps show it: a triangle a few samples wide.
      const c = e.at(t) + range;
      for (let i = Math.floor(c - 3); i <= Math.ceil(c + 3); i++) g[i] += e.size * Math.max(0, 1 - Math.abs(i - c) / 3);
    }
    return g;
  });
  return { ts, grads, ds: 1, range };
}

const ts = [-60, -45, -30, -15, 0, 15, 30, 45, 60];

describe("consensusEdges", () => {
  it("finds two parallel edges at a slope and the width between them", () => {
    const sec = sections(ts, 81, [
      { at: (t) => -10 + 0.05 * t, size: 0.2 },
      { at: (t) => 12 + 0.05 * t, size: 0.05 },
    ]);
    const lines = consensusEdges(sec, 20, 8, 44, 0.07, 1)!;
    expect(lines.q).toBeCloseTo(0.05, 2);
    // To a sample: each section's own step is then looked for near these lines.
    expect(Math.abs(lines.pL + 10)).toBeLessThanOrEqual(1);
    expect(Math.abs(lines.pR - 12)).toBeLessThanOrEqual(1);
  });
  it("keeps a faint edge every section shows over a strong step in a few sections (the pads)", () => {
    const sec = sections(ts, 81, [
      { at: () => -10, size: 0.2 },
      { at: () => 11, size: 0.03 },
      { at: () => 25, size: 0.4, only: (k) => k >= 6 },
    ]);
    const lines = consensusEdges(sec, 20, 8, 44, 0.07, 1)!;
    expect(Math.abs(lines.pR - 11)).toBeLessThanOrEqual(1);
  });
  it("takes the step nearer the middle when the band outside it is dark (a shadow), not when it is light (the strip's lit edge)", () => {
    const withInner = (size: number, band: number) => {
      const sec = sections(ts, 81, [
        { at: () => -10, size: 0.2 },
        { at: () => 11, size },
        { at: () => 30, size: 0.1 },
      ]);
      // Brightness: surface 0.8, strip 0.9 from −10 to 11, the band from 11 to 30 at `band`.
      sec.levels = ts.map(() => Float64Array.from({ length: 81 }, (_, i) => (i - 40 < -10 ? 0.8 : i - 40 <= 11 ? 0.9 : i - 40 <= 30 ? band : 0.8)));
      return sec;
    };
    expect(Math.abs(consensusEdges(withInner(0.07, 0.6), 20, 8, 44, 0.07, 1)!.pR - 11)).toBeLessThanOrEqual(1);
    expect(Math.abs(consensusEdges(withInner(0.07, 0.95), 20, 8, 44, 0.07, 1)!.pR - 30)).toBeLessThanOrEqual(1);
    // An inner step much weaker than the outer one is texture, not the edge.
    expect(Math.abs(consensusEdges(withInner(0.03, 0.6), 20, 8, 44, 0.07, 1)!.pR - 30)).toBeLessThanOrEqual(1);
    // Nor is an inner step that would make the strip narrower than allowed.
    expect(Math.abs(consensusEdges(withInner(0.07, 0.6), 20, 25, 44, 0.07, 1)!.pR - 30)).toBeLessThanOrEqual(1);
  });
  it("finds nothing on flat sections", () => {
    expect(consensusEdges(sections(ts, 81, []), 20, 8, 44, 0.07, 1)).toBeNull();
  });
});
