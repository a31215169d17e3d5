// Command line strip reader.
//
//   npm run -s read-strip -- --chart <chart.json> [--crops <dir>] [--trace] <photo> [<photo> ...]
//
// Prints one JSON object per photo on stdout, one per line, one entry per analyte:
//   {"file":"<photo as given>","pads":[{"analyte":"ph","value":7.4,"confidence":0.93,
//     "lab":[L,a,b],"hex":"#rrggbb",...}],...}
// An analyte read from several pads also lists each pad's colour: "pads":[{"lab":…,"hex":…},…].
// --trace prints the engine's diagnostics on stderr.
// or {"file":"...","error":"<plain words>"} for a photo that cannot be read.
// Exit status 0 when every photo was attempted; 2 for a bad command line or chart.
import fs from "node:fs";
import path from "node:path";
import { ChartError, parseChart, type StripChart } from "./chart";
import { ReadingError, readStrip } from "./index";

function usage(msg: string): never {
  process.stderr.write(`${msg}\nUsage: npm run -s read-strip -- --chart <chart.json> [--crops <dir>] [--trace] <photo> [<photo> ...]\n`);
  process.exit(2);
}

function round(v: number, d: number) {
  const f = 10 ** d;
  return Math.round(v * f) / f;
}

const labArray = (l: { l: number; a: number; b: number }) => [round(l.l, 2), round(l.a, 2), round(l.b, 2)];

async function main() {
  const args = process.argv.slice(2);
  let chartPath: string | undefined, cropDir: string | undefined, trace = false;
  const photos: string[] = [];
  for (let i = 0; i < args.length; i++) {
    const a = args[i];
    if (a === "--chart") chartPath = args[++i];
    else if (a === "--crops") cropDir = args[++i];
    else if (a === "--trace") trace = true;
    else if (a === "--") continue;
    else if (a.startsWith("--")) usage(`Unknown option ${a}.`);
    else photos.push(a);
  }
  if (!chartPath) usage("Please name the colour chart with --chart <chart.json>.");
  let chart: StripChart;
  try {
    const text = fs.readFileSync(chartPath, "utf8");
    let json: unknown;
    try {
      json = JSON.parse(text);
    } catch {
      throw new ChartError(`The chart file ${chartPath} is not valid JSON.`);
    }
    chart = parseChart(json);
  } catch (e) {
    const msg = e instanceof ChartError ? e.message : `The chart file ${chartPath} could not be read (${(e as NodeJS.ErrnoException).code ?? String(e)}).`;
    process.stderr.write(`${msg}\n`);
    process.exit(2);
  }
  if (!photos.length) usage("Please name at least one photo.");
  if (cropDir) fs.mkdirSync(cropDir, { recursive: true });
  for (const file of photos) {
    let line: object;
    try {
      let buf: Buffer;
      try {
        buf = fs.readFileSync(file);
      } catch (e) {
        const code = (e as NodeJS.ErrnoException).code;
        throw new ReadingError("not_an_image", code === "ENOENT" ? "The photo file does not exist." : `The photo file could not be opened (${code}).`);
      }
      const r = await readStrip(buf, chart, { crops: Boolean(cropDir), trace: trace ? (l) => process.stderr.write(`${file}: ${l}\n`) : undefined });
      if (cropDir)
        r.pads.forEach((p) => p.crop && fs.writeFileSync(path.join(cropDir!, `${path.basename(file).replace(/\.[^.]+$/, "")}-${p.analyte}.webp`), p.crop));
      line = {
        file,
        pads: r.pads.map((p) => ({
          analyte: p.analyte,
          value: round(p.value, 4),
          confidence: round(p.confidence, 3),
          needsReview: p.needsReview,
          ...(p.reason ? { reason: p.reason } : {}),
          unit: p.unit,
          deltaE: round(p.deltaE, 2),
          swatchIndex: round(p.swatchIndex, 3),
          lab: labArray(p.lab),
          hex: p.hex,
          ...(p.parts.length > 1 ? { pads: p.parts.map((q) => ({ lab: labArray(q.lab), hex: q.hex, deltaE: round(q.deltaE, 2) })) } : {}),
        })),
        strip: { angleDeg: round(r.strip.angleDeg, 1), pxPerMm: round(r.strip.pxPerMm, 2), flipped: r.strip.flipped },
        ...(r.warnings.length ? { warnings: r.warnings } : {}),
      };
    } catch (e) {
      line = { file, error: e instanceof ReadingError ? e.message : "The photo could not be read because of an unexpected problem." };
      if (!(e instanceof ReadingError)) process.stderr.write(`${file}: ${(e as Error)?.stack ?? e}\n`);
    }
    process.stdout.write(JSON.stringify(line) + "\n");
  }
}

main().catch((e) => {
  process.stderr.write(`${(e as Error)?.stack ?? e}\n`);
  process.exit(1);
});
