/**
 * Pad placement under strong perspective: rendered photos of each demo chart seen through a tilted
 * camera; for every pad, how far the reader's pad centre lies from the true one, in millimetres on
 * the strip (the local scale from the true pad centres), and how far its value lies from the truth
 * in chart steps. Figures only, nothing asserted.
 *
 *   npx tsx tests/bench/perspective.ts [--n 12] [--seed0 5100] [--perspective 0.12]
 */
import fs from "node:fs";
import { renderStripPhoto } from "../render/strip-photo";
import { asRenderChart } from "../render/types";
import { parseChart, readStrip } from "../../app/reading/index";

const args = process.argv.slice(2);
const opt = (k: string, d: string) => (args.includes(k) ? args[args.indexOf(k) + 1]! : d);
const N = Number(opt("--n", "12")), seed0 = Number(opt("--seed0", "5100")), persp = Number(opt("--perspective", "0.12"));
const chartFiles = ["calibration/demo-3pad.json", "calibration/demo-6pad.json", "calibration/demo-bromine-4pad.json"];
const charts = chartFiles.map((f) => JSON.parse(fs.readFileSync(f, "utf8")));

const toIndex = (sw: { value: number }[], v: number) => {
  if (v <= sw[0]!.value) return 0;
  for (let i = 1; i < sw.length; i++) if (v <= sw[i]!.value) return i - 1 + (v - sw[i - 1]!.value) / (sw[i]!.value - sw[i - 1]!.value);
  return sw.length - 1;
};

const errs: number[] = [];
let pads = 0, in05 = 0, silent = 0, failed = 0;
for (let i = 0; i < N; i++) {
  const chart = charts[i % charts.length];
  const r = await renderStripPhoto(asRenderChart(chart), { seed: seed0 + i, perspective: persp, surface: "paper" });
  const truePx = r.conditions.padCentersPx;
  const mmOf = (a: string) => chart.pads.find((p: { analyte: string }) => p.analyte === a).centerMm as number;
  let line = `${seed0 + i} ${chart.pads.length} pads:`;
  try {
    const res = await readStrip(r.jpeg, parseChart(chart));
    for (const [k, tp] of truePx.entries()) {
      const nb = truePx[k > 0 ? k - 1 : k + 1]!;
      const local = Math.hypot(tp.x - nb.x, tp.y - nb.y) / Math.abs(mmOf(tp.analyte) - mmOf(nb.analyte));
      const part = res.pads.flatMap((p) => p.parts).find((q) => chart.pads[q.chartIndex].analyte === tp.analyte && Math.abs(mmOf(tp.analyte) - chart.pads[q.chartIndex].centerMm) < 1e-6)!;
      const e = Math.hypot(part.centre[0] - tp.x, part.centre[1] - tp.y) / local;
      errs.push(e);
      line += ` ${e.toFixed(2)}`;
    }
    for (const t of r.truth) {
      const p = res.pads.find((q) => q.analyte === t.analyte)!;
      const e = Math.abs(toIndex(chart.pads.find((q: { analyte: string }) => q.analyte === t.analyte).swatches, p.value) - t.index);
      pads++;
      if (e <= 0.5) in05++;
      else line += ` | ${t.analyte} ${e.toFixed(2)} steps off${p.needsReview ? " (flagged)" : ""}`;
      if (e > 1 && !p.needsReview) silent++;
    }
  } catch (e) {
    failed++;
    line += ` failed: ${(e as Error).message.slice(0, 50)}`;
  }
  console.log(line);
}
errs.sort((a, b) => a - b);
const q = (f: number) => errs[Math.min(errs.length - 1, Math.floor(f * errs.length))]!.toFixed(2);
console.log(`perspective ${persp}  photos ${N}  pad centre error (mm): median ${q(0.5)}  p90 ${q(0.9)}  max ${q(1)}  within 0.5 step ${((100 * in05) / Math.max(1, pads)).toFixed(1)} %  failed ${failed}  silent misreads ${silent}`);
