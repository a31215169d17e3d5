// The profile along a drawn strip's axis, and its ends walked from the middle.
import { describe, expect, it } from "vitest";
import { drawScene, type SceneStrip } from "../../tests/reading/strip-scene";
import { alongProfile } from "./axis-profile";
import { plasticDifference } from "./plastic-difference";
import { endsFromEdges, walkEnd } from "./strip-ends";

const strip: SceneStrip = {
  cx: 200, cy: 100, angleDeg: 0, pxPerMm: 3.5, widthMm: 5, lengthMm: 80, color: [244, 243, 239],
  pads: [
    { centerMm: 4, sizeMm: 5, color: [220, 150, 90] },
    { centerMm: 11, sizeMm: 5, color: [150, 170, 210] },
  ],
};
const axis = { cx: 200, cy: 100, ux: 1, uy: 0, width: 17.5, length: 200 };
const halfLength = 140; // 80 mm × 3.5 px/mm / 2

describe("alongProfile and walkEnd", () => {
  it("finds both ends of a strip on a darker surface within two pixels", () => {
    const img = drawScene(400, 200, [120, 118, 110], strip);
    const p = alongProfile(img, axis, -190, 190);
    const plus = walkEnd(p, p.presence, 10, 25, 1), minus = walkEnd(p, p.presence, 10, 25, -1);
    expect(plus.truncated || minus.truncated).toBe(false);
    expect(Math.abs(plus.end - halfLength)).toBeLessThan(2);
    expect(Math.abs(minus.end + halfLength)).toBeLessThan(2);
  });
  it("reports a strip running out of the photo as truncated", () => {
    const img = drawScene(400, 200, [120, 118, 110], { ...strip, cx: 300 });
    const p = alongProfile(img, { ...axis, cx: 300 }, -190, 190);
    expect(walkEnd(p, p.presence, 10, 25, 1).truncated).toBe(true);
  });
});

describe("endsFromEdges", () => {
  it("finds the ends of a pale strip lying along a dark line from its long edges alone", () => {
    // The line runs through the strip's axis and on past both ends, so the colour difference
    // does; the strip's edges do not.
    const img = drawScene(400, 200, [236, 234, 228], strip, [{ y: 100, thickness: 30, color: [90, 90, 95] }]);
    const p = alongProfile(img, axis, -190, 190);
    const ends = endsFromEdges(p, axis.length, 25, 80 * 3.5);
    expect(ends).not.toBeNull();
    expect(Math.abs(ends![0].end - halfLength)).toBeLessThan(2);
    expect(Math.abs(ends![1].end + halfLength)).toBeLessThan(2);
  });
});

describe("plasticDifference", () => {
  it("is near zero over bare plastic and large over a pad", () => {
    const img = drawScene(400, 200, [120, 118, 110], strip);
    const p = alongProfile(img, axis, -190, 190);
    const d = plasticDifference(p, axis.length, axis.width);
    const tipT = -halfLength;
    expect(d.meanBetween(tipT + 4 * 3.5 - 5, tipT + 4 * 3.5 + 5)).toBeGreaterThan(50);
    expect(d.meanBetween(0, 60)).toBeLessThan(2);
    expect(d.bare[0]).toBeCloseTo(244, 0);
  });
});
