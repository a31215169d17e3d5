// The search copy: a reduced image (long side about 400 px) holding each pixel's "whiteness",
// on which candidate strips are searched before anything is sampled at the working size.
import { SRGB8_TO_LINEAR, srgbToLinear } from "./colour";
import type { RgbImage } from "./image";

export type SearchCopy = {
  w: number;
  h: number;
  /** Working-image pixels per search-copy pixel (along each side). */
  factor: number;
  /** Per pixel: linear luminance × (1 − 0.6 × saturation), plus a small floor. */
  whiteness: Float32Array;
};

/**
 * The search copy's long side is at most this many pixels (the working copy reduced by the
 * smallest whole factor that brings it there): every search pass costs in proportion to it.
 */
export const SEARCH_LONG_SIDE = 400;

const ENCODED_TO_LINEAR = (() => {
  const lut = new Float32Array(4096);
  for (let i = 0; i < 4096; i++) lut[i] = srgbToLinear(i / 4095);
  return lut;
})();

/**
 * The whole reduction from a working image of this size to its search copy: the smallest that
 * brings the long side to `target` or less (a 1334 px photo's copy is 333 px long, not 444: its
 * search passes take half the time, and a strip at the smallest readable size is still as many
 * pixels wide there as in a 1600 px photo's 400 px copy).
 */
export function searchFactor(width: number, height: number, target = SEARCH_LONG_SIDE): number {
  return Math.max(1, Math.ceil(Math.max(width, height) / target));
}

/** Whiteness of one pixel from its linear RGB (see makeSearchCopy). */
function whitenessOf(r: number, g: number, b: number): number {
  // Math.max and Math.min rather than comparisons: a branch per channel would be mispredicted
  // on most pixels of a noisy photo.
  const mx = Math.max(r, g, b), mn = Math.min(r, g, b);
  const sat = mx > 1e-4 ? (mx - mn) / mx : 0;
  return (0.2126 * r + 0.7152 * g + 0.0722 * b) * (1 - 0.6 * sat) + 0.002;
}

/**
 * The search copy from an image already reduced by `factor` from the working size (sharp's
 * shrink-on-load decode of the photo, see search-decode.ts): whiteness per pixel.
 */
export function searchCopyFromReduced(rgb: RgbImage, factor: number): SearchCopy {
  const { width: w, height: h, data } = rgb;
  const whiteness = new Float32Array(w * h);
  const lut = SRGB8_TO_LINEAR;
  for (let i = 0, o = 0; i < w * h; i++, o += 3) whiteness[i] = whitenessOf(lut[data[o]], lut[data[o + 1]], lut[data[o + 2]]);
  return { w, h, factor, whiteness };
}

/** Linear values by block sum for blocks of `sumToLinearPer`² pixels summed (see makeSearchCopy), kept between copies. */
let sumToLinear = new Float32Array(0), sumToLinearPer = 0;

/**
 * Reduced copy with a per-pixel whiteness in linear light: luminance times (1 − 0.6 ×
 * saturation). Both factors scale with the light, so a ratio against the local
 * background is unchanged by shadows and light falloff.
 */
export function makeSearchCopy(img: RgbImage, target = SEARCH_LONG_SIDE): SearchCopy {
  const f = searchFactor(img.width, img.height, target);
  const w = Math.floor(img.width / f), h = Math.floor(img.height / f);
  const whiteness = new Float32Array(w * h);
  const data = img.data, rowBytes = img.width * 3;
  // For blocks of 4×4 and more, every other row and column is enough for searching.
  const step = f >= 4 ? 2 : 1;
  const per = Math.ceil(f / step);
  // Block means of the encoded values, then the sRGB transfer function (a close enough
  // approximation of the linear mean for searching): a block's channel sum (a whole number) ×
  // toLut is its index in ENCODED_TO_LINEAR, looked up once per possible sum into a table by sum.
  // Each block is summed where it lies (its rows one after another in the working copy), with no
  // running sums kept per column.
  const toLut = 4095 / 255 / (per * per);
  if (sumToLinearPer !== per) {
    const maxSum = 255 * per * per;
    sumToLinear = new Float32Array(maxSum + 1);
    for (let v = 0; v <= maxSum; v++) sumToLinear[v] = ENCODED_TO_LINEAR[(v * toLut + 0.5) | 0];
    sumToLinearPer = per;
  }
  const lut = sumToLinear;
  const colBytes = 3 * step, blockBytes = 3 * f;
  for (let sy = 0; sy < h; sy++) {
    const rowO = sy * f * rowBytes;
    let i = sy * w;
    // The common blocks (3 × 3 whole, 4 × 4 every other row and column) without an inner loop.
    if (f === 3 && step === 1) {
      const r1 = rowBytes, r2 = 2 * rowBytes;
      for (let o = rowO, end = rowO + w * 9; o < end; o += 9, i++) {
        const r = data[o] + data[o + 3] + data[o + 6] + data[o + r1] + data[o + r1 + 3] + data[o + r1 + 6] + data[o + r2] + data[o + r2 + 3] + data[o + r2 + 6];
        const g = data[o + 1] + data[o + 4] + data[o + 7] + data[o + r1 + 1] + data[o + r1 + 4] + data[o + r1 + 7] + data[o + r2 + 1] + data[o + r2 + 4] + data[o + r2 + 7];
        const b = data[o + 2] + data[o + 5] + data[o + 8] + data[o + r1 + 2] + data[o + r1 + 5] + data[o + r1 + 8] + data[o + r2 + 2] + data[o + r2 + 5] + data[o + r2 + 8];
        whiteness[i] = whitenessOf(lut[r], lut[g], lut[b]);
      }
    } else if (f === 4 && step === 2) {
      const r2 = 2 * rowBytes;
      for (let o = rowO, end = rowO + w * 12; o < end; o += 12, i++) {
        const r = data[o] + data[o + 6] + data[o + r2] + data[o + r2 + 6];
        const g = data[o + 1] + data[o + 7] + data[o + r2 + 1] + data[o + r2 + 7];
        const b = data[o + 2] + data[o + 8] + data[o + r2 + 2] + data[o + r2 + 8];
        whiteness[i] = whitenessOf(lut[r], lut[g], lut[b]);
      }
    } else
      for (let sx = 0; sx < w; sx++, i++) {
        let r = 0, g = 0, b = 0;
        for (let dy = 0; dy < f; dy += step)
          for (let dx = 0, o = rowO + dy * rowBytes + sx * blockBytes; dx < f; dx += step, o += colBytes) (r += data[o]), (g += data[o + 1]), (b += data[o + 2]);
        whiteness[i] = whitenessOf(lut[r], lut[g], lut[b]);
      }
  }
  return { w, h, factor: f, whiteness };
}

let integral = new Float64Array(0);

/** Mean over a (2r+1)² box around each pixel (clipped at the borders), from an integral image; into `out` when given. */
export function boxMean(src: Float32Array, w: number, h: number, r: number, out = new Float32Array(w * h)): Float32Array {
  // The integral image is kept between calls (its first row and column stay zero).
  if (integral.length < (w + 1) * (h + 1)) integral = new Float64Array((w + 1) * (h + 1));
  const I = integral;
  I.fill(0, 0, w + 1);
  for (let y = 0; y < h; y++) {
    let row = 0;
    I[(y + 1) * (w + 1)] = 0;
    for (let x = 0; x < w; x++) {
      row += src[y * w + x];
      I[(y + 1) * (w + 1) + x + 1] = I[y * (w + 1) + x + 1] + row;
    }
  }
  // Columns whose box lies wholly inside the row range [0, w): no clipping to work out there.
  const xa = Math.min(w, r), xb = Math.max(xa, w - r);
  for (let y = 0; y < h; y++) {
    const y0 = Math.max(0, y - r), y1 = Math.min(h, y + r + 1);
    const top = y0 * (w + 1), bottom = y1 * (w + 1), rows = y1 - y0, o = y * w;
    const edge = (x: number) => {
      const x0 = Math.max(0, x - r), x1 = Math.min(w, x + r + 1);
      out[o + x] = (I[bottom + x1] - I[top + x1] - I[bottom + x0] + I[top + x0]) / (rows * (x1 - x0));
    };
    for (let x = 0; x < xa; x++) edge(x);
    const area = rows * (2 * r + 1);
    for (let x = xa; x < xb; x++) out[o + x] = (I[bottom + x + r + 1] - I[top + x + r + 1] - I[bottom + x - r] + I[top + x - r]) / area;
    for (let x = xb; x < w; x++) edge(x);
  }
  return out;
}
