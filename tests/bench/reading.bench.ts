// Benchmark: for each of a set of varied photos, the time to read it against the time sharp
// alone takes to decode it and downscale it to the reader's working size, their ratio, the mean
// ratio, the worst photo, and peak memory. One process, after a warm-up: by default every photo is
// read (and decoded) once before the timed runs, so the figures are a running reader's (a worker
// reads photo after photo; the first read of each kind of photo also compiles its code paths).
// `--warm first` warms up on the first photo only, as a process that has read one photo.
//
//   npm run bench:reading [-- --runs N (rounds, 7)] [-- --real DIR] [-- --warm all|first] [-- --plain-node]
//
// Photos: synthetic strips rendered by tests/render at several sizes (up to 12 MP), and the real
// photos in ../shared/eval/real (read where they lie at run time, never copied) when present.
// Figures are printed side by side; nothing here asserts a time. The process runs with a reader
// process's V8 flags (app/reading/process-flags.ts), as the worker's readers do.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import sharp from "sharp";
import { READER_V8_FLAGS } from "../../app/reading/process-flags";
import { parseChart, type StripChart } from "../../app/reading/chart";
import { embedsSrgbProfile } from "../../app/reading/colour-profile";
import { workingPipeline } from "../../app/reading/image";
import { readStrip } from "../../app/reading/index";
import { renderStripPhoto } from "../render/strip-photo";
import { asRenderChart } from "../render/types";

// The figures are those of a reader process (app/jobs/read-pool.ts): started again with its V8
// flags when run without them.
// `--plain-node` runs without them (to compare).
const readerFlags = READER_V8_FLAGS.every((f) => process.execArgv.includes(f));
if (!process.argv.includes("--plain-node") && !readerFlags) {
  const again = spawnSync(process.execPath, [...READER_V8_FLAGS, ...process.execArgv, ...process.argv.slice(1)], { stdio: "inherit" });
  process.exit(again.status ?? 1);
}
const argv = process.argv.slice(2);
const opt = (name: string, dflt: string) => {
  const i = argv.indexOf(`--${name}`);
  return i >= 0 ? argv[i + 1]! : dflt;
};
const runs = Number(opt("runs", "7"));
const realDir = opt("real", path.resolve("../shared/eval/real"));
const warm = opt("warm", "all");

let rssPeak = 0;
const sampleRss = () => {
  const r = process.memoryUsage().rss;
  if (r > rssPeak) rssPeak = r;
};
const timer = setInterval(sampleRss, 2);

type Case = { name: string; buf: Buffer; chart: StripChart };
const cases: Case[] = [];
const load = (f: string) => JSON.parse(fs.readFileSync(f, "utf8"));
const demo3 = load("calibration/demo-3pad.json"), demo6 = load("calibration/demo-6pad.json");
const sizes: [number, number][] = [[4032, 3024], [3024, 4032], [4000, 3000], [2016, 1512], [1600, 1200], [1200, 1600], [1024, 768], [3264, 2448]];
const surfaces = ["paper", "counter", "wood", "cloth", "tiles"] as const;
const casts = ["daylight", "warm", "cool", "fluorescent"] as const;
for (const [i, [width, height]] of sizes.entries()) {
  const doc = i % 2 ? demo6 : demo3;
  const r = await renderStripPhoto(asRenderChart(doc), { seed: 7100 + i, width, height, surface: surfaces[i % 5], cast: casts[i % 4], rotationDeg: (i * 67) % 360 });
  cases.push({ name: `synthetic ${i % 2 ? "6" : "3"}-pad ${width}×${height} ${surfaces[i % 5]} ${casts[i % 4]}`, buf: r.jpeg, chart: parseChart(doc) });
}
if (fs.existsSync(path.join(realDir, "chart-base.json"))) {
  const chart = parseChart(load(path.join(realDir, "chart-base.json")));
  const real = fs.readdirSync(realDir).filter((f) => /\.jpe?g$/i.test(f)).sort();
  for (const f of real.filter((_, k) => k % 5 === 2)) cases.push({ name: `real ${f}`, buf: fs.readFileSync(path.join(realDir, f)), chart });
}

async function time(fn: () => Promise<unknown>) {
  const t0 = process.hrtime.bigint();
  await fn();
  sampleRss();
  return Number(process.hrtime.bigint() - t0) / 1e6;
}
const median = (a: number[]) => {
  const s = [...a].sort((x, y) => x - y);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
};

// Warm-up (libvips, JIT): the first photo twice, then (by default) every photo once.
for (let i = 0; i < 2; i++) {
  await workingPipeline(cases[0].buf).toBuffer();
  await readStrip(cases[0].buf, cases[0].chart).catch(() => null);
}
if (warm === "all")
  for (const c of cases) {
    await workingPipeline(c.buf).toBuffer();
    await readStrip(c.buf, c.chart).catch(() => null);
  }
sharp.cache(false);
// Rounds: each reads every photo once (its decode, then its read), so that a slow spell of a
// shared machine falls on every photo alike rather than on one photo's runs.
const tDecode: number[][] = cases.map(() => []), tRead: number[][] = cases.map(() => []), tOwn: number[][] = cases.map(() => []);
// The reader's own decode of the working copy (an sRGB profile taken as it is, colour-profile.ts):
// shows how much of a read is decoding and how much the engine's own work.
const ownDecode = (buf: Buffer) => workingPipeline(buf, undefined, embedsSrgbProfile(buf)).toBuffer();
const results: string[] = cases.map(() => "");
for (let r = 0; r < runs; r++)
  for (const [i, c] of cases.entries()) {
    tDecode[i].push(await time(() => workingPipeline(c.buf).toBuffer()));
    tOwn[i].push(await time(() => ownDecode(c.buf)));
    tRead[i].push(
      await time(async () => {
        try {
          const out = await readStrip(c.buf, c.chart);
          results[i] = out.pads.map((p) => `${p.analyte}=${p.value.toFixed(2)}`).join(" ");
        } catch (e) {
          results[i] = `refused: ${(e as Error).message.slice(0, 40)}`;
        }
      }),
    );
  }
const rows: { name: string; px: string; read: number; decode: number; own: number; ratio: number; best: number; result: string }[] = [];
for (const [i, c] of cases.entries()) {
  const meta = await sharp(c.buf).metadata();
  const read = median(tRead[i]), decode = median(tDecode[i]);
  const best = Math.min(...tRead[i]) / Math.min(...tDecode[i]);
  rows.push({ name: c.name, px: `${((meta.width! * meta.height!) / 1e6).toFixed(1)} MP`, read, decode, own: median(tOwn[i]), ratio: read / decode, best, result: results[i] });
}
clearInterval(timer);
const pad = (s: string, n: number) => (s.length >= n ? s.slice(0, n) : s + " ".repeat(n - s.length));
console.log(`${pad("photo", 52)} ${pad("size", 8)} ${pad("read ms", 9)} ${pad("decode ms", 10)} ${pad("ratio", 6)} ${pad("fastest", 7)}   ${pad("reader's decode ms", 18)} result`);
for (const r of rows)
  console.log(`${pad(r.name, 52)} ${pad(r.px, 8)} ${pad(r.read.toFixed(1), 9)} ${pad(r.decode.toFixed(1), 10)} ${pad(r.ratio.toFixed(2), 6)} ${pad(r.best.toFixed(2), 7)}   ${pad(r.own.toFixed(1), 18)} ${r.result.slice(0, 50)}`);
const mean = rows.reduce((s, r) => s + r.ratio, 0) / rows.length;
const worst = rows.reduce((a, b) => (b.ratio > a.ratio ? b : a));
console.log(`photos ${rows.length}; read and decode: medians of ${runs} rounds after a warm-up (${warm === "all" ? "every photo read once" : "the first photo"}); decode = sharp decode + downscale to the working size, as sharp does it by default (an embedded colour profile converted to sRGB)`);
console.log("ratio = median read / median decode; fastest = fastest read / fastest decode (the machine's noise left out)");
console.log("reader's decode = the working copy as the reader decodes it (a photo embedding an sRGB profile taken as it is, with no colour transform)");
console.log(`mean ratio ${mean.toFixed(2)} (target ≤ 1.5); worst ${worst.ratio.toFixed(2)} (${worst.name}; target ≤ 3)`);
const flags = readerFlags ? `V8 flags of a reader process: ${READER_V8_FLAGS.join(" ")}` : "Node's default V8 flags";
console.log(`peak memory (rss) ${(rssPeak / 2 ** 20).toFixed(0)} MiB; ${flags}`);
