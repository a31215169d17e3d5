// Axis refinement on a drawn strip: from a rough guess to the true centre line and width.
import { describe, expect, it } from "vitest";
import { drawScene, type SceneStrip } from "../../tests/reading/strip-scene";
import { colourSteps, refineAxis } from "./strip-axis";

const strip: SceneStrip = {
  cx: 200, cy: 150, angleDeg: 23, pxPerMm: 3.5, widthMm: 5, lengthMm: 80, color: [244, 243, 239],
  pads: [{ centerMm: 4, sizeMm: 5, color: [220, 150, 90] }],
};

describe("refineAxis", () => {
  it("recovers the axis of a strip rotated 23° from a guess 3° and 3 px off", () => {
    const img = drawScene(400, 300, [120, 118, 110], strip);
    const a = ((23 + 3) * Math.PI) / 180;
    const guess = { cx: 203, cy: 148, ux: Math.cos(a), uy: Math.sin(a), width: 14, length: 200 };
    const axis = refineAxis(img, refineAxis(img, guess));
    const angle = (Math.atan2(axis.uy, axis.ux) * 180) / Math.PI;
    expect(angle).toBeCloseTo(23, 0);
    expect(axis.width).toBeCloseTo(17.5, 0);
    // Distance of the refined centre from the true axis line.
    const u = [Math.cos((23 * Math.PI) / 180), Math.sin((23 * Math.PI) / 180)];
    const off = -(axis.cx - strip.cx) * u[1] + (axis.cy - strip.cy) * u[0];
    expect(Math.abs(off)).toBeLessThan(0.7);
  });
  it("keeps the guess when no edges can be seen (a plain photo)", () => {
    const img = drawScene(200, 200, [120, 118, 110], { ...strip, cx: -500 });
    const guess = { cx: 100, cy: 100, ux: 1, uy: 0, width: 14, length: 120 };
    expect(refineAxis(img, guess)).toEqual(guess);
  });
});

describe("colourSteps", () => {
  it("peaks at a colour step and stays flat on a fine alternating texture", () => {
    const n = 40;
    const prof = new Float32Array(n * 3);
    for (let i = 0; i < n; i++) {
      // A texture alternating every sample on the left, a plain strip from sample 20.
      const v = i < 20 ? 0.8 + (i % 2 ? 0.05 : -0.05) : 0.9;
      prof.set([v, v, i < 20 ? 0.8 : 0.85], i * 3);
    }
    const steps = colourSteps(prof, n, 4);
    let best = 0;
    for (let i = 0; i < n; i++) if (steps[i] > steps[best]) best = i;
    expect(Math.abs(best - 19.5)).toBeLessThanOrEqual(1);
    // Inside the texture, the steps are small next to the edge's.
    expect(Math.max(...Array.from(steps.slice(4, 12)))).toBeLessThan(0.25 * steps[best]);
  });
});
