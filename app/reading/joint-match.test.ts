import { describe, expect, it } from "vitest";
import { parseChart } from "./chart";
import { deltaE2000, lerpLab } from "./colour";
import { analyteGroups, matchJoint } from "./joint-match";
import { matchSwatches } from "./match";

// An invented 4-pad wide-range strip (demo data): one analyte on every pad, same values.
const wide = parseChart({
  format: "strip-chart/1",
  name: "wide-range demo",
  strip: { widthMm: 6, lengthMm: 78, color: "#f4f3ef" },
  pads: [
    ["#e0a030", "#7a6a40", "#40385a", "#302a50"],
    ["#e8b020", "#8aa040", "#4a6a50", "#203040"],
    ["#90a870", "#a0b060", "#a06070", "#904060"],
    ["#e0b030", "#d8b028", "#d8a030", "#c88040"],
  ].map((colours, i) => ({
    analyte: "ph",
    label: "pH",
    unit: "pH",
    centerMm: 4 + 7 * i,
    sizeMm: 5.5,
    swatches: colours.map((color, k) => ({ value: [2, 5, 8, 11][k], color })),
  })),
});

const at = (s: number) => wide.pads.map((p) => lerpLab(p.swatches[Math.floor(s)].lab, p.swatches[Math.min(3, Math.floor(s) + 1)].lab, s - Math.floor(s)));

describe("joint matching of an analyte on several pads", () => {
  it("groups the chart's pads by analyte in order", () => {
    expect(analyteGroups(wide.pads)).toEqual([["ph", [0, 1, 2, 3]]]);
    expect(analyteGroups([{ analyte: "a" }, { analyte: "b" }, { analyte: "a" }])).toEqual([["a", [0, 2]], ["b", [1]]]);
  });
  it("finds the position of colours lying on the joint path (constructed: exact path colours)", () => {
    for (const s of [0, 0.4, 1, 1.7, 2.5, 3]) {
      const m = matchJoint(wide.pads, at(s));
      expect(m.swatchIndex).toBeCloseTo(s, 2);
      expect(m.deltaE).toBeLessThan(0.05);
      expect(m.padDeltaE).toHaveLength(4);
    }
    // value: piecewise linear between swatch values (2, 5, 8, 11)
    expect(matchJoint(wide.pads, at(1.5)).value).toBeCloseTo(6.5, 2);
  });
  it("one pad that disagrees does not move the reading far when the others agree", () => {
    const colours = at(2);
    colours[3] = wide.pads[3].swatches[0].lab; // the least-changing pad reads as if at the first swatch
    const m = matchJoint(wide.pads, colours);
    expect(Math.abs(m.swatchIndex - 2)).toBeLessThan(0.5);
    expect(m.padDeltaE[3]).toBeGreaterThan(m.padDeltaE[0]);
  });
  it("a single pad matches exactly as the single-pad match does", () => {
    const pad = wide.pads[1];
    const x = { l: 60, a: -10, b: 30 };
    const joint = matchJoint([pad], [x]);
    const single = matchSwatches(pad, x);
    expect(joint.value).toBe(single.value);
    expect(joint.deltaE).toBe(single.deltaE);
  });
  it("the joint distance is the root of the pads' squared CIEDE2000 distances", () => {
    const colours = at(1.2).map((l) => ({ ...l, l: l.l + 3 }));
    const m = matchJoint(wide.pads, colours);
    const root = Math.sqrt(m.padDeltaE.reduce((s, d) => s + d * d, 0));
    expect(m.deltaE).toBeCloseTo(root, 6);
    expect(m.padDeltaE[0]).toBeCloseTo(deltaE2000(colours[0], at(m.swatchIndex)[0]), 6);
  });
  it("a pad's colour matched again gives the same match, and a pad with other swatches is matched afresh", () => {
    const pad = wide.pads[2];
    const x = { l: 55, a: 20, b: 5 };
    const first = matchSwatches(pad, x);
    first.value = -1; // a caller changing its copy does not change the next answer
    const again = matchSwatches(pad, x);
    expect(again.value).not.toBe(-1);
    expect(again).toEqual(matchSwatches({ ...pad }, x));
    expect(matchSwatches(pad, { ...x })).toEqual(again);
    const reversed = { ...pad, swatches: [...pad.swatches].reverse().map((s, k) => ({ ...s, value: pad.swatches[k].value })) };
    expect(matchSwatches(reversed, x).value).not.toBeCloseTo(again.value, 3);
    // Mutating the pad's swatch list in place (a new list) is seen too.
    const copy = { ...pad };
    matchSwatches(copy, x);
    copy.swatches = reversed.swatches;
    expect(matchSwatches(copy, x).value).toBe(matchSwatches(reversed, x).value);
    // A colour object changed in place is matched afresh.
    const y = { ...x };
    const before = matchSwatches(pad, y).value;
    y.a = -30;
    expect(matchSwatches(pad, y).value).not.toBeCloseTo(before, 3);
  });
});
