// The rule that sends a reading to review. Distances are CIEDE2000 (CIE 142-2001; the
// implementation is checked against the published test pairs in colour.test.ts). Sending an
// unsure reading to a person instead of showing it as a normal value is common practice for
// automated colorimetric readers; the thresholds themselves are the product's own (index.ts).
import fs from "node:fs";
import { describe, expect, it } from "vitest";
import { parseChart, type ChartPad } from "./chart";
import { lerpLab, type Lab } from "./colour";
import { FAR_FROM_PATH, judgeAnalyte, judgeStrip, REVIEW_BELOW, STRIP_FAR_FROM_CHART } from "./judge";
import { matchSwatches } from "./match";
import type { PadMeasurement } from "./measure-pads";

const demo3 = parseChart(JSON.parse(fs.readFileSync("calibration/demo-3pad.json", "utf8")));
const ph = demo3.pads.find((p) => p.analyte === "ph")!;

function measured(lab: Lab, o: { spread?: number; clipped?: number; glare?: number } = {}): PadMeasurement {
  const lin: [number, number, number] = [0.5, 0.4, 0.3];
  return {
    lab,
    spread: o.spread ?? 0.3,
    sample: { linear: lin, q25: lin, q75: lin, spreadDeltaE: o.spread ?? 0.3, pixels: 400, kept: 380, glareFraction: o.glare ?? 0, clippedFraction: o.clipped ?? 0 },
    white: [0.9, 0.9, 0.9],
    plasticLike: false,
    missing: false,
    centre: [100, 100],
    half: 10,
  };
}
const judge = (pads: ChartPad[], ms: PadMeasurement[], doubts: string[] = []) => judgeAnalyte(pads[0].analyte, pads, ms, pads.map((_, i) => i), 1, doubts);

// Between the 7.2 and 7.6 swatches: a clean reading of pH 7.4.
const clean = lerpLab(ph.swatches[2].lab, ph.swatches[3].lab, 0.5);
const halfStep = matchSwatches(ph, clean).halfStep;

describe("judgeAnalyte: when a reading goes to review", () => {
  it("a clean reading on the chart's path is not flagged", () => {
    const r = judge([ph], [measured(clean)]);
    expect(r.value).toBeCloseTo(7.4, 2);
    expect(r.needsReview).toBe(false);
    expect(r.reason).toBeUndefined();
    expect(r.confidence).toBeGreaterThan(0.95);
  });
  it("a colour far from every printed colour is flagged, in those words", () => {
    const blue: Lab = { l: 45, a: 10, b: -55 };
    const r = judge([ph], [measured(blue)]);
    expect(r.needsReview).toBe(true);
    expect(r.reason).toMatch(/^Please check pH: .*its colour is far from every colour printed on the chart/);
  });
  it("several pads far from every printed set of colours are flagged, in those words", () => {
    const pads = [ph, ph];
    const r = judge(pads, [measured(clean), measured({ l: 45, a: 10, b: -55 })]);
    expect(r.needsReview).toBe(true);
    expect(r.reason).toMatch(/its pads' colours are far from every set of colours printed on the chart/);
  });
  it("a colour far from the path between two very different printed colours is flagged, though within half their step", () => {
    const wide = parseChart({
      format: "strip-chart/1",
      name: "two far-apart colours (made up for this check)",
      strip: { widthMm: 5, lengthMm: 80, color: "#f4f4f0" },
      pads: [{ analyte: "y", label: "Y", unit: "u", centerMm: 4, sizeMm: 5, swatches: [{ value: 2, color: "#e0b020" }, { value: 10, color: "#302850" }] }],
    }).pads;
    const mid = lerpLab(wide[0].swatches[0].lab, wide[0].swatches[1].lab, 0.5);
    const off: Lab = { l: mid.l, a: mid.a + 30, b: mid.b };
    const m = matchSwatches(wide[0], off);
    expect(m.deltaE).toBeLessThan(m.halfStep);
    expect(m.deltaE).toBeGreaterThan(FAR_FROM_PATH);
    const r = judge(wide, [measured(off)]);
    expect(r.needsReview).toBe(true);
    expect(r.reason).toMatch(/its colour is far from every colour printed on the chart/);
    // On the path, the same chart reads cleanly.
    expect(judge(wide, [measured(mid)]).needsReview).toBe(false);
  });
  it("an uneven pad (spread near a half step) is flagged as uneven", () => {
    const r = judge([ph], [measured(clean, { spread: 1.2 * halfStep })]);
    expect(r.needsReview).toBe(true);
    expect(r.reason).toMatch(/its colour is uneven \(glare, shadow or a drip on the pad\)/);
  });
  it("a colour that also resembles another part of the chart is flagged as ambiguous", () => {
    // A made-up pad whose colour path turns back: the 3 swatch nearly repeats the 1 swatch.
    const folded = parseChart({
      format: "strip-chart/1",
      name: "folded path (made up for this check)",
      strip: { widthMm: 5, lengthMm: 80, color: "#f4f4f0" },
      pads: [{ analyte: "x", label: "X", unit: "u", centerMm: 4, sizeMm: 5, swatches: [
        { value: 0, color: "#e8e0c0" }, { value: 1, color: "#c07090" }, { value: 2, color: "#6070c0" }, { value: 3, color: "#c27191" }] }],
    }).pads;
    const r = judge(folded, [measured(folded[0].swatches[1].lab)]);
    expect(r.needsReview).toBe(true);
    expect(r.reason).toMatch(/its colour also resembles another part of the chart/);
  });
  it("overexposure and glare lower the confidence; together they send a clean colour to review, each named", () => {
    const over = judge([ph], [measured(clean, { clipped: 0.5 })]);
    expect(over.confidence).toBeLessThan(0.75);
    const both = judge([ph], [measured(clean, { clipped: 0.5, glare: 0.4 })]);
    expect(both.confidence).toBeLessThan(REVIEW_BELOW);
    expect(both.needsReview).toBe(true);
    expect(both.reason).toMatch(/the photo is overexposed there/);
    expect(both.reason).toMatch(/there is glare on the pad/);
  });
  it("a placement in doubt sends even a perfect colour to review, with the doubt in plain words", () => {
    for (const doubt of [
      "the tip and the handle of the strip could not be told apart, so the pads may be read in the wrong order",
      "neither end of the strip could be seen clearly, so the pads were placed from their colours alone",
    ]) {
      const r = judge([ph], [measured(ph.swatches[3].lab)], [doubt]);
      expect(r.needsReview).toBe(true);
      expect(r.confidence).toBeLessThan(REVIEW_BELOW);
      expect(r.reason).toBe(`Please check pH: ${doubt}.`);
    }
  });
});

describe("judgeStrip: a strip whose pads mostly match no printed colour", () => {
  const pads = demo3.pads;
  const groups = pads.map((p, i) => [p.analyte, [i]] as [string, number[]]);
  // Each pad's own colour halfway between its second and third swatches: on the chart.
  const onChart = pads.map((p) => measured(lerpLab(p.swatches[1].lab, p.swatches[2].lab, 0.5)));
  const blue = measured({ l: 45, a: 10, b: -55 }), green = measured({ l: 40, a: -60, b: 40 });
  it("flags every pad when more than half lie far from the chart, the matching one with the reason", () => {
    const rs = judgeStrip(pads, [blue, green, onChart[2]], groups, 1, []);
    expect(rs.every((r) => r.needsReview)).toBe(true);
    expect(rs[2].confidence).toBeLessThan(REVIEW_BELOW);
    expect(rs[2].reason).toBe(`Please check ${pads[2].label}: ${STRIP_FAR_FROM_CHART}.`);
    expect(rs[0].reason).not.toContain(STRIP_FAR_FROM_CHART);
  });
  it("leaves the others alone when only one of three is far (a value beyond the chart's range)", () => {
    const rs = judgeStrip(pads, [blue, onChart[1], onChart[2]], groups, 1, []);
    expect(rs.map((r) => r.needsReview)).toEqual([true, false, false]);
  });
  it("reads a strip on the chart as judgeAnalyte does, pad by pad", () => {
    const rs = judgeStrip(pads, onChart, groups, 1, []);
    rs.forEach((r, i) => expect(r).toEqual(judgeAnalyte(pads[i].analyte, [pads[i]], [onChart[i]], [i], 1, [])));
  });
});
