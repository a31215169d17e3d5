// One candidate's fit on a drawn strip: a candidate too narrow (or too wide) for any fit to reach a
// possible scale is dropped before its profile is taken; otherwise its pads are placed. Two
// placements along one axis told alike or apart.
import { describe, expect, it } from "vitest";
import { drawScene, sceneChart, threePadStrip } from "../../tests/reading/strip-scene";
import { parseChart } from "./chart";
import { chartLayout } from "./layout-fit";
import { MAX_SCALE_OVER_WIDTH, MIN_SCALE_UNDER_WIDTH, SAME_EDGES_PX, edgesWin, fitStrip, prepareAxis, sameEdges, samePlacement } from "./strip-fit";

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

describe("sameEdges", () => {
  // A placed strip along x from t = −150 (tip) to 150 (handle), 20 px wide, centred at (200, 100).
  const g = { centre: [200, 100] as [number, number], u: [1, 0] as [number, number], tipT: -150, handleT: 150, widthPx: 20 };
  const axis = (cy: number, angle: number, width = 20) => ({ cx: 210, cy, ux: Math.cos(angle), uy: Math.sin(angle), width, length: 290 });
  it("tells an axis along the same line (its centre elsewhere on it) the same", () => {
    expect(sameEdges(g, axis(100, 0))).toBe(true);
    expect(sameEdges(g, axis(100 + SAME_EDGES_PX * 0.8, 0))).toBe(true);
  });
  it("tells apart an axis shifted across, turned enough to move an end, or of another width", () => {
    expect(sameEdges(g, axis(100 + SAME_EDGES_PX * 1.5, 0))).toBe(false);
    // Turned by 0.005 rad about x = 210: the tip end (x = 50) moves 0.8 px.
    expect(sameEdges(g, axis(100, 0.005))).toBe(false);
    expect(sameEdges(g, axis(100, 0.001))).toBe(true);
    expect(sameEdges(g, axis(100, 0, 20 + SAME_EDGES_PX * 2))).toBe(false);
  });
});

describe("edgesWin", () => {
  // Placements as the fit gives them (scores and mean ΔE00 to the chart invented).
  const fromColour = { convincing: true, fitScore: 124, colourCost: 1.2 };
  it("keeps the colour's placement against one from the edges that scores a little higher with colours far from the chart", () => {
    // A strip running out of the photo at its tip: the edges' ends place it the other way round.
    expect(edgesWin(fromColour, { convincing: true, fitScore: 126, colourCost: 28 })).toBe(false);
  });
  it("takes the edges' placement when it scores as well and its colours lie as near the chart", () => {
    expect(edgesWin(fromColour, { convincing: true, fitScore: 126, colourCost: 2.5 })).toBe(true);
    expect(edgesWin(fromColour, { convincing: true, fitScore: 120, colourCost: 0.5 })).toBe(false);
  });
  it("takes a convincing placement over none, and never an unconvincing one", () => {
    expect(edgesWin(null, { convincing: true, fitScore: 10, colourCost: 30 })).toBe(true);
    expect(edgesWin({ ...fromColour, convincing: false }, { convincing: true, fitScore: 10, colourCost: 30 })).toBe(true);
    expect(edgesWin(null, { convincing: false, fitScore: 200, colourCost: 0 })).toBe(false);
  });
});
