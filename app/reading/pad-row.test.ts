// Candidates from a row of pads: a strip whose plastic is the surface's own colour (no bright
// blob, no edge) is still found from its pads, and the candidate lies on its handle's side.
import { describe, expect, it } from "vitest";
import { drawScene, sceneChart, scenePoint, threePadStrip } from "../../tests/reading/strip-scene";
import { parseChart } from "./chart";
import { padRowCandidates } from "./pad-row";

describe("padRowCandidates", () => {
  it("finds the handle of a strip the colour of the surface from its three pads", () => {
    const strip = { ...threePadStrip({ cx: 300, cy: 220, angleDeg: 28, pxPerMm: 5 }), color: [226, 214, 192] as [number, number, number] };
    const chart = parseChart(sceneChart(strip));
    const img = drawScene(640, 440, [226, 214, 192], strip);
    const cands = padRowCandidates(img, 1, chart);
    expect(cands.length).toBeGreaterThanOrEqual(2);
    // One of them sits on the handle's middle, along the strip.
    const handle = scenePoint(strip, (20.5 + 80) / 2);
    const near = cands.find((c) => Math.hypot(c.cx - handle[0], c.cy - handle[1]) < 10);
    expect(near).toBeDefined();
    expect(Math.abs(Math.sin(near!.angle - (28 * Math.PI) / 180))).toBeLessThan(0.05);
    expect(near!.width).toBeGreaterThan(0.7 * 25);
    expect(near!.width).toBeLessThan(1.4 * 25);
  });
  it("proposes nothing on a plain surface", () => {
    const strip = { ...threePadStrip({ cx: 300, cy: 220, angleDeg: 0, pxPerMm: 5 }), pads: [] };
    const chart = parseChart(sceneChart(threePadStrip({ cx: 0, cy: 0, angleDeg: 0, pxPerMm: 5 })));
    expect(padRowCandidates(drawScene(640, 440, [226, 214, 192], { ...strip, color: [226, 214, 192] }), 1, chart)).toEqual([]);
  });
});
