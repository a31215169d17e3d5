// The whole locator on drawn scenes whose true geometry is known: rotations (23° among them), a
// strip along a dark grout line, and a photo with no strip.
import { describe, expect, it } from "vitest";
import { drawScene, sceneChart, scenePoint, type SceneLine, type SceneStrip, threePadStrip } from "../../tests/reading/strip-scene";
import { parseChart } from "./chart";
import { ReadingError } from "./image";
import { locateStrip, scaleBounds } from "./locate";

const base: SceneStrip = threePadStrip({ cx: 240, cy: 180, angleDeg: 0, pxPerMm: 4 });
const chart = parseChart(sceneChart(base));

function expectPadsPlaced(strip: SceneStrip, surface: [number, number, number], lines: SceneLine[] = []) {
  const g = locateStrip(drawScene(480, 360, surface, strip, lines), chart);
  strip.pads.forEach((p, i) => {
    const [x, y] = scenePoint(strip, p.centerMm);
    expect(Math.hypot(g.pads[i].centre[0] - x, g.pads[i].centre[1] - y)).toBeLessThan(2.5);
  });
  expect(g.pxPerMm).toBeCloseTo(strip.pxPerMm, 0);
  return g;
}

describe("locateStrip", () => {
  for (const angleDeg of [0, 23, 90, 180, -127])
    it(`places the pads of a strip rotated ${angleDeg}° on a darker surface`, () => {
      expectPadsPlaced({ ...base, angleDeg }, [110, 105, 98]);
    });
  it("places the pads of a pale strip on a pale surface", () => {
    expectPadsPlaced({ ...base, angleDeg: 23 }, [232, 230, 223]);
  });
  it("places the pads of a strip lying along a dark grout line", () => {
    expectPadsPlaced({ ...base, angleDeg: 0 }, [225, 222, 215], [{ y: 180, thickness: 6, color: [95, 92, 90] }]);
  });
  it("searches the edge pairs after the wide scale's best two blobs, before profiling the rest", () => {
    // Bright bands between dark lines are the wide scale's best blobs; none is the strip.
    const dark: [number, number, number] = [95, 92, 90];
    const lines = [180, 30, 95, 255, 320].map((y, i) => ({ y, thickness: i ? 3 : 6, color: dark }));
    const trace: string[] = [];
    const g = locateStrip(drawScene(480, 360, [225, 222, 215], base, lines), chart, (l) => trace.push(l));
    const firstEdges = trace.findIndex((l) => l.startsWith("edge pair"));
    expect(firstEdges).toBeGreaterThan(0);
    const walkedBefore = new Set(trace.slice(0, firstEdges).filter((l) => l.startsWith("walk")).map((l) => /"c":\[[^\]]*\]/.exec(l)?.[0]));
    expect(walkedBefore.size).toBe(2);
    base.pads.forEach((p, i) => {
      const [x, y] = scenePoint(base, p.centerMm);
      expect(Math.hypot(g.pads[i].centre[0] - x, g.pads[i].centre[1] - y)).toBeLessThan(2.5);
    });
  });
  it("refuses a photo with no strip in plain words", () => {
    const img = drawScene(480, 360, [110, 105, 98], { ...base, cx: -1000 });
    expect(() => locateStrip(img, chart)).toThrow(ReadingError);
    expect(() => locateStrip(img, chart)).toThrow(/No test strip was found/);
  });
  it("writes its diagnostics to the trace it is given", () => {
    const lines: string[] = [];
    locateStrip(drawScene(480, 360, [110, 105, 98], base), chart, (l) => lines.push(l));
    expect(lines.some((l) => l.startsWith("walk"))).toBe(true);
  });
});

describe("scaleBounds", () => {
  it("spans a strip from a fifth of the photo's long side to a little more than its diagonal", () => {
    // A 100 mm strip in a 1600 × 1200 photo (diagonal 2000 px): 3.2 to 25 px per mm.
    const c = parseChart({ ...sceneChart(base), strip: { ...sceneChart(base).strip, lengthMm: 100 } });
    const { min, max } = scaleBounds(1600, 1200, c);
    expect(min).toBeCloseTo(3.2, 5);
    expect(max).toBeCloseTo(25, 5);
  });
});
