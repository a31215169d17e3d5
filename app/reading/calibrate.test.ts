// Chart calibration from a photo of the printed chart card.
// Oracles: colorjs.io (a general-purpose colour library, independent of app/reading/colour.ts) for
// CIEDE2000 between the calibrated and the printed swatches; the renderer's known layout and
// printed colours (tests/render/chart-photo.ts) as ground truth. The 2 ΔE00 bound is the issue's
// acceptance figure; about 1 ΔE00 is commonly quoted as a just-noticeable difference (common practice,
// from memory)
// (Sharma, Wu and Dalal 2005 discuss CIEDE2000's scaling).
import { readFileSync } from "node:fs";
import Color from "colorjs.io";
import { describe, expect, it } from "vitest";
import { renderChartPhoto } from "../../tests/render/chart-photo";
import { parseChart } from "./chart";
import { CalibrationError, cellQuads, proposeFromSample, sampleChartPhoto, unitSquareToQuad, validateGrid, type Quad } from "./calibrate";

const chart = parseChart(JSON.parse(readFileSync(new URL("../../calibration/demo-3pad.json", import.meta.url), "utf8")));
const de = (a: string, b: string) => new Color(a).deltaE(new Color(b), "2000");

describe("grid geometry", () => {
  it("maps the unit square onto the quad's corners and keeps the centre of a parallelogram", () => {
    const q: Quad = [[10, 20], [110, 30], [120, 230], [5, 200]];
    const m = unitSquareToQuad(q);
    for (const [u, v, p] of [[0, 0, q[0]], [1, 0, q[1]], [1, 1, q[2]], [0, 1, q[3]]] as const) {
      const [x, y] = m(u, v);
      expect(x).toBeCloseTo(p[0], 6);
      expect(y).toBeCloseTo(p[1], 6);
    }
    const par = unitSquareToQuad([[0, 0], [100, 0], [120, 50], [20, 50]]);
    expect(par(0.5, 0.5)).toEqual([60, 25]);
  });

  it("gives rows x cols cell quads centred in their cells", () => {
    const cells = cellQuads({ corners: [[0, 0], [60, 0], [60, 30], [0, 30]], rows: 3, cols: 6, sampleFill: 0.5 });
    expect(cells).toHaveLength(3);
    expect(cells[0]).toHaveLength(6);
    const want = [[22.5, 12.5], [27.5, 12.5], [27.5, 17.5], [22.5, 17.5]];
    cells[1][2].forEach((p, i) => {
      expect(p[0]).toBeCloseTo(want[i][0], 9);
      expect(p[1]).toBeCloseTo(want[i][1], 9);
    });
  });

  it("refuses a grid dragged off the photo or folded over, in plain words", () => {
    expect(() => validateGrid({ corners: [[-40, 0], [60, 0], [60, 30], [0, 30]], rows: 3, cols: 6 }, 100, 100)).toThrow(/outside the photo/);
    expect(() => validateGrid({ corners: [[0, 0], [60, 30], [60, 0], [0, 30]], rows: 3, cols: 6 }, 100, 100)).toThrow(/folded over/);
    expect(() => validateGrid({ corners: [[0, 0], [60, 0], [60, 30], [0, 30]], rows: 0, cols: 6 }, 100, 100)).toThrow(/rows/);
  });
});

describe("calibrating from a chart photo", () => {
  for (const [cast, seed] of [["warm", 3], ["cool", 5], ["fluorescent", 7], ["daylight", 11]] as const) {
    it(`under a ${cast} cast, every swatch comes back within 2 ΔE00 of the printed colour`, async () => {
      const photo = await renderChartPhoto(chart, { seed, cast, width: 1600, height: 1200 });
      const { corners, rows, cols, white } = photo.layout;
      const sample = await sampleChartPhoto(photo.jpeg, { corners, rows, cols }, white);
      const { definition, changes } = proposeFromSample(chart, sample);
      let worst = 0;
      definition.pads.forEach((p, r) => p.swatches.forEach((s, c) => (worst = Math.max(worst, de(s.color, photo.truth[r][c])))));
      expect(worst, `worst ΔE00 under ${cast}`).toBeLessThan(2);
      expect(changes).toHaveLength(18);
      // The result is a valid strip-chart/1 document.
      expect(parseChart(definition).pads).toHaveLength(3);
    });
  }

  it("refuses a white area that is not blank paper (a swatch marked as white)", async () => {
    const photo = await renderChartPhoto(chart, { seed: 2, cast: "warm", width: 1600, height: 1200 });
    const { corners, rows, cols } = photo.layout;
    const swatch = cellQuads({ corners, rows, cols, sampleFill: 0.4 })[2][5];
    await expect(sampleChartPhoto(photo.jpeg, { corners, rows, cols }, swatch)).rejects.toThrow(CalibrationError);
    await expect(sampleChartPhoto(photo.jpeg, { corners, rows, cols }, swatch)).rejects.toThrow(/white/);
  });

  it("refuses a white area on the dark surface beside the card", async () => {
    const photo = await renderChartPhoto(chart, { seed: 4, width: 1600, height: 1200, surface: "counter", surfaceColor: "#303438" });
    const { corners, rows, cols } = photo.layout;
    const dark: Quad = [[5, 5], [60, 5], [60, 60], [5, 60]];
    await expect(sampleChartPhoto(photo.jpeg, { corners, rows, cols }, dark)).rejects.toThrow(/white/);
  });

  it("refuses a grid dragged off the photo", async () => {
    const photo = await renderChartPhoto(chart, { seed: 6, width: 1600, height: 1200 });
    const { corners, rows, cols, white } = photo.layout;
    const off = corners.map(([x, y], i) => (i === 1 ? [x + 5000, y] : [x, y])) as Quad;
    await expect(sampleChartPhoto(photo.jpeg, { corners: off, rows, cols }, white)).rejects.toThrow(/outside the photo/);
  });
});
