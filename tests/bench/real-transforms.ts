/**
 * The reference-solution protocol under rotations and colour casts: calibrate a chart from the
 * untouched photos _00–_04 of each solution, then read photos _05–_09 turned by several angles
 * and under warm and cool casts (channel gains in linear light). The transformed photos are made
 * at run time in a temporary folder, never kept. Prints, per transformation and overall, the
 * share within 0.5 pH, the failures and the silent misreads (an error over 0.5 pH not flagged
 * for review).
 *
 *   npx tsx tests/bench/real-transforms.ts [--set DIR] [--out /tmp/dipwell-real-transforms]
 *     [--only r23,warm] [--analyte ph] [--list] [--calib-too]
 *
 * --calib-too: the calibration photos are turned and cast the same way as the photos read (a
 * whole batch taken that way), and the chart is refit for each transformation.
 *
 * The folder it writes follows the photo naming of the shared real-photo scorer
 * (`7p00_05-r23.jpg`), so that scorer can be run on it too: `--set <out> --base <set>/chart-base.json`.
 */
import fs from "node:fs";
import path from "node:path";
import sharp from "sharp";
import { parseChart, readStrip } from "../../app/reading/index";
import { refitFromSolutions } from "../../app/reading/refit";

const args = process.argv.slice(2);
const opt = (k: string, d: string) => (args.includes(k) ? args[args.indexOf(k) + 1]! : d);
const set = path.resolve(opt("--set", "../shared/eval/real"));
const out = path.resolve(opt("--out", "/tmp/dipwell-real-transforms"));
const analyte = opt("--analyte", "ph");

type Transform = { rotate?: number; gains?: [number, number, number]; background?: string; scale?: number; quality?: number };
const transforms: Record<string, Transform> = {
  r0: {},
  r90: { rotate: 90 },
  r180: { rotate: 180 },
  r23: { rotate: 23 },
  rm127: { rotate: -127 },
  r23w: { rotate: 23, background: "#ffffff" },
  warm: { gains: [1.18, 1, 0.72] },
  warm2: { gains: [1.35, 1, 0.55] },
  cool: { gains: [0.8, 0.95, 1.2] },
  warmr23: { rotate: 23, gains: [1.18, 1, 0.72] },
  tungsten: { gains: [1.5, 1, 0.45] },
  dim: { gains: [0.45, 0.45, 0.45] },
  small: { scale: 0.45, quality: 70 },
  coolr90: { rotate: 90, gains: [0.8, 0.95, 1.2] },
};
const defaultNames = ["r0", "r90", "r180", "r23", "rm127", "r23w", "warm", "warm2", "cool", "warmr23"];
const only = opt("--only", "").split(",").filter(Boolean);
const names = only.length ? only : defaultNames;

const truthOf = (f: string) => {
  const m = f.match(/^(\d+)p(\d+)_(\d\d)(-[^.]*)?\.jpe?g$/i);
  return m ? { value: Number(`${m[1]}.${m[2]}`), index: Number(m[3]), variant: m[4]?.slice(1) ?? "" } : null;
};

const toLin = new Float32Array(256).map((_, i) => {
  const c = i / 255;
  return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
});
const toByte = (l: number) => {
  const v = Math.min(1, Math.max(0, l));
  return Math.round(255 * (v <= 0.0031308 ? 12.92 * v : 1.055 * v ** (1 / 2.4) - 0.055));
};

/** Applies one transformation: gains in linear light first, then the turn (the canvas grows). */
async function transform(file: string, t: Transform): Promise<Buffer> {
  let img = sharp(file).rotate();
  if (t.gains) {
    const { data, info } = await img.removeAlpha().raw().toBuffer({ resolveWithObject: true });
    for (let i = 0; i < data.length; i += 3) for (let c = 0; c < 3; c++) data[i + c] = toByte(toLin[data[i + c]!]! * t.gains[c]!);
    img = sharp(data, { raw: { width: info.width, height: info.height, channels: 3 } });
  }
  if (t.rotate) img = img.rotate(t.rotate, { background: t.background ?? "#000000" });
  if (t.scale) {
    const m = await sharp(file).metadata();
    img = sharp(await img.png().toBuffer()).resize(Math.round(m.width! * t.scale));
  }
  return img.jpeg({ quality: t.quality ?? 92 }).toBuffer();
}

const photos = fs.readdirSync(set).filter((f) => truthOf(f) && !truthOf(f)!.variant).sort();
const calib = photos.filter((f) => truthOf(f)!.index < 5);
const test = photos.filter((f) => truthOf(f)!.index >= 5);
fs.mkdirSync(out, { recursive: true });
for (const f of calib) if (!fs.existsSync(path.join(out, f))) fs.symlinkSync(path.join(set, f), path.join(out, f));
if (!fs.existsSync(path.join(out, "chart-base.json"))) fs.symlinkSync(path.join(set, "chart-base.json"), path.join(out, "chart-base.json"));
const calibToo = args.includes("--calib-too");
for (const f of calibToo ? [...calib, ...test] : test)
  for (const n of names) {
    const dest = path.join(out, f.replace(/\.jpe?g$/i, `-${n}.jpg`));
    if (!fs.existsSync(dest)) fs.writeFileSync(dest, await transform(path.join(set, f), transforms[n]!));
  }
if (args.includes("--list")) process.exit(0);

const base = parseChart(JSON.parse(fs.readFileSync(path.join(set, "chart-base.json"), "utf8")));
const samples = calib.map((f) => ({ photo: fs.readFileSync(path.join(set, f)), known: { [analyte]: truthOf(f)!.value }, name: f }));
const refit = async (n: string) => {
  const from = calibToo ? samples.map((x) => ({ ...x, photo: fs.readFileSync(path.join(out, x.name.replace(/\.jpe?g$/i, `-${n}.jpg`))) })) : samples;
  return parseChart((await refitFromSolutions(base, from)).definition);
};
const shared = calibToo ? null : await refit("r0");

type Tally = { n: number; within: number; failed: number; silent: number; flagged: number; se: number };
const tally = new Map<string, Tally>();
const lines: string[] = [];
for (const n of names) {
  const chart = shared ?? (await refit(n));
  for (const f of test) {
    const file = f.replace(/\.jpe?g$/i, `-${n}.jpg`);
    const truth = truthOf(f)!.value;
    const t = tally.get(n) ?? { n: 0, within: 0, failed: 0, silent: 0, flagged: 0, se: 0 };
    tally.set(n, t);
    t.n++;
    try {
      const r = await readStrip(fs.readFileSync(path.join(out, file)), chart);
      const p = r.pads.find((q) => q.analyte === analyte)!;
      const err = p.value - truth;
      t.se += err * err;
      if (Math.abs(err) <= 0.5) t.within++;
      if (p.needsReview) t.flagged++;
      if (Math.abs(err) > 0.5 && !p.needsReview) t.silent++;
      if (Math.abs(err) > 0.5 || p.needsReview)
        lines.push(`  ${file}: truth ${truth} read ${p.value.toFixed(2)}${p.needsReview ? ` (flagged: ${p.reason})` : " (silent)"}`);
    } catch (e) {
      t.failed++;
      lines.push(`  ${file}: FAIL ${(e as Error).message.slice(0, 90)}`);
    }
  }
}
const all: Tally = { n: 0, within: 0, failed: 0, silent: 0, flagged: 0, se: 0 };
for (const [n, t] of tally) {
  for (const k of Object.keys(all) as (keyof Tally)[]) all[k] += t[k];
  const read = t.n - t.failed;
  console.log(`${n.padEnd(8)} photos ${t.n}  within 0.5 pH ${((100 * t.within) / t.n).toFixed(1)} %  RMSE ${read ? Math.sqrt(t.se / read).toFixed(3) : "-"}  failed ${t.failed}  flagged ${t.flagged}  silent misreads ${t.silent}`);
}
for (const l of lines) console.log(l);
console.log(`all      photos ${all.n}  within 0.5 pH ${((100 * all.within) / all.n).toFixed(1)} %  failed ${all.failed}  flagged ${all.flagged}  silent misreads ${all.silent}`);
