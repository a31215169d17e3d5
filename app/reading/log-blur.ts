// Natural logarithms of float32 planes from their bits, and the 3 × 3 box blur of a plane or of
// its logarithms (the edge search's log whiteness, edge-pairs.ts).

/** ln(1 + k / LOG_STEPS) for k = 0 … LOG_STEPS: the mantissa's share of a float's logarithm. */
const LOG_BITS = 12, LOG_STEPS = 1 << LOG_BITS;
const LOG_MANTISSA = (() => {
  const t = new Float64Array(LOG_STEPS + 1);
  for (let k = 0; k <= LOG_STEPS; k++) t[k] = Math.log1p(k / LOG_STEPS);
  return t;
})();

/** ln of the float32 whose bits are b (see logInto). */
function lnOfBits(b: number): number {
  const t = LOG_MANTISSA, k = (b >>> LOW_BITS) & (LOG_STEPS - 1);
  return ((b >>> 23) - 127) * Math.LN2 + t[k] + (t[k + 1] - t[k]) * (b & LOW_MASK) * LOW_SCALE;
}
const LOW_BITS = 23 - LOG_BITS, LOW_MASK = (1 << LOW_BITS) - 1, LOW_SCALE = 1 / (1 << LOW_BITS);

/** The bits of a Float32Array's values, read in place. */
const bitsOf = (a: Float32Array) => new Int32Array(a.buffer, a.byteOffset, a.length);

/**
 * Natural logarithms of positive float32 values, from their bits: the exponent times ln 2 plus
 * ln(mantissa), interpolated in a table of 4096 steps (within about 1e-8 of Math.log, below
 * float32's own rounding; several times faster on a whole search copy).
 */
export function logInto(src: Float32Array, out: Float32Array) {
  const bits = bitsOf(src);
  for (let i = 0; i < src.length; i++) out[i] = lnOfBits(bits[i]);
}

/**
 * The 3 × 3 box blur (boxBlur3) of the logarithms (logInto) of `src`, into `out`: each row's
 * logarithms are taken into a row of their own and blurred along the row from there, so that no
 * plane of logarithms is written and read again.
 */
export function logBlur3(src: Float32Array, w: number, h: number, out: Float32Array) {
  if (blurBuffer.length < w * h) blurBuffer = new Float32Array(w * h);
  if (logRow.length < w) logRow = new Float32Array(w);
  const bits = bitsOf(src), row = logRow;
  for (let y = 0; y < h; y++) {
    for (let x = 0, i = y * w; x < w; x++, i++) row[x] = lnOfBits(bits[i]);
    blurRow(row, 0, w, blurBuffer, y * w);
  }
  blurColumns(blurBuffer, w, h, out);
}
let logRow = new Float32Array(0);
/** The blur's row pass, kept between calls. */
let blurBuffer = new Float32Array(0);

/** In-place 3 × 3 box blur (edges: the pixels inside the image only). */
export function boxBlur3(a: Float32Array, w: number, h: number) {
  if (blurBuffer.length < w * h) blurBuffer = new Float32Array(w * h);
  for (let y = 0; y < h; y++) blurRow(a, y * w, w, blurBuffer, y * w);
  blurColumns(blurBuffer, w, h, a);
}

/** One row of w values from src[from] blurred along the row into out[to] (the borders apart, so that the inner loop tests nothing). */
function blurRow(src: Float32Array, from: number, w: number, out: Float32Array, to: number) {
  if (w === 1) {
    out[to] = src[from];
    return;
  }
  out[to] = (src[from] + src[from + 1]) / 2;
  for (let x = 1, i = from + 1; x < w - 1; x++, i++) out[to + x] = (src[i] + src[i - 1] + src[i + 1]) / 3;
  out[to + w - 1] = (src[from + w - 1] + src[from + w - 2]) / 2;
}

/** The rows' blur (tmp) blurred down the columns into a (sums in the same order as the rows'). */
function blurColumns(tmp: Float32Array, w: number, h: number, a: Float32Array) {
  if (h === 1) {
    a.set(tmp.subarray(0, w));
    return;
  }
  for (let x = 0; x < w; x++) a[x] = (tmp[x] + tmp[x + w]) / 2;
  for (let i = w, end = (h - 1) * w; i < end; i++) a[i] = (tmp[i] + tmp[i - w] + tmp[i + w]) / 3;
  for (let i = (h - 1) * w; i < h * w; i++) a[i] = (tmp[i] + tmp[i - w]) / 2;
}
