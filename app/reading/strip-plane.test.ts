// The strip's plane in perspective: pad boundaries found as colour steps along a drawn strip,
// the chart's landmarks, and the plane fitted on a strip seen through a tilted camera.
// Source of the expected positions: the drawn scene's own homography (a keystone, exact), the
// pads' places from the scene's chart; that a line's points map by a 1-D projective map under a
// homography is textbook projective geometry (see projective-1d.test.ts).
import { describe, expect, it } from "vitest";
import { drawScene, keystoneView, sceneChart, scenePoint, threePadStrip, viewPoint, type SceneLine, type SceneStrip } from "../../tests/reading/strip-scene";
import { alongProfile } from "./axis-profile";
import { parseChart } from "./chart";
import { chartLayout, searchLayout, tAt } from "./layout-fit";
import { plasticDifference } from "./plastic-difference";
import { chartBoundaries, colourSteps, fitStripPlane, planePoint } from "./strip-plane";

const surface: [number, number, number] = [120, 118, 110];

describe("chartBoundaries", () => {
  it("lists the tip and each pad's edges, one edge where two pads touch", () => {
    const layout = { pads: [[1, 5], [5.2, 9], [11, 15]] as [number, number][], gaps: [] };
    expect(chartBoundaries(layout)).toEqual([0, 1, 5.1, 9, 11, 15]);
    // Steps 1 mm apart seen as one: the tip and the first pad's edge cannot be told apart.
    expect(chartBoundaries(layout, 1.5)).toEqual([5.1, 9, 11, 15]);
  });
});

describe("colourSteps", () => {
  it("finds the tip and every pad edge of a flat strip, to half a pixel", () => {
    const strip: SceneStrip = threePadStrip({ cx: 200, cy: 100, angleDeg: 0, pxPerMm: 3.5 });
    const img = drawScene(400, 200, surface, strip);
    const profile = alongProfile(img, { cx: 200, cy: 100, ux: 1, uy: 0, width: 17.5, length: 200 }, -190, 190);
    const steps = colourSteps(profile, 1);
    for (const mm of [0, 1.5, 6.5, 8.5, 13.5, 15.5, 20.5]) {
      const x = scenePoint(strip, mm)[0] - 200;
      expect(Math.min(...steps.map((s) => Math.abs(s.t - x)))).toBeLessThan(0.5);
    }
  });
});

describe("fitStripPlane", () => {
  // A 6-pad strip at 8 px/mm across a 900 px wide photo, the tip to the left.
  const strip: SceneStrip = {
    ...threePadStrip({ cx: 450, cy: 150, angleDeg: 0, pxPerMm: 8 }),
    lengthMm: 95,
    pads: [4, 11, 18, 25, 32, 39].map((c, i) => ({ centerMm: c, sizeMm: 5, color: [[220, 150, 90], [150, 170, 210], [200, 120, 160], [230, 200, 80], [120, 180, 140], [190, 140, 110]][i] as [number, number, number] })),
  };
  const chart = parseChart(sceneChart(strip));
  const fitIn = (view?: number[], scene: { strip: SceneStrip; surface: [number, number, number]; lines?: SceneLine[] } = { strip, surface }) => {
    const { strip } = scene;
    const chart = parseChart(sceneChart(strip));
    const layout = chartLayout(chart);
    const img = drawScene(900, 300, scene.surface, strip, scene.lines, view);
    const ends = [0, 95].map((mm) => {
      const p = scenePoint(strip, mm);
      return (view ? viewPoint(view, p[0], p[1]) : p)[0] - 450;
    });
    const width = 40 * (view ? 0.85 : 1);
    const axis = { cx: 450, cy: 150, ux: 1, uy: 0, width, length: 600 };
    const profile = alongProfile(img, axis, -449, 449);
    const diff = plasticDifference(profile, axis.length, width);
    const scale = (ends[1] - ends[0]) / 95;
    const padEndMm = Math.max(...layout.pads.map((p) => p[1]));
    const { best } = searchLayout(chart, layout, profile, diff, { plus: { end: ends[1], truncated: false }, minus: { end: ends[0], truncated: false }, scale, scaleFromWidth: scale, lengthOk: true, free: false, padEndMm });
    return { axis, best: best!, plane: fitStripPlane(chart, layout, profile, axis, best!) };
  };

  it("places every pad of a strip seen at a strong tilt to within a pixel (0.12 mm); the uniform scale cannot", () => {
    const view = keystoneView(900, 300, 0.15);
    const { axis, best, plane } = fitIn(view);
    expect(plane).not.toBeNull();
    let worstUniform = 0;
    for (const p of chart.pads) {
      const s = scenePoint(strip, p.centerMm);
      const truth = viewPoint(view, s[0], s[1]);
      const got = planePoint(plane!.H, p.centerMm, 0);
      expect(Math.hypot(got[0] - truth[0], got[1] - truth[1])).toBeLessThan(1);
      worstUniform = Math.max(worstUniform, Math.abs(axis.cx + tAt(best, p.centerMm) - truth[0]));
    }
    // The uniform scale puts a pad over half a millimetre off.
    expect(worstUniform).toBeGreaterThan(4);
    // The pad's corners through the plane: the far side of the last pad is the narrower one.
    const near = planePoint(plane!.H, 1.5, 2.5), far = planePoint(plane!.H, 41.5, 2.5);
    expect(far[1] - 150).toBeLessThan(near[1] - 150);
  });
  it("finds the edges of pads that touch, on a pale strip on a pale surface along a grout line", () => {
    // Pads 5 mm wide every 5.2 mm (they nearly touch: no bare plastic between them), the surface
    // nearly the strip's colour, a dark grout line running under the strip's whole length.
    const touching: SceneStrip = { ...strip, pads: strip.pads.map((p, i) => ({ ...p, centerMm: 3 + 5.2 * i })) };
    const view = keystoneView(900, 300, 0.15);
    const lines: SceneLine[] = [{ y: 150, thickness: 60, color: [70, 70, 72] }];
    const { plane, best, axis } = fitIn(view, { strip: touching, surface: [236, 235, 230], lines });
    expect(plane).not.toBeNull();
    const errs = touching.pads.map((p) => {
      const s = scenePoint(touching, p.centerMm);
      const truth = viewPoint(view, s[0], s[1]);
      const got = planePoint(plane!.H, p.centerMm, 0);
      return [Math.hypot(got[0] - truth[0], got[1] - truth[1]), Math.abs(axis.cx + tAt(best, p.centerMm) - truth[0])];
    });
    // Every pad within 3 px (0.35 mm, 7 % of a pad; the first one lies beyond the last boundary
    // told apart, the tip being too close to its edge), and nearer than the uniform fit put it.
    for (const [plane, uniform] of errs) expect(plane).toBeLessThan(Math.min(3, uniform));
  });
  it("keeps the uniform fit on a strip seen square on", () => {
    expect(fitIn().plane).toBeNull();
  });
});
