// Strip reading: photo + colour chart -> pad values.
//
// decode once (EXIF orientation, pixel cap, shrink-on-load to the working size)
// -> find the strip and place its pads (detect.ts)
// -> sample each pad's inner 60 % in linear light, glare and clipping rejected (image.ts)
// -> white-reference correction from the bare plastic on both sides of each pad
//    (Bradford in linear RGB, mapping the plastic to the chart's strip colour)
// -> CIELAB D65 -> CIEDE2000 match along the pad's swatch path (match.ts).
import type { StripChart } from "./chart";
import { ChartError, parseChart } from "./chart";
import { correctLinear, deltaE2000, hexToRgb, linearRgbToLab, linearToSrgb, srgbToLinear, whiteCorrectionMatrix, type Lab, type Rgb } from "./colour";
import { locateStrip, type StripGeometry } from "./detect";
import { ReadingError, cropPad, decodePhoto, sampleQuad, type RegionSample, type RgbImage } from "./image";
import { matchSwatches } from "./match";

export { ReadingError, sampleQuad, decodePhoto, type RegionSample, type RgbImage } from "./image";
export { whiteCorrectionMatrix, correctLinear, bradfordMatrix } from "./colour";
export { parseChart, exportChart, ChartError, type StripChart, type ChartPad } from "./chart";
export { matchSwatches } from "./match";

export type PadReading = {
  analyte: string;
  label: string;
  unit: string;
  value: number;
  confidence: number;
  needsReview: boolean;
  reason?: string;
  lab: Lab;
  deltaE: number;
  swatchIndex: number;
  crop?: Buffer;
  /** Pad centre in the original photo's pixels (after EXIF orientation). */
  centre: [number, number];
};

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
};

/**
 * White-reference light correction: measured bare plastic (linear RGB) -> the chart's
 * strip colour. Returns a 3×3 matrix for linear RGB (Bradford / von Kries).
 */
export function stripWhiteCorrection(measuredLinear: readonly number[], stripHex: string) {
  const known = hexToRgb(stripHex).map(srgbToLinear);
  return whiteCorrectionMatrix(measuredLinear, known);
}

function quadAt(g: StripGeometry, t: number, halfAlong: number, halfAcross: number): [number, number][] {
  const [cx, cy] = g.centre, [ux, uy] = g.u, [vx, vy] = g.v;
  const px = cx + t * ux, py = cy + t * uy;
  return [
    [px - halfAlong * ux - halfAcross * vx, py - halfAlong * uy - halfAcross * vy],
    [px + halfAlong * ux - halfAcross * vx, py + halfAlong * uy - halfAcross * vy],
    [px + halfAlong * ux + halfAcross * vx, py + halfAlong * uy + halfAcross * vy],
    [px - halfAlong * ux + halfAcross * vx, py - halfAlong * uy + halfAcross * vy],
  ];
}

function bareSamples(img: RgbImage, g: StripGeometry): { t: number; s: RegionSample }[] {
  const out: { t: number; s: RegionSample }[] = [];
  const margin = Math.max(2, 0.5 * g.pxPerMm);
  const halfAcross = g.widthPx * 0.3;
  for (const [a, b] of g.bare) {
    const a2 = a + margin, b2 = b - margin;
    if (b2 - a2 < 1.5) {
      if (b - a < 3) continue;
    }
    const lo = b2 - a2 < 1.5 ? a + (b - a) * 0.3 : a2, hi = b2 - a2 < 1.5 ? b - (b - a) * 0.3 : b2;
    const s = sampleQuad(img, quadAt(g, (lo + hi) / 2, (hi - lo) / 2, halfAcross), { whiteReference: true });
    if (s && s.kept >= 4) out.push({ t: (lo + hi) / 2, s });
  }
  return out;
}

function median(a: number[]): number {
  const s = [...a].sort((x, y) => x - y);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

function lumY(c: readonly number[]) {
  return 0.2126 * c[0] + 0.7152 * c[1] + 0.0722 * c[2];
}

export async function readStrip(photo: Buffer, chartIn: StripChart, options: ReadOptions = {}): Promise<StripReading> {
  let chart: StripChart;
  try {
    chart = chartIn && Array.isArray(chartIn.pads) && chartIn.pads[0]?.swatches?.[0]?.lab ? chartIn : parseChart(chartIn);
  } catch (e) {
    throw new ReadingError("bad_chart", e instanceof ChartError ? e.message : "The colour chart could not be used.");
  }
  const { image: img, original } = await decodePhoto(photo);
  const k = original.width / img.width; // working px -> original px
  const g = locateStrip(img, chart);
  const warnings = [...g.warnings];
  const bare = bareSamples(img, g);
  if (!bare.length) throw new ReadingError("no_strip", "The strip was found, but no bare plastic could be seen next to its pads to judge the light. Take the photo again with the whole strip in view.");
  const stripLin = hexToRgb(chart.strip.color).map(srgbToLinear);
  const stripLab = chart.strip.lab;
  // Drop bare-plastic samples whose chromaticity is far from the others (pad bleed, the strip's end).
  const chrom = (c: readonly number[]) => {
    const sum = c[0] + c[1] + c[2] + 1e-9;
    return [c[0] / sum, c[1] / sum];
  };
  const medR = median(bare.map((b) => chrom(b.s.linear)[0])), medG = median(bare.map((b) => chrom(b.s.linear)[1]));
  const consistent = bare.filter((b) => {
    const [r, gg] = chrom(b.s.linear);
    return Math.hypot(r - medR, gg - medG) < 0.02;
  });
  if (consistent.length) bare.splice(0, bare.length, ...consistent);
  const bareY = bare.map((b) => lumY(b.s.linear));
  const maxBareY = Math.max(...bareY);
  if (bare.some((b) => b.s.clippedFraction > 0.5)) warnings.push("The photo is overexposed on the strip; colours may read too pale.");

  const pads: PadReading[] = [];
  const missing: string[] = [];
  const missingFlags: boolean[] = [];
  let blank = 0;
  const halfSteps: number[] = [];
  for (let i = 0; i < chart.pads.length; i++) {
    const cp = chart.pads[i];
    const pl = g.pads[i];
    const sample = sampleQuad(img, quadAt(g, pl.t, pl.halfAlong * 0.6, pl.halfAcross * 0.6));
    if (!sample) throw new ReadingError("no_strip", "Part of the strip lies outside the photo. Take the photo again with the whole strip in view.");
    // White references: the nearest bare plastic on each side of the pad.
    const before = bare.filter((b) => b.t < pl.t).sort((a, b) => b.t - a.t)[0];
    const after = bare.filter((b) => b.t > pl.t).sort((a, b) => a.t - b.t)[0];
    const refs = [before, after].filter((r): r is { t: number; s: RegionSample } => !!r);
    // Skip a reference that is far darker than the others (a shadow edge between it and the pad is unlikely to be both-sided).
    const usable = refs.filter((r) => lumY(r.s.linear) > 0.35 * maxBareY);
    const use = usable.length ? usable : refs.length ? refs : [bare[0]];
    let white: Rgb;
    if (use.length === 2) {
      const d0 = Math.abs(use[0].t - pl.t), d1 = Math.abs(use[1].t - pl.t);
      const w0 = d1 / (d0 + d1), w1 = d0 / (d0 + d1);
      white = [0, 1, 2].map((c) => use[0].s.linear[c] * w0 + use[1].s.linear[c] * w1) as Rgb;
    } else white = use[0].s.linear;
    if (process.env.DIPWELL_DEBUG) console.error(cp.analyte, 'white', white.map((v) => Math.round(linearToSrgb(v) * 255)), 'pad', sample.linear.map((v) => Math.round(linearToSrgb(v) * 255)), use.map((u) => u.s.clippedFraction.toFixed(2)));
    const m = whiteCorrectionMatrix(white, stripLin);
    const corr = correctLinear(m, sample.linear);
    const lab = linearRgbToLab(corr[0], corr[1], corr[2]);
    const match = matchSwatches(cp, lab);
    halfSteps.push(match.halfStep);
    // Spread of the sample, in the corrected space.
    const q25 = correctLinear(m, sample.q25), q75 = correctLinear(m, sample.q75);
    const spread = deltaE2000(linearRgbToLab(...q25), linearRgbToLab(...q75)) / 2;
    // Does this pad look like bare plastic while the chart says it never does?
    const minPadToStrip = Math.min(...cp.swatches.map((s) => deltaE2000(s.lab, stripLab)));
    const toStrip = deltaE2000(lab, stripLab);
    // Plastic-like: the sample looks like the bare strip. It counts as a missing pad only where
    // every colour on the pad's scale differs clearly from the plastic.
    const plasticLike = toStrip < 2.5 && spread < 2;
    if (plasticLike) blank++;
    const isMissing = plasticLike && minPadToStrip >= 4 && toStrip < 0.4 * minPadToStrip;
    if (isMissing) missing.push(cp.label);
    missingFlags.push(isMissing);

    const reasons: string[] = [];
    const rel = match.deltaE / match.halfStep;
    let conf = Math.exp(-0.5 * rel * rel);
    if (rel > 1) reasons.push("its colour is far from every colour printed on the chart");
    const relS = spread / match.halfStep;
    conf *= Math.exp(-0.5 * relS * relS);
    if (relS > 0.8) reasons.push("its colour is uneven (glare, shadow or a drip on the pad)");
    if (match.rivalDeltaE < match.deltaE + 1) {
      conf *= 0.5;
      reasons.push("its colour also resembles another part of the chart");
    }
    if (sample.clippedFraction > 0.3) {
      conf *= 0.7;
      reasons.push("the photo is overexposed there");
    }
    if (sample.glareFraction > 0.25) {
      conf *= 0.8;
      reasons.push("there is glare on the pad");
    }
    conf = Math.max(0, Math.min(1, conf));
    const needsReview = conf < 0.6;
    const centre: [number, number] = [pl.centre[0] * k, pl.centre[1] * k];
    const reading: PadReading = {
      analyte: cp.analyte,
      label: cp.label,
      unit: cp.unit,
      value: match.value,
      confidence: conf,
      needsReview,
      lab,
      deltaE: match.deltaE,
      swatchIndex: match.swatchIndex,
      centre,
    };
    if (needsReview) reading.reason = `Please check ${cp.label}: ${reasons.length ? reasons.join("; ") : "the reading is uncertain"}.`;
    if (options.crops) reading.crop = await cropPad(img, pl.centre[0], pl.centre[1], Math.max(pl.halfAlong, pl.halfAcross) * 1.4);
    pads.push(reading);
  }
  // Nothing but bare plastic (or a plain surface) where the chart puts every pad: no strip was seen.
  if (chart.pads.length > 1 && blank === chart.pads.length && missing.length > 0) throw new ReadingError("no_strip", NO_STRIP_MESSAGE);
  // Pads whose colours are nowhere near the chart on most of the strip: this is not a strip
  // of this chart (or not a strip at all).
  // A pad already judged missing (bare plastic where the chart puts a pad) is not counted here:
  // that is a strip with fewer pads, told apart below.
  const alien = pads.filter((p, i) => !missingFlags[i] && p.deltaE > 12 && p.deltaE > 2.5 * halfSteps[i]).length;
  const shown = chart.pads.length - missing.length;
  if (chart.pads.length > 1 && (alien >= Math.ceil((2 * chart.pads.length) / 3) || (shown > 0 && alien === shown)))
    throw new ReadingError(
      "no_strip",
      `No test strip matching the chart${chart.name ? ` "${chart.name}"` : ""} was found in this photo. Check the chart, lay the strip flat on a plain surface with the whole strip in view, and take the photo again.`,
    );
  if (options.checkPads !== false && missing.length && missing.length >= Math.max(1, Math.ceil(chart.pads.length / 4))) {
    const found = chart.pads.length - missing.length;
    throw new ReadingError(
      "too_few_pads",
      `This strip shows fewer test pads than the chart expects (${found} of ${chart.pads.length}; no pad where the chart puts ${missing.join(", ")}). Check that the chosen chart matches this strip.`,
    );
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
