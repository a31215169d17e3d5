// Measuring the placed pads: each pad's inner 60 % sampled robustly in linear light, corrected
// with the white reference from the bare plastic on both sides of it (von Kries per linear
// channel, mapping the plastic to the chart's strip colour), then CIELAB D65.
import type { StripChart } from "./chart";
import { correctLinear, deltaE2000, hexToRgb, linearRgbToLab, srgbToLinear, whiteCorrectionMatrix, type Lab, type Mat3, type Rgb } from "./colour";
import type { StripGeometry } from "./geometry";
import { ReadingError, type RgbImage } from "./image";
import { sampleQuad, type RegionSample } from "./region-sample";
import { median } from "./stats";

export type PadMeasurement = {
  /** White-corrected colour of the pad. */
  lab: Lab;
  /** Half the ΔE00 between the pad's quartile colours (after correction): how even it is. */
  spread: number;
  sample: RegionSample;
  /** The white reference used (linear RGB as photographed). */
  white: Rgb;
  /** The pad looks like the bare plastic. */
  plasticLike: boolean;
  /** Bare plastic where the chart says a pad never looks like plastic: no pad there. */
  missing: boolean;
  /** Pad centre in working-image pixels. */
  centre: [number, number];
  /** Half the pad's side in working-image pixels (for crops). */
  half: number;
};

type BareSample = { t: number; s: RegionSample };

/** The four corners of a rectangle centred on the strip axis at t. */
export function quadAt(g: StripGeometry, t: number, halfAlong: number, halfAcross: number): [number, number][] {
  const [cx, cy] = g.centre, [ux, uy] = g.u, [vx, vy] = g.v;
  const px = cx + t * ux, py = cy + t * uy;
  return [
    [px - halfAlong * ux - halfAcross * vx, py - halfAlong * uy - halfAcross * vy],
    [px + halfAlong * ux - halfAcross * vx, py + halfAlong * uy - halfAcross * vy],
    [px + halfAlong * ux + halfAcross * vx, py + halfAlong * uy + halfAcross * vy],
    [px - halfAlong * ux + halfAcross * vx, py - halfAlong * uy + halfAcross * vy],
  ];
}

function bareSamples(img: RgbImage, g: StripGeometry): BareSample[] {
  const out: BareSample[] = [];
  const margin = Math.max(2, 0.5 * g.pxPerMm);
  const halfAcross = g.widthPx * 0.3;
  for (const [a, b] of g.bare) {
    const narrow = b - a - 2 * margin < 1.5;
    if (narrow && b - a < 3) continue;
    const lo = narrow ? a + (b - a) * 0.3 : a + margin, hi = narrow ? b - (b - a) * 0.3 : b - margin;
    const s = sampleQuad(img, quadAt(g, (lo + hi) / 2, (hi - lo) / 2, halfAcross), { whiteReference: true });
    if (s && s.kept >= 4) out.push({ t: (lo + hi) / 2, s });
  }
  return out;
}

export const luminance = (c: readonly number[]) => 0.2126 * c[0] + 0.7152 * c[1] + 0.0722 * c[2];

/** Share of the brightest bare sample's luminance above which a sample sets the plastic's chromaticity. */
const BRIGHT_SHARE = 0.8;

const chromaticity = (c: readonly number[]) => {
  const sum = c[0] + c[1] + c[2] + 1e-9;
  return [c[0] / sum, c[1] / sum];
};

/**
 * Bare-plastic samples with those far from the plastic's chromaticity dropped (pad bleed, the
 * strip's end). The plastic's chromaticity is the median over the brightest samples (within
 * BRIGHT_SHARE of the brightest; the brightest alone when fewer than three are): the plastic is
 * the lightest part of the strip, while a narrow gap between pads that nearly touch takes in their
 * darker colours (and such gaps may be most of the samples).
 */
export function consistentBare<T extends { s: { linear: readonly number[] } }>(bare: T[]): T[] {
  const maxY = Math.max(...bare.map((b) => luminance(b.s.linear)));
  let bright = bare.filter((b) => luminance(b.s.linear) >= BRIGHT_SHARE * maxY);
  // Fewer than three: no majority among them, the brightest alone.
  if (bright.length < 3) bright = bright.filter((b) => luminance(b.s.linear) === maxY);
  const medR = median(bright.map((b) => chromaticity(b.s.linear)[0])), medG = median(bright.map((b) => chromaticity(b.s.linear)[1]));
  const kept = bare.filter((b) => {
    const [r, g] = chromaticity(b.s.linear);
    return Math.hypot(r - medR, g - medG) < 0.02;
  });
  return kept.length ? kept : bare;
}

/** White reference for a pad at t: the nearest bare plastic on each side, weighted by distance. */
function whiteAt(bare: BareSample[], t: number, maxBareY: number): Rgb {
  const before = bare.filter((b) => b.t < t).sort((a, b) => b.t - a.t)[0];
  const after = bare.filter((b) => b.t > t).sort((a, b) => a.t - b.t)[0];
  const refs = [before, after].filter((r): r is BareSample => !!r);
  // A reference far darker than the others lies in a shadow the pad is probably not in.
  const usable = refs.filter((r) => luminance(r.s.linear) > 0.35 * maxBareY);
  const use = usable.length ? usable : refs.length ? refs : [bare[0]];
  if (use.length === 1) return use[0].s.linear;
  const d0 = Math.abs(use[0].t - t), d1 = Math.abs(use[1].t - t);
  const w0 = d1 / (d0 + d1 || 1), w1 = 1 - w0;
  return [0, 1, 2].map((c) => use[0].s.linear[c] * w0 + use[1].s.linear[c] * w1) as Rgb;
}

/** Share of the pad (along and across) sampled again when glare shows on its inner 60 %. */
const WIDER_SHARE = 0.85;

/** A quadrilateral scaled about its centre. */
export function scaleQuad(q: [number, number][], k: number): [number, number][] {
  const cx = (q[0][0] + q[1][0] + q[2][0] + q[3][0]) / 4, cy = (q[0][1] + q[1][1] + q[2][1] + q[3][1]) / 4;
  return q.map(([x, y]) => [cx + (x - cx) * k, cy + (y - cy) * k]);
}

export type StripMeasurement = { pads: PadMeasurement[]; warnings: string[] };

/** Samples and white-corrects every chart pad at its placement. */
export function measurePads(img: RgbImage, chart: StripChart, g: StripGeometry, trace?: (msg: string) => void): StripMeasurement {
  const warnings: string[] = [];
  // Samples with next to no light in them (beyond a turned photo's edge) are no plastic.
  const found = bareSamples(img, g).filter((b) => luminance(b.s.linear) > 1e-3);
  if (!found.length)
    throw new ReadingError("no_strip", "The strip was found, but no bare plastic could be seen next to its pads to judge the light. Take the photo again with the whole strip in view.");
  const bare = consistentBare(found);
  const maxBareY = Math.max(...bare.map((b) => luminance(b.s.linear)));
  if (bare.some((b) => b.s.clippedFraction > 0.5)) warnings.push("The photo is overexposed on the strip; colours may read too pale.");
  const stripLinear = hexToRgb(chart.strip.color).map(srgbToLinear);
  const pads = chart.pads.map((cp, i): PadMeasurement => {
    const pl = g.pads[i];
    const white = whiteAt(bare, pl.t, maxBareY);
    // Glare is the light's own colour, which the bare plastic beside the pad shows.
    const inner = pl.inner ?? quadAt(g, pl.t, pl.halfAlong * 0.6, pl.halfAcross * 0.6);
    let sample = sampleQuad(img, inner, { lamp: white });
    // Glare on the pad: it is sampled again over more of its area (a spot near its middle may
    // cover the inner part nearly whole and leave the pad's own colour towards its edges); the
    // more even of the two samples stands.
    if (sample && sample.glareFraction > 0) {
      const wider = sampleQuad(img, scaleQuad(inner, WIDER_SHARE / 0.6), { lamp: white });
      if (wider && wider.spreadDeltaE < sample.spreadDeltaE) sample = wider;
    }
    if (!sample) throw new ReadingError("no_strip", "Part of the strip lies outside the photo. Take the photo again with the whole strip in view.");
    const m: Mat3 = whiteCorrectionMatrix(white, stripLinear);
    const corrected = correctLinear(m, sample.linear);
    const lab = linearRgbToLab(corrected[0], corrected[1], corrected[2]);
    const spread = deltaE2000(linearRgbToLab(...correctLinear(m, sample.q25)), linearRgbToLab(...correctLinear(m, sample.q75))) / 2;
    // Plastic-like: the sample looks like the bare strip. It counts as a missing pad only where
    // every colour on the pad's scale differs clearly from the plastic.
    const toStrip = deltaE2000(lab, chart.strip.lab);
    const minPadToStrip = Math.min(...cp.swatches.map((s) => deltaE2000(s.lab, chart.strip.lab)));
    const plasticLike = toStrip < 2.5 && spread < 2;
    const missing = plasticLike && minPadToStrip >= 4 && toStrip < 0.4 * minPadToStrip;
    trace?.(`pad ${i + 1} ${cp.analyte}: lab ${[lab.l, lab.a, lab.b].map((v) => v.toFixed(1)).join(" ")} spread ${spread.toFixed(1)} glare ${sample.glareFraction.toFixed(2)}${missing ? " missing" : ""}`);
    return { lab, spread, sample, white, plasticLike, missing, centre: pl.centre, half: Math.max(pl.halfAlong, pl.halfAcross) };
  });
  return { pads, warnings };
}
