// Rows of pads at several colour levels: strongly coloured pads close together on a pale strip
// (their halos merge into one blob at the lowest level) are still found as a row.
import { describe, expect, it } from "vitest";
import { drawScene, sceneChart, scenePoint, threePadStrip } from "../../tests/reading/strip-scene";
import { parseChart } from "./chart";
import { padRowCandidates, padRows } from "./pad-row";

describe("padRowCandidates at several levels", () => {
  it("finds the row of strongly coloured pads set close together on a strip the colour of the surface", () => {
    const strip = {
      ...threePadStrip({ cx: 300, cy: 220, angleDeg: -40, pxPerMm: 3 }),
      color: [226, 214, 192] as [number, number, number],
      pads: [
        { centerMm: 4, sizeMm: 5.5, color: [190, 110, 160] as [number, number, number] },
        { centerMm: 11.5, sizeMm: 5.5, color: [210, 70, 40] as [number, number, number] },
        { centerMm: 19, sizeMm: 5.5, color: [220, 180, 40] as [number, number, number] },
      ],
    };
    const chart = parseChart(sceneChart(strip));
    const cands = padRowCandidates(drawScene(640, 440, [226, 214, 192], strip), 1, chart);
    const handle = scenePoint(strip, (22 + 80) / 2);
    expect(cands.some((c) => Math.hypot(c.cx - handle[0], c.cy - handle[1]) < 8)).toBe(true);
  });
});

describe("padRows", () => {
  const chart = parseChart(sceneChart(threePadStrip({ cx: 0, cy: 0, angleDeg: 0, pxPerMm: 1 })));
  const blob = (cx: number, cy: number) => ({ cx, cy, angle: 0, length: 5, width: 5, score: 0, n: 25 });
  it("makes a row of three pad-sized blobs on a line, along it", () => {
    const rows = padRows([blob(10, 10), blob(17, 10), blob(24, 10)], chart);
    expect(rows.length).toBeGreaterThan(0);
    expect(rows[0].cx).toBeCloseTo(17, 5);
    expect(Math.abs(Math.sin(rows[0].angle))).toBeLessThan(1e-6);
  });
  // The chart's pads are 5 mm, centred 4, 11 and 18 mm from the tip: spacings of 1.4 and 2.8
  // pad sizes.
  it("makes a row of two blobs at a spacing two of the chart's pads have (the third as pale as the plastic)", () => {
    const rows = padRows([blob(10, 10), blob(17, 10)], chart);
    expect(rows.length).toBe(1);
    expect(rows[0].n).toBe(2);
    expect(rows[0].cx).toBeCloseTo(13.5, 5);
    expect(padRows([blob(10, 10), blob(24, 10)], chart).length).toBe(1);
  });
  it("makes no row of two blobs at a spacing the chart lacks, nor of three off one line", () => {
    expect(padRows([blob(10, 10), blob(20, 10)], chart)).toEqual([]);
    expect(padRows([blob(10, 10), blob(14, 19), blob(20, 10)], chart)).toEqual([]);
  });
});
