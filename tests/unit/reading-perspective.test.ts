/**
 * Strips photographed at a strong tilt (rendered, perspective 0.15: the frame's corners moved by up
 * to 15 % of its shorter side): the reader places every pad where the renderer's own homography
 * puts it and reads it right. Oracles: the renderer's reported pad centres (its homography applied
 * to the chart's pad positions) and its true swatch indices; "within half a chart step" is common
 * practice for reading a strip against its chart by eye. On these photos a uniform scale along the
 * strip put a pad 0.9 to 1.4 mm off (measured with tests/bench/perspective.ts).
 */
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { parseChart, readStrip } from "../../app/reading/index";
import { renderStripPhoto } from "../render/strip-photo";
import { asRenderChart } from "../render/types";

const load = (f: string) => JSON.parse(readFileSync(f, "utf8"));
const toIndex = (sw: { value: number }[], v: number) => {
  if (v <= sw[0]!.value) return 0;
  for (let i = 1; i < sw.length; i++) if (v <= sw[i]!.value) return i - 1 + (v - sw[i - 1]!.value) / (sw[i]!.value - sw[i - 1]!.value);
  return sw.length - 1;
};

describe("a strip seen at a strong tilt", () => {
  for (const [seed, file] of [[5108, "calibration/demo-bromine-4pad.json"], [5115, "calibration/demo-3pad.json"], [5120, "calibration/demo-bromine-4pad.json"]] as const) {
    it(`places and reads every pad (seed ${seed}, ${file.split("/")[1]})`, async () => {
      const doc = load(file);
      const chart = parseChart(doc);
      const r = await renderStripPhoto(asRenderChart(doc), { seed, perspective: 0.15, surface: "paper" });
      const res = await readStrip(r.jpeg, chart);
      const truth = r.conditions.padCentersPx;
      for (const [k, tp] of truth.entries()) {
        const nb = truth[k > 0 ? k - 1 : k + 1]!;
        const mm = (a: string) => chart.pads.find((p) => p.analyte === a)!.centerMm;
        // The local scale (px per mm) from the true centres of this pad and its neighbour.
        const local = Math.hypot(tp.x - nb.x, tp.y - nb.y) / Math.abs(mm(tp.analyte) - mm(nb.analyte));
        const part = res.pads.flatMap((p) => p.parts).find((q) => chart.pads[q.chartIndex]!.analyte === tp.analyte)!;
        expect(Math.hypot(part.centre[0] - tp.x, part.centre[1] - tp.y) / local).toBeLessThan(0.4);
      }
      for (const t of r.truth) {
        const p = res.pads.find((q) => q.analyte === t.analyte)!;
        expect(Math.abs(toIndex(chart.pads.find((q) => q.analyte === t.analyte)!.swatches, p.value) - t.index)).toBeLessThanOrEqual(0.5);
      }
    }, 60_000);
  }
});
