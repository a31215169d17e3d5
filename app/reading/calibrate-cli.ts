// Command line chart calibration from reference solutions.
//
//   npm run -s calibrate-chart -- --chart <base.json> --samples <samples.json>
//
// samples.json: [{"photo": "<path>", "known": {"ph": 7.0}}, ...] (a relative photo path is looked
// up from the current folder, then beside samples.json). Prints the refit strip-chart/1 chart on
// stdout; warnings and skipped samples on stderr. Exit status 2 with one plain line on bad input.
import fs from "node:fs";
import path from "node:path";
import { ChartError, parseChart } from "./chart";
import { RefitError, refitFromSolutions, type SolutionSample } from "./refit";

function fail(msg: string): never {
  process.stderr.write(`${msg}\n`);
  process.exit(2);
}

function readJson(file: string, what: string): unknown {
  let text: string;
  try {
    text = fs.readFileSync(file, "utf8");
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    fail(code === "ENOENT" ? `The ${what} file ${file} does not exist.` : `The ${what} file ${file} could not be opened (${code}).`);
  }
  try {
    return JSON.parse(text);
  } catch {
    fail(`The ${what} file ${file} is not valid JSON.`);
  }
}

async function main() {
  const args = process.argv.slice(2);
  let chartPath: string | undefined, samplesPath: string | undefined;
  for (let i = 0; i < args.length; i++) {
    const a = args[i];
    if (a === "--chart") chartPath = args[++i];
    else if (a === "--samples") samplesPath = args[++i];
    else if (a === "--") continue;
    else fail(`Unknown argument ${a}. Usage: npm run -s calibrate-chart -- --chart <base.json> --samples <samples.json>`);
  }
  if (!chartPath || !samplesPath) fail("Usage: npm run -s calibrate-chart -- --chart <base.json> --samples <samples.json>");
  let chart;
  try {
    chart = parseChart(readJson(chartPath, "chart"));
  } catch (e) {
    fail(e instanceof ChartError ? e.message : String(e));
  }
  const list = readJson(samplesPath, "samples");
  if (!Array.isArray(list)) fail(`The samples file ${samplesPath} must hold a list like [{"photo": "strip.jpg", "known": {"ph": 7.0}}].`);
  if (!list.length) fail(`The samples file ${samplesPath} lists no samples.`);
  const samples: SolutionSample[] = [];
  const skippedHere: string[] = [];
  for (const [i, item] of list.entries()) {
    const entry = item as { photo?: unknown; known?: unknown };
    const name = typeof entry?.photo === "string" ? entry.photo : `sample ${i + 1}`;
    if (typeof entry?.photo !== "string" || !entry.known || typeof entry.known !== "object" || Array.isArray(entry.known)) {
      skippedHere.push(`${name}: skipped, it needs "photo" (a path) and "known" (like {"ph": 7.0}).`);
      continue;
    }
    const candidates = path.isAbsolute(entry.photo) ? [entry.photo] : [entry.photo, path.join(path.dirname(samplesPath), entry.photo)];
    const file = candidates.find((f) => fs.existsSync(f));
    if (!file) {
      skippedHere.push(`${name}: skipped, the photo file does not exist.`);
      continue;
    }
    let photo: Buffer;
    try {
      photo = fs.readFileSync(file);
    } catch (e) {
      skippedHere.push(`${name}: skipped, the photo file could not be opened (${(e as NodeJS.ErrnoException).code}).`);
      continue;
    }
    samples.push({ photo, known: entry.known as Record<string, number>, name });
  }
  for (const line of skippedHere) process.stderr.write(`${line}\n`);
  if (!samples.length) fail(`None of the ${list.length} samples could be used.`);
  try {
    const result = await refitFromSolutions(chart, samples);
    for (const s of result.skipped) process.stderr.write(`${s.sample}: skipped, ${s.reason.charAt(0).toLowerCase()}${s.reason.slice(1)}\n`);
    for (const w of result.warnings) process.stderr.write(`${w}\n`);
    process.stdout.write(`${JSON.stringify(result.definition, null, 1)}\n`);
  } catch (e) {
    if (e instanceof RefitError || e instanceof ChartError) fail(e.message);
    throw e;
  }
}

main().catch((e) => {
  process.stderr.write(`${(e as Error)?.stack ?? e}\n`);
  process.exit(1);
});
