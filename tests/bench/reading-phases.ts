// Where a read's time goes, per photo, as readStrip spends it: the header and the early search
// (the search copy decoded beside the working copy, its wide-scale candidates and maybe its edge
// pairs), the rest of the working decode, locate (with the number of candidate fits) and measure,
// in CPU milliseconds (the decodes' include libvips' worker threads).
// The bench's photos are rendered once into a cache directory. Figures only, nothing asserted.
//
//   npx tsx tests/bench/reading-phases.ts [--cache /tmp/dipwell-bench-photos]
import fs from "node:fs";
import path from "node:path";
import { parseChart } from "../../app/reading/chart";
import { startDecode } from "../../app/reading/image";
import { locateStrip } from "../../app/reading/locate";
import { earlySearch } from "../../app/reading/search-decode";
import { measurePads } from "../../app/reading/measure-pads";
import { renderStripPhoto } from "../render/strip-photo";
import { asRenderChart } from "../render/types";

const argv = process.argv.slice(2);
const cache = argv.includes("--cache") ? argv[argv.indexOf("--cache") + 1]! : "/tmp/dipwell-bench-photos";
fs.mkdirSync(cache, { recursive: true });
const load = (f: string) => JSON.parse(fs.readFileSync(f, "utf8"));
const demo3 = load("calibration/demo-3pad.json"), demo6 = load("calibration/demo-6pad.json");
const sizes: [number, number][] = [[4032, 3024], [3024, 4032], [4000, 3000], [2016, 1512], [1600, 1200], [1200, 1600], [1024, 768], [3264, 2448]];
const surfaces = ["paper", "counter", "wood", "cloth", "tiles"] as const;
const casts = ["daylight", "warm", "cool", "fluorescent"] as const;
const cases: { name: string; file: string; chart: ReturnType<typeof parseChart> }[] = [];
for (const [i, [width, height]] of sizes.entries()) {
  const doc = i % 2 ? demo6 : demo3;
  const file = path.join(cache, `bench-${i}.jpg`);
  if (!fs.existsSync(file)) {
    const r = await renderStripPhoto(asRenderChart(doc), { seed: 7100 + i, width, height, surface: surfaces[i % 5], cast: casts[i % 4], rotationDeg: (i * 67) % 360 });
    fs.writeFileSync(file, r.jpeg);
  }
  cases.push({ name: `synthetic ${i} ${width}×${height}`, file, chart: parseChart(doc) });
}
const realDir = path.resolve("../shared/eval/real");
if (fs.existsSync(path.join(realDir, "chart-base.json"))) {
  const chart = parseChart(load(path.join(realDir, "chart-base.json")));
  const real = fs.readdirSync(realDir).filter((f) => /\.jpe?g$/i.test(f)).sort();
  for (const f of real.filter((_, k) => k % 5 === 2)) cases.push({ name: `real ${f}`, file: path.join(realDir, f), chart });
}
// CPU time of this process (user + system), less disturbed than wall time on a busy machine.
const now = () => { const u = process.cpuUsage(); return u.user + u.system; };
const ms = (t0: number) => (now() - t0) / 1e3;
for (let pass = 0; pass < 2; pass++)
  for (const c of cases) {
    const buf = fs.readFileSync(c.file);
    let t = now();
    const started = await startDecode(buf);
    const early = await earlySearch(buf, started, c.chart);
    const tSearch = ms(t);
    t = now();
    const { image } = await started.decoded;
    const tDecode = ms(t);
    let fits = 0;
    t = now();
    let tLocate = 0, tMeasure = 0, note = "";
    try {
      const g = locateStrip(image, c.chart, (l) => l.startsWith("walk") && fits++, early);
      tLocate = ms(t);
      t = now();
      measurePads(image, c.chart, g);
      tMeasure = ms(t);
    } catch (e) {
      tLocate = ms(t);
      note = String((e as Error).message).slice(0, 40);
    }
    if (pass === 1) console.log(`${c.name.padEnd(28)} start+early search ${tSearch.toFixed(1).padStart(6)}  rest of decode ${tDecode.toFixed(1).padStart(5)}  locate ${tLocate.toFixed(1).padStart(7)} (${fits} fits)  measure ${tMeasure.toFixed(1).padStart(5)} ${note}`);
  }
