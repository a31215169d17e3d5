// One candidate's fit on a drawn strip: a candidate too narrow (or too wide) for any fit to reach a
// possible scale is dropped before its profile is taken; otherwise its pads are placed. Two
// placements along one axis told alike or apart.
import { describe, expect, it } from "vitest";
import { drawScene, sceneChart, threePadStrip } from "../../tests/reading/strip-scene";
import { parseChart } from "./chart";
import { chartLayout } from "./layout-fit";
import { MAX_SCALE_OVER_WIDTH, MIN_SCALE_UNDER_WIDTH, fitStrip, prepareAxis, samePlacement } from "./strip-fit";

const strip = threePadStrip({ cx: 240, cy: 180, angleDeg: 0, pxPerMm: 4 });
const chart = parseChart(sceneChart(strip));
const img = drawScene(480, 360, [110, 105, 98], strip);
const guess = { cx: 240, cy: 181, ux: 1, uy: 0, width: strip.widthMm * 4, length: 200 };

describe("prepareAxis", () => {
  it("profiles a candidate whose width allows a readable scale", () => {
    const p = prepareAxis(img, chart, guess, 4);
    expect(p).not.toBeNull();
    expect(p!.scaleFromWidth).toBeCloseTo(4, 0);
    const layout = chartLayout(chart);
    const g = fitStrip(p!, chart, layout, Math.max(...layout.pads.map((x) => x[1])), false, undefined);
    expect(g!.pxPerMm).toBeCloseTo(4, 0);
  });
  it("drops a candidate whose width no fit could stretch to the smallest readable scale", () => {
    // The width gives about 4 px/mm; a fit reaches at most MAX_SCALE_OVER_WIDTH times that.
    expect(prepareAxis(img, chart, guess, 4 * MAX_SCALE_OVER_WIDTH * 1.1)).toBeNull();
    expect(prepareAxis(img, chart, guess, 4 * MAX_SCALE_OVER_WIDTH * 0.9)).not.toBeNull();
  });
  it("drops a candidate so wide that every fit's scale would exceed the largest possible", () => {
    // The width gives about 4 px/mm; a fit reaches at least MIN_SCALE_UNDER_WIDTH times that.
    expect(prepareAxis(img, chart, guess, 0, 4 * MIN_SCALE_UNDER_WIDTH * 0.9)).toBeNull();
    expect(prepareAxis(img, chart, guess, 0, 4 * MIN_SCALE_UNDER_WIDTH * 1.1)).not.toBeNull();
  });
});

describe("samePlacement", () => {
  const a = { dir: 1 as const, tipT: -200, pxPerMm: 10 };
  it("tells a placement a little off in tip and scale the same", () => {
    expect(samePlacement(a, { dir: 1, tipT: -185, pxPerMm: 10.4 }, 5)).toBe(true);
  });
  it("tells apart one turned round, one shifted by half a pad and one at another scale", () => {
    expect(samePlacement(a, { ...a, dir: -1 }, 5)).toBe(false);
    expect(samePlacement(a, { ...a, tipT: -225 }, 5)).toBe(false);
    expect(samePlacement(a, { ...a, pxPerMm: 11 }, 5)).toBe(false);
  });
});
