import fs from "node:fs";
import { describe, expect, it } from "vitest";
import { parseChart } from "./chart";
import { RefitError, refitFromSolutions, robustMeanLab } from "./refit";

// Invented demo chart (calibration/demo-3pad.json).
const chart = parseChart(JSON.parse(fs.readFileSync("calibration/demo-3pad.json", "utf8")));

describe("refit from reference solutions: bad input", () => {
  it("refuses no samples", async () => {
    await expect(refitFromSolutions(chart, [])).rejects.toThrow(/at least one strip photo/);
  });
  it("skips a photo that is empty, truncated or not an image, and names it; refuses when none is left", async () => {
    const jpeg = Buffer.alloc(0);
    const err = await refitFromSolutions(chart, [
      { photo: jpeg, known: { ph: 7.4 }, name: "empty.jpg" },
      { photo: Buffer.from("not a photo at all"), known: { ph: 7.4 }, name: "notes.txt" },
    ]).catch((e) => e);
    expect(err).toBeInstanceOf(RefitError);
    expect(err.message).toMatch(/None of the 2 photos could be used/);
    expect(err.message).toMatch(/empty\.jpg/);
    expect(err.message).toMatch(/notes\.txt/);
  });
  it("does not use an analyte the chart lacks, nor a value far outside the chart's range", async () => {
    const err = await refitFromSolutions(chart, [
      { photo: Buffer.alloc(10), known: { nitrate: 10 }, name: "a.jpg" },
      { photo: Buffer.alloc(10), known: { ph: 70 }, name: "b.jpg" },
    ]).catch((e) => e);
    expect(err).toBeInstanceOf(RefitError);
    expect(err.message).toMatch(/a\.jpg: none of its known values can be used/);
  });
});

describe("robust mean of one pad's colours at one value", () => {
  it("leaves out a colour far from the others (a misplaced pad) and averages the rest", () => {
    const labs = [
      { l: 60, a: 10, b: 40 },
      { l: 61, a: 11, b: 41 },
      { l: 59, a: 9, b: 39 },
      { l: 30, a: -20, b: -10 },
    ];
    const r = robustMeanLab(labs);
    expect(r.kept).toEqual([0, 1, 2]);
    expect(r.lab.l).toBeCloseTo(60, 6);
  });
  it("keeps everything with fewer than three colours", () => {
    expect(robustMeanLab([{ l: 50, a: 0, b: 0 }, { l: 70, a: 0, b: 0 }]).lab.l).toBe(60);
  });
});
