// The light evened out along the strip from the surface beside it: a shadow across a strip on a
// dark surface is not taken for a change of the strip's colour.
import { describe, expect, it } from "vitest";
import { drawScene, threePadStrip } from "../../tests/reading/strip-scene";
import { alongProfile } from "./axis-profile";
import { linearToSrgb, srgbToLinear } from "./colour";
import type { RgbImage } from "./image";
import { plasticDifference } from "./plastic-difference";

/** The scene darkened right of x0 by `factor` in linear light, as a shadow darkens it (colours invented). */
function shadowRightOf(img: RgbImage, x0: number, factor: number): RgbImage {
  const data = Uint8Array.from(img.data);
  for (let y = 0; y < img.height; y++)
    for (let x = x0; x < img.width; x++)
      for (let c = 0; c < 3; c++) {
        const i = (y * img.width + x) * 3 + c;
        data[i] = Math.round(255 * linearToSrgb(factor * srgbToLinear(data[i] / 255)));
      }
  return { ...img, data };
}

describe("plasticDifference under a shadow", () => {
  // 80 mm strip at 3.5 px/mm, centred at x 200: the tip (pads) at x 60, the handle at x 340.
  const strip = threePadStrip({ cx: 200, cy: 100, angleDeg: 0, pxPerMm: 3.5 });
  const axis = { cx: 200, cy: 100, ux: 1, uy: 0, width: 17.5, length: 200 };

  it("finds the shadowed plastic on a dark surface as close to the lit plastic as the lit plastic is to itself", () => {
    // A shadow taking away 55 % of the light (linear) over the handle's half: the dark surface
    // beside it shows the same loss of light, which is what evens the strip out.
    const img = shadowRightOf(drawScene(400, 200, [40, 42, 46], strip), 240, 0.45);
    const p = alongProfile(img, axis, -190, 190);
    const d = plasticDifference(p, axis.length, axis.width);
    // Well inside the shadow (past the local light's reach of a strip width), bare plastic.
    expect(d.meanBetween(90, 130)).toBeLessThan(4);
    // Lit bare plastic, and a pad still stands out.
    expect(d.meanBetween(-60, 0)).toBeLessThan(4);
    expect(d.meanBetween(-140 + 4 * 3.5 - 5, -140 + 4 * 3.5 + 5)).toBeGreaterThan(50);
  });

  it("does the same on a pale surface", () => {
    const img = shadowRightOf(drawScene(400, 200, [200, 196, 188], strip), 240, 0.45);
    const p = alongProfile(img, axis, -190, 190);
    const d = plasticDifference(p, axis.length, axis.width);
    expect(d.meanBetween(90, 130)).toBeLessThan(4);
  });
});
