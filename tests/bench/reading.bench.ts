// Benchmark: time to read a 12-megapixel strip photo versus the time sharp alone takes to
// decode and downscale the same photo to the reader's working size, plus peak memory.
//
//   npm run bench:reading [-- --runs N] [-- --photo file.jpg]
//
// Figures are printed side by side; nothing here asserts a time.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import sharp from "sharp";
import { parseChart } from "../../app/reading/chart";
import { WORK_LONG_SIDE, workingPipeline } from "../../app/reading/image";
import { readStrip } from "../../app/reading/index";

const argv = process.argv.slice(2);
const opt = (name: string, dflt: string) => {
  const i = argv.indexOf(`--${name}`);
  return i >= 0 ? argv[i + 1]! : dflt;
};
const runs = Number(opt("runs", "9"));
const practice = "/work/shared/eval/practice/practice-12mp-hard-000.jpg";
const chartPath = opt("chart", fs.existsSync("/work/shared/eval/charts/practice-3pad.json") ? "/work/shared/eval/charts/practice-3pad.json" : "calibration/demo-3pad.json");

let rssPeak = 0;
const sampleRss = () => {
  const r = process.memoryUsage().rss;
  if (r > rssPeak) rssPeak = r;
};
const timer = setInterval(sampleRss, 2);

async function photo12mp(): Promise<{ file: string; buf: Buffer }> {
  const given = opt("photo", "");
  const candidates = [given, practice].filter(Boolean);
  for (const f of candidates) {
    if (!fs.existsSync(f)) continue;
    const m = await sharp(f).metadata();
    if ((m.width ?? 0) * (m.height ?? 0) >= 11.5e6) return { file: f, buf: fs.readFileSync(f) };
  }
  // Fall back: enlarge whatever photo we have (or the first practice photo) to 4032×3024.
  const src = candidates.find((f) => fs.existsSync(f));
  if (!src) throw new Error("no photo to benchmark: pass --photo <12 MP JPEG>");
  const tmp = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "dipwell-bench-")), "bench-12mp.jpg");
  await sharp(src).resize(4032, 3024, { fit: "fill" }).jpeg({ quality: 90 }).toFile(tmp);
  return { file: tmp, buf: fs.readFileSync(tmp) };
}

function median(a: number[]) {
  const s = [...a].sort((x, y) => x - y);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}

async function time(fn: () => Promise<unknown>) {
  const t0 = process.hrtime.bigint();
  await fn();
  sampleRss();
  return Number(process.hrtime.bigint() - t0) / 1e6;
}

const { file, buf } = await photo12mp();
const meta = await sharp(buf).metadata();
const chart = parseChart(JSON.parse(fs.readFileSync(chartPath, "utf8")));
const decode = () => workingPipeline(buf).toBuffer();
const read = () => readStrip(buf, chart);

// Warm-up (libvips caches, JIT).
for (let i = 0; i < 2; i++) {
  await decode();
  await read();
}
sharp.cache(false);
const tDecode: number[] = [], tRead: number[] = [];
for (let i = 0; i < runs; i++) {
  // Interleave so both see the same machine state.
  tDecode.push(await time(decode));
  tRead.push(await time(read));
}
clearInterval(timer);
const md = median(tDecode), mr = median(tRead);
const out = await read();
console.log(`photo                     ${file} (${meta.width}×${meta.height}, ${(buf.length / 1e6).toFixed(1)} MB)`);
console.log(`working size              long side ${WORK_LONG_SIDE} px; ${runs} runs each after 2 warm-up runs`);
console.log(`sharp decode + downscale  median ${md.toFixed(1)} ms   (min ${Math.min(...tDecode).toFixed(1)}, max ${Math.max(...tDecode).toFixed(1)})`);
console.log(`readStrip (whole read)    median ${mr.toFixed(1)} ms   (min ${Math.min(...tRead).toFixed(1)}, max ${Math.max(...tRead).toFixed(1)})`);
console.log(`ratio read / decode       ${(mr / md).toFixed(2)}   (target ≤ 1.5)`);
console.log(`peak memory (rss)         ${(rssPeak / 2 ** 20).toFixed(0)} MiB`);
console.log(`pads read                 ${out.pads.map((p) => `${p.analyte}=${p.value.toFixed(2)}`).join(", ")}`);
