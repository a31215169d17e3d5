// The strip's width and centre line from its pads' sides, on small synthetic sections and a drawn
// scene: a pale strip the surface's colour with a dark line running beside it, a gap of surface
// between (grout along the strip), is placed at its own width, not the strip's and the gap's.
import { describe, expect, it } from "vitest";
import { drawScene, sceneChart, scenePoint, threePadStrip } from "../../tests/reading/strip-scene";
import { parseChart } from "./chart";
import { chartLayout } from "./layout-fit";
import { axisFromSides, sidesOnSection } from "./pad-width";
import { fitAnyLength, padsWin } from "./strip-fit";

/** A cross-section 1 px a sample (range (n − 1) / 2) coloured by `at(s)`. */
function section(n: number, at: (s: number) => number[]): Float32Array {
  const range = (n - 1) / 2, c = new Float32Array(n * 3);
  for (let i = 0; i < n; i++) c.set(at(i - range), i * 3);
  return c;
}

const plastic = [240, 238, 232], pad = [60, 120, 125], grout = [105, 105, 105];

describe("sidesOnSection", () => {
  it("finds a pad's sides off the middle of a band that takes in the surface and a dark line beside it", () => {
    // The band (±30 px) holds the pad (−5 … 35) and, left of it, plastic-coloured surface and a
    // grout line (−40 … −30): its mean colour is a mix.
    const c = section(121, (s) => (s >= -5 && s < 35 ? pad : s >= -40 && s < -30 ? grout : plastic));
    const sides = sidesOnSection(c, 1, 60, [110, 150, 150], plastic, 30, 6)!;
    expect(Math.abs(sides[0] + 5)).toBeLessThanOrEqual(1);
    expect(Math.abs(sides[1] - 35)).toBeLessThanOrEqual(1);
  });
  it("takes the pad, not a narrow dark line darker than the pad", () => {
    const c = section(121, (s) => (s >= -5 && s < 35 ? pad : s >= -20 && s < -12 ? [40, 40, 40] : plastic));
    const sides = sidesOnSection(c, 1, 60, [110, 150, 150], plastic, 30, 6)!;
    expect(Math.abs(sides[0] + 5)).toBeLessThanOrEqual(1);
  });
  it("finds no pad in plastic that only a shadow darkens (it barely differs from the surface beside it)", () => {
    const shade = [205, 200, 190], surfaceInShade = [196, 192, 184];
    const c = section(121, (s) => (s >= -20 && s < 20 ? shade : surfaceInShade));
    expect(sidesOnSection(c, 1, 60, shade, plastic, 30, 6)).toBeNull();
  });
});

describe("axisFromSides", () => {
  const axis = { cx: 100, cy: 100, ux: 1, uy: 0, width: 70, length: 200 };
  it("moves the axis onto the pads and takes the strip's width from theirs", () => {
    const a = axisFromSides(axis, [{ t: 0, left: 5, right: 45 }, { t: 60, left: 6, right: 45 }, { t: 120, left: 5, right: 44 }], 1)!;
    expect(a.width).toBeCloseTo(39, 0);
    expect(a.cy).toBeCloseTo(125, 0);
  });
  it("turns the axis through the pads' centres when they lie apart along it", () => {
    const a = axisFromSides(axis, [{ t: 0, left: 0, right: 40 }, { t: 80, left: 8, right: 48 }], 1)!;
    expect(a.uy / a.ux).toBeCloseTo(0.1, 2);
  });
  it("leaves the axis as it is when one pad alone, or pads that disagree, speak for another width", () => {
    expect(axisFromSides(axis, [{ t: 0, left: 5, right: 45 }], 1)).toBeNull();
    expect(axisFromSides(axis, [{ t: 0, left: 5, right: 45 }, { t: 60, left: -30, right: 30 }], 1)).toBeNull();
  });
  it("leaves the axis as it is when the pads agree with it", () => {
    expect(axisFromSides(axis, [{ t: 0, left: -33, right: 34 }, { t: 60, left: -34, right: 33 }], 1)).toBeNull();
  });
});

describe("fitAnyLength beside a line along the strip", () => {
  it("places a strip the surface's colour, a grout line along one edge, at its own width", () => {
    // 4 px/mm, 5 mm wide, 80 mm long: the strip spans y 170 … 190, x 80 … 400. Its far edge and
    // its ends show as a faint shadow; its near edge not at all, with a grout line 6 px beyond it.
    const strip = threePadStrip({ cx: 240, cy: 180, angleDeg: 0, pxPerMm: 4 });
    const chart = parseChart(sceneChart(strip));
    const shade: [number, number, number] = [205, 204, 200];
    const img = drawScene(480, 360, strip.color, strip, [
      { y: 161, thickness: 6, color: [110, 110, 110] }]);
    for (let y = 170; y < 193; y++) for (let x = 77; x < 403; x++) if (y >= 190 || x < 80 || x >= 400) img.data.set(shade, (y * img.width + x) * 3);
    const layout = chartLayout(chart);
    const padEndMm = Math.max(...layout.pads.map((p) => p[1]));
    // A candidate on the handle, as wide as the strip.
    const g = fitAnyLength(img, chart, layout, padEndMm, { cx: 280, cy: 180, ux: 1, uy: 0, width: 20, length: 160 }, undefined)!;
    expect(g).not.toBeNull();
    expect(Math.abs(g.widthPx - 20)).toBeLessThanOrEqual(2);
    for (const [i, p] of g.pads.entries()) {
      const [x, y] = scenePoint(strip, strip.pads[i].centerMm);
      expect(Math.hypot(p.centre[0] - x, p.centre[1] - y)).toBeLessThan(3);
    }
  });
});

describe("padsWin", () => {
  const g = { convincing: true, lengthOk: false, rank: 20 };
  it("takes the pads' placement when it confirms the length, or ranks higher", () => {
    expect(padsWin(g, { convincing: true, lengthOk: true, rank: 15, endSeen: true })).toBe(true);
    expect(padsWin(g, { convincing: true, lengthOk: false, rank: 25, endSeen: true })).toBe(true);
    expect(padsWin(null, { convincing: true, lengthOk: false, rank: 5, endSeen: true })).toBe(true);
  });
  it("keeps the first when the pads' placement sees no end of the strip (its pads searched for anywhere)", () => {
    expect(padsWin(g, { convincing: true, lengthOk: false, rank: 40, endSeen: false })).toBe(false);
    expect(padsWin(null, { convincing: true, lengthOk: false, rank: 40, endSeen: false })).toBe(false);
  });
});
