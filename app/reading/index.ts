// Strip reading: photo + colour chart -> one reading per analyte.
//
// decode once (EXIF orientation, pixel cap, shrink-on-load to the working size)
// -> find the strip and place its pads (locate.ts and the modules it calls; see README.md)
// -> sample each pad's inner 60 % in linear light, glare and clipping rejected, white-corrected
//    from the bare plastic on both sides of it, von Kries per linear channel (measure-pads.ts)
// -> CIELAB D65 -> CIEDE2000 match along the analyte's colour path; an analyte on several pads
//    is matched jointly along their joint path (joint-match.ts) -> one value and one confidence.
import type { StripChart } from "./chart";
import { ChartError, parseChart } from "./chart";
import { locateStrip } from "./locate";
import { earlySearch } from "./search-decode";
import { ReadingError, cropPad, cropStrip, startDecode } from "./image";
import { analyteGroups } from "./joint-match";
import { judgeStrip, type PadReading } from "./judge";
import { matchSwatches } from "./match";
import { measurePads, type PadMeasurement } from "./measure-pads";

export { ReadingError, decodePhoto, type RgbImage } from "./image";
export { sampleQuad, type RegionSample } from "./region-sample";
export { whiteCorrectionMatrix, correctLinear, bradfordMatrix } from "./colour";
export { parseChart, exportChart, ChartError, type StripChart, type ChartPad } from "./chart";
export { matchSwatches } from "./match";
export { matchJoint, analyteGroups } from "./joint-match";

export { REVIEW_BELOW, judgeAnalyte, type PadPart, type PadReading } from "./judge";

export type StripReading = {
  pads: PadReading[];
  strip: {
    /** Direction from the tip to the handle, degrees, image axes (x right, y down). */
    angleDeg: number;
    /** Pixels per millimetre in the original photo. */
    pxPerMm: number;
    /** Strip outline in original-photo pixels: tip left, tip right, handle right, handle left. */
    corners: [number, number][];
    /** True when the tip lies to the right of the handle (the strip reads right to left). */
    flipped: boolean;
  };
  imageSize: { width: number; height: number };
  warnings: string[];
};

const NO_STRIP_MESSAGE =
  "No test strip was found in this photo. Lay the strip flat on a plain surface, keep the whole strip in the picture, and take the photo again.";

export type ReadOptions = {
  crops?: boolean;
  /** Refuse a strip whose pads look like bare plastic where the chart puts pads (default true). */
  checkPads?: boolean;
  /** Receives the engine's diagnostics, one line each (the read-strip command's --trace). */
  trace?: (line: string) => void;
};

/** Refuses a photo where no strip of this chart shows: bare plastic or alien colours where the pads should be. */
function checkStripShown(chart: StripChart, ms: PadMeasurement[], checkPads: boolean, lengthSeen: boolean) {
  const missing = chart.pads.filter((_, i) => ms[i].missing).map((p) => p.label);
  const blank = ms.filter((m) => m.plasticLike).length;
  // Nothing but bare plastic (or a plain surface) where the chart puts every pad: no strip was seen.
  if (chart.pads.length > 1 && blank === chart.pads.length && missing.length > 0) throw new ReadingError("no_strip", NO_STRIP_MESSAGE);
  // Pads whose colours are nowhere near the chart on most of the strip: not a strip of this chart.
  // A pad already judged missing is not counted here: that is a strip with fewer pads, told apart below.
  const alien = chart.pads.filter((cp, i) => {
    if (ms[i].missing) return false;
    const m = matchSwatches(cp, ms[i].lab);
    return m.deltaE > 12 && m.deltaE > 2.5 * m.halfStep;
  }).length;
  const shown = chart.pads.length - missing.length;
  const noMatch = () =>
    new ReadingError(
      "no_strip",
      `No test strip matching the chart${chart.name ? ` "${chart.name}"` : ""} was found in this photo. Check the chart, lay the strip flat on a plain surface with the whole strip in view, and take the photo again.`,
    );
  if (chart.pads.length > 1 && (alien >= Math.ceil((2 * chart.pads.length) / 3) || (shown > 0 && alien === shown))) throw noMatch();
  if (checkPads && missing.length && missing.length >= Math.max(1, Math.ceil(chart.pads.length / 4))) {
    // Pads missing from something not the chart's length (a surface's line, another strip): no
    // strip of this chart was seen, rather than this chart's strip short of pads.
    if (!lengthSeen) throw noMatch();
    throw new ReadingError(
      "too_few_pads",
      `This strip shows fewer test pads than the chart expects (${shown} of ${chart.pads.length}; no pad where the chart puts ${[...new Set(missing)].join(", ")}). Check that the chosen chart matches this strip.`,
    );
  }
}

export async function readStrip(photo: Buffer, chartIn: StripChart, options: ReadOptions = {}): Promise<StripReading> {
  let chart: StripChart;
  try {
    chart = chartIn && Array.isArray(chartIn.pads) && chartIn.pads[0]?.swatches?.[0]?.lab ? chartIn : parseChart(chartIn);
  } catch (e) {
    throw new ReadingError("bad_chart", e instanceof ChartError ? e.message : "The colour chart could not be used.");
  }
  // The search for candidate strips starts on a small copy while the working copy is still being
  // decoded (search-decode.ts earlySearch).
  const started = await startDecode(photo);
  const early = await earlySearch(photo, started, chart);
  const { image: img, original } = await started.decoded;
  const k = original.width / img.width; // working px -> original px
  const g = locateStrip(img, chart, options.trace, early);
  const measured = measurePads(img, chart, g, options.trace);
  const warnings = [...g.warnings, ...measured.warnings];
  checkStripShown(chart, measured.pads, options.checkPads !== false, g.lengthOk);

  const pads = judgeStrip(chart.pads, measured.pads, analyteGroups(chart.pads), k, g.doubts);
  if (options.crops)
    for (const reading of pads) {
      const ms = reading.parts.map((p) => measured.pads[p.chartIndex]);
      const crops = await Promise.all(ms.map((m) => cropPad(img, m.centre[0], m.centre[1], m.half * 1.4)));
      reading.parts.forEach((p, j) => (p.crop = crops[j]));
      reading.crop = crops.length === 1 ? crops[0] : await cropStrip(crops);
    }
  const [ux, uy] = g.u;
  const ax = g.dir * ux, ay = g.dir * uy; // tip -> handle
  const tipP = [g.centre[0] + g.tipT * ux, g.centre[1] + g.tipT * uy];
  const hP = [g.centre[0] + g.handleT * ux, g.centre[1] + g.handleT * uy];
  const hw = g.widthPx / 2;
  const [vx, vy] = g.v;
  const corners: [number, number][] = [
    [tipP[0] - hw * vx, tipP[1] - hw * vy],
    [tipP[0] + hw * vx, tipP[1] + hw * vy],
    [hP[0] + hw * vx, hP[1] + hw * vy],
    [hP[0] - hw * vx, hP[1] - hw * vy],
  ].map(([x, y]) => [x * k, y * k] as [number, number]);
  return {
    pads,
    strip: { angleDeg: (Math.atan2(ay, ax) * 180) / Math.PI, pxPerMm: g.pxPerMm * k, corners, flipped: ax < 0 },
    imageSize: original,
    warnings,
  };
}
