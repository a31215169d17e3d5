import fs from "node:fs";
import { describe, expect, it } from "vitest";
import { ChartError, exportChart, parseChart } from "./chart";

// The demo charts are invented data (calibration/); the format is described in shared/eval/README.md.
const demo3 = JSON.parse(fs.readFileSync("calibration/demo-3pad.json", "utf8"));
const demo6 = JSON.parse(fs.readFileSync("calibration/demo-6pad.json", "utf8"));
const clone = (o: unknown) => JSON.parse(JSON.stringify(o));

describe("strip-chart/1 parsing", () => {
  it("reads the demo charts", () => {
    expect(parseChart(demo3).pads).toHaveLength(3);
    const c6 = parseChart(demo6);
    expect(c6.pads.map((p) => p.analyte)).toEqual(["total_hardness", "total_chlorine", "free_chlorine", "ph", "total_alkalinity", "cyanuric_acid"]);
    expect(c6.strip.lab.l).toBeGreaterThan(90);
  });
  it("round-trips through export", () => {
    for (const c of [demo3, demo6]) {
      const once = exportChart(parseChart(c));
      expect(once).toEqual(c);
      expect(exportChart(parseChart(JSON.parse(JSON.stringify(once))))).toEqual(once);
    }
  });
  it("accepts one analyte on several pads with the same swatch values, and refuses different values", () => {
    const c = clone(demo3);
    c.pads[2] = { ...clone(c.pads[1]), centerMm: c.pads[2].centerMm };
    expect(parseChart(c).pads.filter((p) => p.analyte === "ph")).toHaveLength(2);
    c.pads[2].swatches[0].value += 0.1;
    expect(() => parseChart(c)).toThrow(/pads 2 and 3 both read "ph", so they must list the same swatch values/);
  });
  it("refuses a pad with a single swatch", () => {
    const c = clone(demo3);
    c.pads[1].swatches = c.pads[1].swatches.slice(0, 1);
    expect(() => parseChart(c)).toThrow(ChartError);
    expect(() => parseChart(c)).toThrow(/pad 2 \(ph\).*at least 2/);
  });
  it("refuses swatch values that do not rise", () => {
    const c = clone(demo3);
    c.pads[0].swatches[2].value = 0.2;
    expect(() => parseChart(c)).toThrow(/must rise/);
  });
  it("refuses the wrong format and a later version", () => {
    expect(() => parseChart({ ...clone(demo3), format: "something-else" })).toThrow(/not a strip colour chart/);
    expect(() => parseChart({ ...clone(demo3), format: "strip-chart/2" })).toThrow(/version "strip-chart\/2"/);
    expect(() => parseChart("hello")).toThrow(ChartError);
    expect(() => parseChart(null)).toThrow(ChartError);
  });
  it("refuses bad colours, overlapping pads and pads off the strip", () => {
    const bad = clone(demo3);
    bad.pads[0].swatches[0].color = "pink";
    expect(() => parseChart(bad)).toThrow(/colour written like/);
    const overlap = clone(demo3);
    overlap.pads[1].centerMm = overlap.pads[0].centerMm + 2;
    expect(() => parseChart(overlap)).toThrow(/overlap/);
    const off = clone(demo3);
    off.pads[2].centerMm = off.strip.lengthMm - 1;
    expect(() => parseChart(off)).toThrow(/outside/);
    const missing = clone(demo3);
    delete missing.strip.widthMm;
    expect(() => parseChart(missing)).toThrow(/strip.widthMm is missing/);
  });
});
