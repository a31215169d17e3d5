// The profile along a drawn strip's axis, and its ends walked from the middle.
import { describe, expect, it } from "vitest";
import { drawScene, type SceneStrip } from "../../tests/reading/strip-scene";
import { alongProfile } from "./axis-profile";
import { plasticDifference } from "./plastic-difference";
import type { Profile } from "./axis-profile";
import { endShowsAt, endsFromEdges, walkEnd } from "./strip-ends";

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

describe("endShowsAt", () => {
  // A profile 1 px a sample from t = −100: the strip's presence (30) from t = −100 to 0, then
  // surface (2) to 40, then a dark line across the surface (60) from 40 to 52, then surface.
  const values = Float32Array.from({ length: 260 }, (_, i) => {
    const t = i - 100;
    return t < 0 ? 30 : t < 40 ? 2 : t < 52 ? 60 : 2;
  });
  const profile = { t0: -100, n: 260, valid: new Uint8Array(260).fill(1) } as unknown as Profile;

  it("sees the end where the placement puts it, the walk from just inside stopping there", () => {
    expect(endShowsAt(profile, values, 10, -5, 0, 2, 3, 20)).toBe(true);
    // A walk that bridges gaps as long as a pad runs on into the line: the end it gives is the line's.
    expect(walkEnd(profile, values, 10, 45, 1).end).toBeGreaterThan(50);
  });
  it("does not see it where the placement puts the end a pad beyond the strip or inside it", () => {
    // The placed end out on the surface: the walk starts off the strip.
    expect(endShowsAt(profile, values, 10, 20, 25, 2, 3, 20)).toBe(false);
    // The placed end well inside the strip: the walk runs on past it to the true end.
    expect(endShowsAt(profile, values, 10, -30, -25, 2, 3, 20)).toBe(false);
  });
  it("does not see it where the values come back soon after (a gap in the strip, not its end)", () => {
    const gap = values.map((v, i) => (i - 100 >= 4 && i - 100 < 40 ? 30 : v));
    expect(endShowsAt(profile, gap, 10, -5, 0, 2, 3, 20)).toBe(false);
  });
});
