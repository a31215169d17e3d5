// The chart's layout fitted along a drawn strip's profile: offset, scale and which end is the tip.
import { describe, expect, it } from "vitest";
import { drawScene, sceneChart, type SceneStrip, threePadStrip } from "../../tests/reading/strip-scene";
import { alongProfile } from "./axis-profile";
import { parseChart } from "./chart";
import { chartLayout, colourTrust, padPitchMm, placementColourCost, pxPerMm, searchLayout, tAt } from "./layout-fit";
import { plasticDifference } from "./plastic-difference";

const strip: SceneStrip = threePadStrip({ cx: 200, cy: 100, angleDeg: 180, pxPerMm: 3.5 });
const chart = parseChart(sceneChart(strip));

describe("chartLayout", () => {
  it("lists the pads and the bare gaps before, between and after them", () => {
    const l = chartLayout(chart);
    expect(l.pads).toEqual([[1.5, 6.5], [8.5, 13.5], [15.5, 20.5]]);
    expect(l.gaps).toEqual([[0, 1.5], [6.5, 8.5], [13.5, 15.5], [20.5, 24.5]]);
  });
});

/**
 * The drawn strip's profile along an axis through it (angle 180°: the tip lies towards +x, so
 * towards +t on an axis along +x) and the layout searched between the given ends, the length
 * taken as confirmed.
 */
function searchDrawn(plusEnd: number, minusEnd: number, scales: { scale: number; scaleFromWidth: number; lengthOk: boolean } = { scale: 3.5, scaleFromWidth: 3.5, lengthOk: true }, surface: [number, number, number] = [120, 118, 110], drawn = strip) {
  const img = drawScene(400, 200, surface, drawn);
  const axis = { cx: 200, cy: 100, ux: 1, uy: 0, width: 17.5, length: 200 };
  const profile = alongProfile(img, axis, -190, 190);
  const diff = plasticDifference(profile, axis.length, axis.width);
  const layout = chartLayout(chart);
  const ends = { plus: { end: plusEnd, truncated: false }, minus: { end: minusEnd, truncated: false } };
  const found = searchLayout(chart, layout, profile, diff, { ...ends, ...scales, free: false, padEndMm: 20.5 });
  return { axis, profile, diff, layout, ...found };
}

describe("searchLayout", () => {
  const { axis, profile, diff, layout, best, fits } = searchDrawn(140, -140);

  it("puts the tip at the right end, at the right scale", () => {
    expect(best).not.toBeNull();
    expect(best!.dir).toBe(-1);
    expect(Math.abs(tAt(best!, 0) - 140)).toBeLessThan(1.5);
    expect(pxPerMm(best!)).toBeCloseTo(3.5, 1);
    expect(best!.padScore).toBeGreaterThan(30);
    expect(best!.gapScore).toBeLessThan(3);
  });
  it("prefers the true placement by colour over the reversed one", () => {
    const reversed = fits.find((f) => f.dir === 1);
    expect(reversed).toBeDefined();
    const right = placementColourCost(chart, layout, profile, diff.bare, best!);
    const wrong = placementColourCost(chart, layout, profile, diff.bare, reversed!);
    expect(right).toBeLessThan(1);
    expect(wrong).toBeGreaterThan(right + 5);
  });
  it("gives the highest cost, not an error, to a placement whose gaps hold no light (a turned photo's black corner)", () => {
    const black = { width: 400, height: 200, data: new Uint8Array(400 * 200 * 3) };
    const dark = alongProfile(black, axis, -190, 190);
    expect(placementColourCost(chart, layout, dark, [0, 0, 0], best!)).toBe(50);
  });
  it("trusts a placement less as its colours lie further from the chart", () => {
    expect(colourTrust(3)).toBe(1);
    expect(colourTrust(13)).toBeCloseTo(0.5, 6);
    expect(colourTrust(40)).toBe(0.1);
  });
});

describe("padPitchMm", () => {
  it("gives the spacing of evenly spaced pads, and none for uneven ones or a single pad", () => {
    expect(padPitchMm(chartLayout(chart))).toBeCloseTo(7, 6);
    expect(padPitchMm({ pads: [[1, 4], [6, 9], [14, 17]], gaps: [] })).toBe(0);
    expect(padPitchMm({ pads: [[1, 4]], gaps: [] })).toBe(0);
  });
});

describe("searchLayout with an end walked a pad's pitch too far", () => {
  // The same drawn strip; the tip's end is given 7 mm (one pitch) beyond the true tip, as when a
  // grain line runs on past it, with the length taken as confirmed.
  const { fits, profile, diff, layout } = searchDrawn(140 + 7 * 3.5, -140 + 7 * 3.5);

  it("still finds the true placement, a pitch along from one searched near the given end", () => {
    const right = fits.find((f) => f.dir === -1 && Math.abs(tAt(f, 0) - 140) < 1.5);
    expect(right).toBeDefined();
    const partner = fits.find((f) => f === right!.shiftOf || f.shiftOf === right);
    expect(partner).toBeDefined();
    // Its colours lie closer to the chart than its partner's.
    expect(placementColourCost(chart, layout, profile, diff.bare, right!)).toBeLessThan(placementColourCost(chart, layout, profile, diff.bare, partner!) - 3);
  });
});

describe("searchLayout placed from the handle's end at the width's scale", () => {
  // The tip's end walked 10 mm past the tip (a grout line in line with the strip), so the length
  // is not confirmed; the width gives a scale 7 % short (its edges read a little narrow). From the
  // handle's end, the scale searched must keep the handle where it was seen, not the tip where the
  // width's scale put it (5.6 mm short of the true tip over an 80 mm strip).
  const width = 3.5 / 1.07;
  const { best } = searchDrawn(140 + 10 * 3.5, -140, { scale: width, scaleFromWidth: width, lengthOk: false });

  it("finds the tip within a third of a pad and the scale from the pads", () => {
    expect(best).not.toBeNull();
    expect(best!.dir).toBe(-1);
    expect(Math.abs(tAt(best!, 0) - 140)).toBeLessThan((5 / 3) * 3.5);
    expect(pxPerMm(best!)).toBeCloseTo(3.5, 1);
  });
});

describe("searchLayout on a dark surface, the width reading wide", () => {
  // Pale pads, both ends seen where they are, the length confirmed; the width gives a scale 12 %
  // too large (an overexposed white strip blooms into a dark cloth). Placed from the handle's end
  // at the width's scale, the first pad would land on the cloth past the tip, which differs from
  // bare plastic far more than a pale pad: pads count only on the strip, so the tip stays put.
  const pale: SceneStrip = { ...strip, pads: strip.pads.map((p, i) => ({ ...p, color: [[228, 212, 196], [206, 214, 232], [230, 208, 220]][i] as [number, number, number] })) };
  const { best } = searchDrawn(140, -140, { scale: 3.5, scaleFromWidth: 3.5 * 1.12, lengthOk: true }, [25, 27, 35], pale);

  it("keeps every pad on the strip", () => {
    expect(best).not.toBeNull();
    expect(best!.dir).toBe(-1);
    expect(Math.abs(tAt(best!, 0) - 140)).toBeLessThan(3.5);
  });
});

describe("searchLayout from the handle's end beside a confirmed length", () => {
  // The tip's end walked 5.5 mm on past the tip (a shadow or glare in line with it), the length
  // still within the confirmed share; the width gives a scale 4 % short (its edges read a little
  // narrow). The length's scale is then too large and the width's too small: placed from the
  // handle's end, the scale searched must keep the handle where it was seen (the tip would land
  // 3.2 mm short of the true tip, nearly half a pitch, at the width's scale).
  const width = 3.5 * 0.96, plusEnd = 140 + 5.5 * 3.5;
  const { best } = searchDrawn(plusEnd, -140, { scale: (plusEnd + 140) / 80, scaleFromWidth: width, lengthOk: true });

  it("finds the tip and the scale the pads show", () => {
    expect(best).not.toBeNull();
    expect(best!.dir).toBe(-1);
    expect(Math.abs(tAt(best!, 0) - 140)).toBeLessThan(1.5);
    expect(pxPerMm(best!)).toBeCloseTo(3.5, 1);
  });
});
