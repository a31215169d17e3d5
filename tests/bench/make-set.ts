// Renders a scoring set with the synthetic photo renderer (tests/render) for the demo charts,
// in the layout /work/shared/eval/score.mjs reads: DIR/<photos>, DIR/truth.json, DIR/../charts.
//
//   npx tsx tests/bench/make-set.ts <dir> [count per chart and tier]
import fs from "node:fs";
import path from "node:path";
import { renderStripPhoto, type StripPhotoOptions } from "../render/strip-photo";
import { asRenderChart } from "../render/types";

const dir = path.resolve(process.argv[2] ?? "/tmp/dipwell-set/photos");
const count = Number(process.argv[3] ?? 6);
const charts = ["calibration/demo-3pad.json", "calibration/demo-6pad.json"];
fs.mkdirSync(dir, { recursive: true });
fs.mkdirSync(path.join(dir, "..", "charts"), { recursive: true });
const surfaces = ["paper", "counter", "wood", "cloth", "tiles"] as const;
const casts = ["daylight", "warm", "cool", "fluorescent"] as const;
const photos: object[] = [];
let seed = 1000;
for (const c of charts) {
  const chart = asRenderChart(JSON.parse(fs.readFileSync(c, "utf8")));
  const name = path.basename(c);
  fs.copyFileSync(c, path.join(dir, "..", "charts", name));
  for (const tier of ["easy", "hard", "harsh"] as const) {
    for (let i = 0; i < count; i++) {
      seed++;
      const opts: StripPhotoOptions = { seed };
      if (tier !== "easy") {
        opts.surface = surfaces[(i + seed) % surfaces.length];
        opts.cast = casts[(i * 3 + seed) % casts.length];
        opts.rotationDeg = ((seed * 137) % 360) - 180;
        opts.shadow = i % 2 === 0;
        opts.glare = i % 3;
      }
      if (tier === "harsh") {
        opts.exposure = 0.6 + ((seed * 7) % 10) / 15;
        opts.perspective = 0.06;
        opts.noise = 1.6;
        opts.blur = 1;
        opts.light = { gradient: 0.5, vignette: 0.4 };
      }
      const r = await renderStripPhoto(chart, opts);
      const file = `${name.replace(/\.json$/, "")}-${tier}-${String(i).padStart(3, "0")}.jpg`;
      fs.writeFileSync(path.join(dir, file), r.jpeg);
      photos.push({ file, chart: name, pads: r.truth, conditions: { surface: r.conditions.surface, cast: r.conditions.cast, exposure: r.conditions.exposure, rot: r.conditions.rotationDeg, shadow: !!r.conditions.shadow, glare: r.conditions.glare.length, pxPerMm: r.conditions.pxPerMm, persp: r.conditions.perspective } });
    }
  }
}
fs.writeFileSync(path.join(dir, "truth.json"), JSON.stringify({ photos }, null, 1));
console.log(`${photos.length} photos in ${dir}`);
