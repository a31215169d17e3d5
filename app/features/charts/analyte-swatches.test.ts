// One entry per analyte for the screens, an analyte on several pads with its pads' colours side by side.
// Charts: the invented demo charts in calibration/ (demo data).
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { analyteSwatches } from "./analyte-swatches";

const load = (f: string) => JSON.parse(readFileSync(`calibration/${f}`, "utf8"));

describe("analyteSwatches", () => {
  it("a wide-range strip's four pH pads give one pH entry, each value with its four colours in pad order", () => {
    const chart = load("demo-wide-ph-4pad.json");
    const groups = analyteSwatches(chart.pads);
    expect(groups.map((g) => [g.analyte, g.pads])).toEqual([["ph", 4]]);
    expect(groups[0].swatches.map((s) => s.value)).toEqual([4, 5, 6, 7, 8, 9, 10]);
    expect(groups[0].swatches[3].colors).toEqual(chart.pads.map((p: { swatches: { color: string }[] }) => p.swatches[3].color));
    expect(groups[0].swatches[3].color).toBe(chart.pads[0].swatches[3].color);
  });

  it("a chart with one pad per analyte is unchanged: one colour per value, chart order kept", () => {
    const chart = load("demo-3pad.json");
    const groups = analyteSwatches(chart.pads);
    expect(groups.map((g) => g.analyte)).toEqual(chart.pads.map((p: { analyte: string }) => p.analyte));
    for (const [i, g] of groups.entries()) {
      expect(g.pads).toBe(1);
      expect(g.swatches).toEqual(chart.pads[i].swatches.map((s: { value: number; color: string }) => ({ value: s.value, color: s.color, colors: [s.color] })));
    }
  });

  it("pads of one analyte apart on the strip are grouped under the first", () => {
    const pad = (analyte: string, color: string) => ({ analyte, label: analyte, unit: "", swatches: [{ value: 1, color }] });
    const groups = analyteSwatches([pad("a", "#111111"), pad("b", "#222222"), pad("a", "#333333")]);
    expect(groups.map((g) => [g.analyte, g.swatches[0].colors])).toEqual([["a", ["#111111", "#333333"]], ["b", ["#222222"]]]);
  });
});
