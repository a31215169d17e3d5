// A region of the working image (a pad, the bare plastic beside it) sampled robustly: the pixels
// inside a quadrilateral, clipped and glared ones set aside, each channel's trimmed mean (or
// median, for a white reference) in linear light, and the spread between its quartiles.
import { SRGB8_TO_LINEAR, linearRgbToLab, deltaE2000, type Rgb } from "./colour";
import { markAdditiveGlare } from "./glare";
import type { RgbImage } from "./image";
import { quantileOf } from "./stats";

export type RegionSample = {
  /** Robust linear-light sRGB of the region (trimmed mean of the kept pixels). */
  linear: Rgb;
  /** Linear RGB at the 25th and 75th percentiles per channel (for spread). */
  q25: Rgb;
  q75: Rgb;
  /** ΔE00 between the quartile colours, halved: a robust spread of the region. */
  spreadDeltaE: number;
  pixels: number;
  kept: number;
  glareFraction: number;
  clippedFraction: number;
};

function quantile(a: Float32Array, q: number): number {
  if (a.length === 0) return NaN;
  const p = q * (a.length - 1);
  const i = Math.floor(p), f = p - i;
  return i + 1 < a.length ? a[i] * (1 - f) + a[i + 1] * f : a[i];
}
function trimmedMean(sorted: Float32Array, trim: number): number {
  const n = sorted.length;
  const k = Math.floor(n * trim);
  let s = 0, c = 0;
  for (let i = k; i < n - k; i++) (s += sorted[i]), c++;
  return c ? s / c : quantile(sorted, 0.5);
}

/**
 * Samples a convex quadrilateral of an 8-bit sRGB image robustly, in linear light.
 * Clipped pixels (a channel at 252 or more) and glare (much brighter than the region's
 * median and less saturated) are dropped, then a 25 % trimmed mean is taken per channel.
 * corners: four [x, y] points in order around the quad (pixel centres at integer + 0.5).
 */
export type SampleOptions = {
  /**
   * Keep clipped pixels and take the per-channel median: for a white reference, whose
   * brightest pixels clip first, the median stays right while fewer than half are clipped.
   */
  whiteReference?: boolean;
  /**
   * The light's colour as photographed (the bare plastic's linear RGB): glare is then found as
   * light of that colour added to the region's own (glare.ts), which holds however much of the
   * region it covers; where none shows, by brightness against the region's median as without it.
   */
  lamp?: Rgb;
};

/**
 * Work arrays of region samples, kept from one region to the next (grown as needed): a read
 * samples a dozen regions of thousands of pixels each, whose arrays would otherwise be garbage.
 */
const scratch = { idx: new Int32Array(0), f32: Array.from({ length: 6 }, () => new Float32Array(0)), u8: Array.from({ length: 4 }, () => new Uint8Array(0)) };
/** The k-th kept Float32Array of at least n values (its first n, as a view). */
function f32(k: number, n: number): Float32Array {
  if (scratch.f32[k].length < n) scratch.f32[k] = new Float32Array(Math.max(n, 2 * scratch.f32[k].length));
  return scratch.f32[k].subarray(0, n);
}
/** The k-th kept Uint8Array of at least n values, zeroed. */
function u8(k: number, n: number): Uint8Array {
  if (scratch.u8[k].length < n) scratch.u8[k] = new Uint8Array(Math.max(n, 2 * scratch.u8[k].length));
  return scratch.u8[k].subarray(0, n).fill(0);
}

/** The region's glare as the lamp's light added to the pad's (glare.ts); null when none shows. */
function additiveGlare(data: Uint8Array, idx: Int32Array, n: number, clipped: Uint8Array, lamp: Rgb): Uint8Array | null {
  const lin = f32(5, 3 * n), usable = u8(2, n), glare = u8(3, n);
  for (let k = 0; k < n; k++) {
    const o = idx[k];
    (lin[3 * k] = SRGB8_TO_LINEAR[data[o]]), (lin[3 * k + 1] = SRGB8_TO_LINEAR[data[o + 1]]), (lin[3 * k + 2] = SRGB8_TO_LINEAR[data[o + 2]]);
    usable[k] = clipped[k] ? 0 : 1;
  }
  return markAdditiveGlare(lin, usable, lamp, glare) < 0 ? null : glare;
}

export function sampleQuad(img: RgbImage, corners: [number, number][], opts: SampleOptions = {}): RegionSample | null {
  const { width: W, height: H, data } = img;
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  for (const [x, y] of corners) (x0 = Math.min(x0, x)), (x1 = Math.max(x1, x)), (y0 = Math.min(y0, y)), (y1 = Math.max(y1, y));
  const ix0 = Math.max(0, Math.floor(x0)), ix1 = Math.min(W - 1, Math.ceil(x1));
  const iy0 = Math.max(0, Math.floor(y0)), iy1 = Math.min(H - 1, Math.ceil(y1));
  if (ix1 < ix0 || iy1 < iy0) return null;
  // orientation sign of the quad
  let area = 0;
  for (let i = 0; i < 4; i++) {
    const [ax, ay] = corners[i], [bx, by] = corners[(i + 1) % 4];
    area += ax * by - bx * ay;
  }
  const sgn = area >= 0 ? 1 : -1;
  // Each side as its start point and direction, for the inside test.
  const sx0 = corners.map((c) => c[0]), sy0 = corners.map((c) => c[1]);
  const sdx = corners.map((c, i) => corners[(i + 1) % 4][0] - c[0]), sdy = corners.map((c, i) => corners[(i + 1) % 4][1] - c[1]);
  const cap = (ix1 - ix0 + 1) * (iy1 - iy0 + 1);
  if (scratch.idx.length < cap) scratch.idx = new Int32Array(Math.max(cap, 2 * scratch.idx.length));
  const idx = scratch.idx;
  let n = 0;
  // A pixel centre inside all four sides' half-planes. Their intersection is convex, so on each
  // row the pixels inside form one run: found from both ends, and every pixel between taken.
  const inside = (px: number, py: number) => {
    for (let i = 0; i < 4; i++) if (sgn * (sdx[i] * (py - sy0[i]) - sdy[i] * (px - sx0[i])) < 0) return false;
    return true;
  };
  for (let y = iy0; y <= iy1; y++) {
    const py = y + 0.5;
    let xa = ix0;
    while (xa <= ix1 && !inside(xa + 0.5, py)) xa++;
    if (xa > ix1) continue;
    let xb = ix1;
    while (xb > xa && !inside(xb + 0.5, py)) xb--;
    for (let x = xa, o = (y * W + xa) * 3; x <= xb; x++, o += 3) idx[n++] = o;
  }
  if (n === 0) return null;
  // first pass: clipping, luminance and chroma
  const Y = f32(0, n), C = f32(1, n);
  const clipped = u8(0, n);
  let nClip = 0;
  for (let k = 0; k < n; k++) {
    const o = idx[k];
    const r = data[o], g = data[o + 1], b = data[o + 2];
    if (r >= 252 || g >= 252 || b >= 252) (clipped[k] = 1), nClip++;
    const lr = SRGB8_TO_LINEAR[r], lg = SRGB8_TO_LINEAR[g], lb = SRGB8_TO_LINEAR[b];
    Y[k] = 0.2126 * lr + 0.7152 * lg + 0.0722 * lb;
    const mx = Math.max(r, g, b), mn = Math.min(r, g, b);
    C[k] = (mx - mn) / (mx + 1);
  }
  const medY = quantileOf(Y, 0.5), medC = quantileOf(C, 0.5);
  const keep = u8(1, n);
  let nGlare = 0, nKeep = 0;
  const lampGlare = opts.lamp ? additiveGlare(data, idx, n, clipped, opts.lamp) : null;
  if (lampGlare) {
    for (let k = 0; k < n; k++) {
      // A clipped pixel is glare too when it is far brighter than the region (not a pale pad at full light).
      const g = lampGlare[k] === 1 || (clipped[k] === 1 && Y[k] > medY * 1.5);
      if (g) nGlare++;
      if (!g && (opts.whiteReference || !clipped[k])) (keep[k] = 1), nKeep++;
    }
  } else
    for (let k = 0; k < n; k++) {
      const glare = Y[k] > medY * 1.5 || (Y[k] > medY * 1.15 && C[k] < medC * 0.8);
      if (glare) nGlare++;
      if (!glare && (opts.whiteReference || !clipped[k])) (keep[k] = 1), nKeep++;
    }
  if (nKeep < Math.max(4, n * 0.15)) {
    // Too little left: fall back to everything but the glare.
    nKeep = 0;
    for (let k = 0; k < n; k++) {
      const glare = Y[k] > medY * 1.5;
      keep[k] = glare ? 0 : 1;
      if (keep[k]) nKeep++;
    }
    if (nKeep === 0) keep.fill(1), (nKeep = n);
  }
  // Each channel's kept values in ascending order: a count per 8-bit code, then the codes in
  // order through the (increasing) transfer function; the same as sorting the linear values.
  const counts = new Uint32Array(3 * 256);
  for (let k = 0; k < n; k++) {
    if (!keep[k]) continue;
    const o = idx[k];
    counts[data[o]]++;
    counts[256 + data[o + 1]]++;
    counts[512 + data[o + 2]]++;
  }
  const ch = [0, 1, 2].map((c) => {
    const sorted = f32(2 + c, nKeep);
    for (let v = 0, m = 0; v < 256; v++) sorted.fill(SRGB8_TO_LINEAR[v], m, (m += counts[c * 256 + v]));
    return sorted;
  });
  const linear: Rgb = opts.whiteReference
    ? [quantile(ch[0], 0.5), quantile(ch[1], 0.5), quantile(ch[2], 0.5)]
    : [trimmedMean(ch[0], 0.25), trimmedMean(ch[1], 0.25), trimmedMean(ch[2], 0.25)];
  const q25: Rgb = [quantile(ch[0], 0.25), quantile(ch[1], 0.25), quantile(ch[2], 0.25)];
  const q75: Rgb = [quantile(ch[0], 0.75), quantile(ch[1], 0.75), quantile(ch[2], 0.75)];
  const spreadDeltaE = deltaE2000(linearRgbToLab(...q25), linearRgbToLab(...q75)) / 2;
  return { linear, q25, q75, spreadDeltaE, pixels: n, kept: nKeep, glareFraction: nGlare / n, clippedFraction: nClip / n };
}
