/**
 * Robustness sweep of the strip reader over rendered photos: every chart, surface, cast, random
 * rotations, glare and shadow. Prints the share of pads within 0.5 and 1 chart step, the failures and
 * the silent misreads (a pad more than one step off that was not flagged for review).
 *
 *   npx tsx tests/bench/robustness.ts [--n 60] [--seed0 7000] [--cache /tmp/dipwell-robustness]
 *     [--charts a.json,b.json] [--harsh] [--only <seed> [--trace]]
 *
 * --charts replaces the four charts swept; --harsh renders every photo in harsher conditions
 * (strong perspective, blur, noise, glare, uneven light, under- and overexposure, low JPEG quality).
 * --no-strip renders the same surfaces and light with no strip on them: every photo must be
 * refused as showing no strip; it prints how many were read anyway.
 * --only reads the one photo of that seed in the sweep (same conditions as in the full sweep);
 * --trace prints the locator's diagnostics for it on stderr.
 * --detail also lists the pads more than half a step off (not only those more than one step off).
 */
import fs from "node:fs";
import path from "node:path";
import { renderStripPhoto } from "../render/strip-photo";
import { asRenderChart } from "../render/types";
import { parseChart, readStrip } from "../../app/reading/index";

const args = process.argv.slice(2);
const opt = (k: string, d: string) => (args.includes(k) ? args[args.indexOf(k) + 1]! : d);
const N = Number(opt("--n", "60")), seed0 = Number(opt("--seed0", "7000"));
const cache = opt("--cache", "/tmp/dipwell-robustness");
fs.mkdirSync(cache, { recursive: true });

const harsh = args.includes("--harsh");
const noStrip = args.includes("--no-strip");
const chartFiles = opt("--charts", "calibration/demo-3pad.json,calibration/demo-6pad.json,calibration/demo-bromine-4pad.json,../shared/eval/charts/practice-3pad.json").split(",");
const charts = chartFiles.map((f) => JSON.parse(fs.readFileSync(f, "utf8")));
const surfaces = ["paper", "counter", "wood", "cloth", "tiles"] as const;
const casts = ["daylight", "warm", "cool", "fluorescent"] as const;
const pale = ["#f2f2f0", "#efece4", "#f4f4f4"];

/** Position of a value on a pad's swatch scale, in steps (piecewise linear). */
function toIndex(sw: { value: number }[], v: number): number {
  if (v <= sw[0]!.value) return 0;
  for (let i = 1; i < sw.length; i++) if (v <= sw[i]!.value) return i - 1 + (v - sw[i - 1]!.value) / (sw[i]!.value - sw[i - 1]!.value);
  return sw.length - 1;
}

let pads = 0, in05 = 0, in1 = 0, silent = 0, flagged = 0;
const fails: string[] = [], worst: string[] = [];
const reasons = new Map<string, number>();
const only = args.includes("--only") ? Number(opt("--only", "0")) : null;
const detail = args.includes("--detail");
const trace = args.includes("--trace") ? (line: string) => console.error(line) : undefined;
for (let i = 0; i < N; i++) {
  const seed = seed0 + i;
  if (only !== null && seed !== only) continue;
  const ci = i % charts.length, chart = charts[ci];
  const surface = surfaces[Math.floor(i / 4) % 5]!;
  const o = {
    seed,
    surface,
    surfaceColor: i % 3 === 0 ? pale[(i / 3) % 3] : undefined,
    cast: casts[(i + Math.floor(i / 20)) % 4],
    shadow: i % 5 === 2,
    glare: i % 7 === 3 ? 2 : undefined,
    ...(harsh
      ? { perspective: 0.07, blur: 1.4, noise: 1.8, quality: 68, glare: 1 + (i % 4), shadow: i % 2 === 0, exposure: [0.7, 1, 1.3][i % 3], light: { gradient: 0.5, vignette: 0.35 } }
      : {}),
  };
  const tag = `${seed}${harsh ? " harsh" : ""} ${path.basename(chartFiles[ci]!, ".json")} ${surface}${o.surfaceColor ?? ""} ${o.cast}${o.shadow ? " shadow" : ""}${o.glare ? " glare" : ""}`;
  const key = `${seed}${harsh ? "-harsh" : ""}${noStrip ? "-nostrip" : ""}-${path.basename(chartFiles[ci]!, ".json")}`;
  const file = path.join(cache, `${key}.jpg`), tfile = path.join(cache, `${key}.json`);
  let truth: { analyte: string; index: number }[], rot: number, conditions: unknown;
  if (fs.existsSync(file) && fs.existsSync(tfile)) ({ truth, rot, conditions } = JSON.parse(fs.readFileSync(tfile, "utf8")));
  else {
    const r = await renderStripPhoto(asRenderChart(chart), { ...o, ...(noStrip ? { noStrip: true } : {}) });
    fs.writeFileSync(file, r.jpeg);
    truth = r.truth;
    rot = r.conditions.rotationDeg;
    conditions = r.conditions;
    fs.writeFileSync(tfile, JSON.stringify({ truth, rot, conditions }));
  }
  if (trace) {
    const c = conditions as { width: number; height: number; pxPerMm: number; centre: number[]; stripCornersPx: number[][] | null } | undefined;
    if (c) console.error("truth", JSON.stringify({ size: [c.width, c.height], pxPerMm: c.pxPerMm, centre: c.centre, corners: c.stripCornersPx }), "photo", file);
  }
  if (noStrip) {
    const err = await readStrip(fs.readFileSync(file), parseChart(chart), { trace }).then(() => null, (e: unknown) => e as { code?: string });
    if (!err || err.code !== "no_strip") fails.push(`${tag}: ${err ? `refused otherwise (${err.code})` : "read as a strip"}`);
    continue;
  }
  try {
    const res = await readStrip(fs.readFileSync(file), parseChart(chart), { trace });
    for (const t of truth) {
      const p = res.pads.find((q) => q.analyte === t.analyte)!;
      const e = Math.abs(toIndex(chart.pads.find((q: { analyte: string }) => q.analyte === t.analyte).swatches, p.value) - t.index);
      pads++;
      if (e <= 0.5) in05++;
      if (e <= 1) in1++;
      // A silent misread: more than one step off, yet not flagged for review.
      if (e > 1 && !p.needsReview) silent++;
      if (p.needsReview) {
        flagged++;
        // Why pads go to review, counted per reason (the pad's name left out).
        for (const r of (p.reason ?? "").replace(/^Please check [^:]*: /, "").replace(/\.$/, "").split("; ")) reasons.set(r, (reasons.get(r) ?? 0) + 1);
      }
      if (trace) console.error("read", t.analyte, "value", p.value, "off", e.toFixed(2), "steps", p.needsReview ? `flagged: ${p.reason}` : "");
      if (e > 1 || (detail && e > 0.5)) worst.push(`${tag} rot ${rot} ${t.analyte} ${e.toFixed(2)} steps${p.needsReview ? " (flagged)" : " (silent)"}`);
    }
  } catch (e) {
    pads += truth.length;
    fails.push(`${tag} rot ${rot}: ${(e as Error).message.slice(0, 60)}`);
  }
}
if (noStrip) {
  console.log(`photos with no strip ${only !== null ? 1 : N}  refused as showing none ${(only !== null ? 1 : N) - fails.length}  not ${fails.length}`);
  for (const f of fails) console.log("  NOT REFUSED", f);
  process.exit(0);
}
console.log(`photos ${only !== null ? 1 : N}  pads ${pads}  within 0.5 step ${((100 * in05) / pads).toFixed(1)} %  within 1 step ${((100 * in1) / pads).toFixed(1)} %  failed photos ${fails.length}  flagged pads ${flagged}  silent misreads ${silent}`);
for (const f of fails) console.log("  FAIL", f);
for (const w of worst) console.log("  off ", w);
for (const [r, n] of [...reasons].sort((a, b) => b[1] - a[1])) console.log(`  review ${n} × ${r}`);
