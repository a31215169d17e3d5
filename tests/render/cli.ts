/**
 * Renders a synthetic strip photo or chart-card photo and prints its truth as JSON.
 *
 *   npx tsx tests/render/cli.ts strip --chart calibration/demo-3pad.json --seed 3 --out /tmp/x.jpg
 *   npx tsx tests/render/cli.ts chart --chart calibration/demo-6pad.json --seed 3 --out /tmp/card.jpg
 *
 * Options (all optional but --chart and --out): --seed N --width N --height N --orientation
 * portrait|landscape --surface paper|counter|wood|cloth|tiles --surface-color #rrggbb --rotation DEG --perspective F
 * --px-per-mm F --cast daylight|warm|cool|fluorescent --exposure F --gradient F --vignette F
 * --shadow yes|no --glare N --noise F --blur F --quality N --values analyte=value,...
 * --pads analyte,... (strip: draw only these) --no-strip (strip: surface only) --pad-mix lab|linear
 * --card-color #rrggbb (chart).
 */
import { readFileSync, writeFileSync } from "node:fs";
import { renderChartPhoto, type ChartPhotoOptions } from "./chart-photo";
import { renderStripPhoto, type StripPhotoOptions } from "./strip-photo";
import { asRenderChart } from "./types";

function usage(msg?: string): never {
  if (msg) process.stderr.write(`${msg}\n`);
  process.stderr.write("usage: tsx tests/render/cli.ts strip|chart --chart <chart.json> --out <photo.jpg> [options]\n");
  process.exit(2);
}

const argv = process.argv.slice(2);
const kind = argv.shift();
if (kind !== "strip" && kind !== "chart") usage("first word must be strip or chart");
const flags = new Map<string, string>();
for (let i = 0; i < argv.length; i++) {
  const a = argv[i]!;
  if (!a.startsWith("--")) usage(`unexpected argument ${a}`);
  const key = a.slice(2);
  if (key === "no-strip") {
    flags.set(key, "yes");
    continue;
  }
  const v = argv[++i];
  if (v === undefined) usage(`${a} needs a value`);
  flags.set(key, v);
}
const chartPath = flags.get("chart") ?? usage("--chart is required");
const outPath = flags.get("out") ?? usage("--out is required");
const chart = asRenderChart(JSON.parse(readFileSync(chartPath, "utf8")));

const num = (k: string) => (flags.has(k) ? Number(flags.get(k)) : undefined);
const str = <T extends string>(k: string) => flags.get(k) as T | undefined;
const yes = (k: string) => (flags.has(k) ? flags.get(k) === "yes" || flags.get(k) === "true" : undefined);
const light: { gradient?: number; vignette?: number } = {};
if (flags.has("gradient")) light.gradient = num("gradient");
if (flags.has("vignette")) light.vignette = num("vignette");

const common = {
  seed: num("seed"),
  width: num("width"),
  height: num("height"),
  orientation: str<"portrait" | "landscape">("orientation"),
  surface: str<NonNullable<StripPhotoOptions["surface"]>>("surface"),
  surfaceColor: flags.get("surface-color"),
  rotationDeg: num("rotation"),
  perspective: num("perspective"),
  pxPerMm: num("px-per-mm"),
  cast: str<NonNullable<StripPhotoOptions["cast"]>>("cast"),
  exposure: num("exposure"),
  light,
  noise: num("noise"),
  blur: num("blur"),
  quality: num("quality"),
};
const clean = <T extends object>(o: T): T =>
  Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined)) as T;

if (kind === "strip") {
  const values = flags.get("values")
    ? Object.fromEntries(
        flags
          .get("values")!
          .split(",")
          .map((kv) => kv.split("="))
          .map(([k, v]) => [k!, Number(v)]),
      )
    : undefined;
  const opts: StripPhotoOptions = clean({
    ...common,
    shadow: yes("shadow"),
    glare: num("glare"),
    values,
    drawPads: flags.get("pads")?.split(","),
    noStrip: yes("no-strip"),
    padMix: str<"lab" | "linear">("pad-mix"),
  });
  const r = await renderStripPhoto(chart, opts);
  writeFileSync(outPath, r.jpeg);
  process.stdout.write(JSON.stringify({ file: outPath, truth: r.truth, conditions: r.conditions }, null, 1) + "\n");
} else {
  const opts: ChartPhotoOptions = clean({ ...common, cardColor: flags.get("card-color") });
  const r = await renderChartPhoto(chart, opts);
  writeFileSync(outPath, r.jpeg);
  process.stdout.write(
    JSON.stringify({ file: outPath, layout: r.layout, truth: r.truth, conditions: r.conditions }, null, 1) + "\n",
  );
}
