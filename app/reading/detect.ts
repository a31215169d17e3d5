// Finding the strip in a photo and placing its pads.
//
// 1. A reduced copy (long side ~500 px) is made from the working image. Each pixel gets a
//    "whiteness" (luma minus part of its chroma: the strip is a bright, low-chroma plastic),
//    and the local background's whiteness (a wide box mean) is subtracted.
// 2. At a few thresholds the mask is labelled into connected components; each component is
//    scored as a candidate strip (or strip handle) from its image moments: fill of its
//    moment rectangle, elongation against the chart's strip shape.
// 3. In the working image the strip's two long edges are located on cross-sections and a
//    line is fitted through their mid points (axis, width → pixels per millimetre).
// 4. Along the axis, the inner band is compared with the surface on both sides, giving the
//    strip's two ends; a profile of "difference from bare plastic" is matched to the chart's
//    pad layout over offset and scale, for both orientations; the better fit tells the tip.
import type { StripChart } from "./chart";
import { correctLinear, deltaE2000, hexToRgb, lerpLab, linearRgbToLab, srgbToLinear, whiteCorrectionMatrix } from "./colour";
import { ReadingError, type RgbImage } from "./image";

export type Interval = [number, number];
export type PadPlacement = {
  /** Position along the axis (work px, from the strip centre). */
  t: number;
  centre: [number, number];
  halfAlong: number;
  halfAcross: number;
};
export type StripGeometry = {
  centre: [number, number];
  /** Unit vector along the axis (the t direction). */
  u: [number, number];
  /** Unit vector across the axis. */
  v: [number, number];
  /** +1 if t grows from the tip towards the handle, −1 otherwise. */
  dir: 1 | -1;
  tipT: number;
  handleT: number;
  widthPx: number;
  pxPerMm: number;
  pads: PadPlacement[];
  /** Bare-plastic intervals (t) usable as white reference, sorted by t. */
  bare: Interval[];
  fitScore: number;
  /** Mean ΔE00 from the placed pads' colours to their swatch paths (white-corrected from the gaps). */
  colourCost: number;
  /** Length of the blob the axis was fitted over (work px). */
  axisSpan: number;
  /** fitScore, discounted when the strip's length could not be confirmed (for ranking candidates). */
  rank: number;
  /** Both ends found at the chart's length. */
  lengthOk: boolean;
  /** The pads stand out from the bare plastic clearly more than the gaps between them do. */
  convincing: boolean;
  warnings: string[];
};

const NO_STRIP =
  "No test strip was found in this photo. Lay the strip flat on a plain surface, keep the whole strip in the picture, and take the photo again.";

// ---------------------------------------------------------------- search copy

type Search = { w: number; h: number; f: number; wh: Float32Array };

/**
 * Reduced copy with a per-pixel whiteness in linear light: luminance times (1 − 0.6 ×
 * saturation). Both factors scale with the light, so a ratio against the local
 * background is unchanged by shadows and light falloff.
 */
export function makeSearch(img: RgbImage, target = 400): Search {
  const f = Math.max(1, Math.round(Math.max(img.width, img.height) / target));
  const w = Math.floor(img.width / f), h = Math.floor(img.height / f);
  const acc = new Uint32Array(w * 3);
  const wh = new Float32Array(w * h);
  const data = img.data, W = img.width;
  // For blocks of 4×4 and more, every other row and column is enough for searching.
  const st = f >= 4 ? 2 : 1;
  const per = Math.ceil(f / st);
  const inv = 1 / (per * per);
  // Block means of the encoded values, then the sRGB transfer function (a close enough
  // approximation of the linear mean for searching).
  const lut = new Float32Array(4096);
  for (let i = 0; i < 4096; i++) lut[i] = srgbToLinear(i / 4095);
  const q = 4095 / 255;
  for (let sy = 0; sy < h; sy++) {
    acc.fill(0);
    for (let dy = 0; dy < f; dy += st) {
      const rowO = ((sy * f + dy) * W) * 3;
      for (let sx = 0, k = 0; sx < w; sx++, k += 3) {
        let r = 0, g = 0, b = 0;
        for (let dx = 0, o = rowO + sx * f * 3; dx < f; dx += st, o += 3 * st) (r += data[o]), (g += data[o + 1]), (b += data[o + 2]);
        acc[k] += r;
        acc[k + 1] += g;
        acc[k + 2] += b;
      }
    }
    for (let sx = 0, k = 0; sx < w; sx++, k += 3) {
      const r = lut[(acc[k] * inv * q + 0.5) | 0], g = lut[(acc[k + 1] * inv * q + 0.5) | 0], b = lut[(acc[k + 2] * inv * q + 0.5) | 0];
      const mx = r > g ? (r > b ? r : b) : g > b ? g : b;
      const mn = r < g ? (r < b ? r : b) : g < b ? g : b;
      const sat = mx > 1e-4 ? (mx - mn) / mx : 0;
      wh[sy * w + sx] = (0.2126 * r + 0.7152 * g + 0.0722 * b) * (1 - 0.6 * sat) + 0.002;
    }
  }
  return { w, h, f, wh };
}

function boxMean(src: Float32Array, w: number, h: number, r: number): Float32Array {
  const I = new Float64Array((w + 1) * (h + 1));
  for (let y = 0; y < h; y++) {
    let row = 0;
    for (let x = 0; x < w; x++) {
      row += src[y * w + x];
      I[(y + 1) * (w + 1) + x + 1] = I[y * (w + 1) + x + 1] + row;
    }
  }
  const out = new Float32Array(w * h);
  for (let y = 0; y < h; y++) {
    const y0 = Math.max(0, y - r), y1 = Math.min(h, y + r + 1);
    for (let x = 0; x < w; x++) {
      const x0 = Math.max(0, x - r), x1 = Math.min(w, x + r + 1);
      const s = I[y1 * (w + 1) + x1] - I[y0 * (w + 1) + x1] - I[y1 * (w + 1) + x0] + I[y0 * (w + 1) + x0];
      out[y * w + x] = s / ((y1 - y0) * (x1 - x0));
    }
  }
  return out;
}

type Candidate = { cx: number; cy: number; angle: number; length: number; width: number; score: number; n: number };

const ccLabels = { buf: new Int32Array(0) };

/**
 * Connected components (4-connected) of the pixels of d above t, with their image
 * moments, in one pass: moments are gathered per provisional label and merged by root.
 */
function components(d: Float32Array, t: number, w: number, h: number, minArea: number): Candidate[] {
  if (ccLabels.buf.length < w * h) ccLabels.buf = new Int32Array(w * h);
  const labels = ccLabels.buf;
  let cap = 1024;
  let parent = new Int32Array(cap);
  let mom = new Float64Array(cap * 6);
  const find = (a: number) => {
    while (parent[a] !== a) (parent[a] = parent[parent[a]]), (a = parent[a]);
    return a;
  };
  let next = 1;
  for (let y = 0; y < h; y++) {
    const row = y * w;
    for (let x = 0; x < w; x++) {
      const i = row + x;
      if (!(d[i] > t)) {
        labels[i] = 0;
        continue;
      }
      const l = x > 0 ? labels[i - 1] : 0;
      const u = y > 0 ? labels[i - w] : 0;
      let lab: number;
      if (l && u) {
        if (l === u) lab = l;
        else {
          const a = find(l), b = find(u);
          lab = a < b ? a : b;
          if (a !== b) parent[a < b ? b : a] = lab;
        }
      } else if (l || u) lab = l || u;
      else {
        if (next >= cap) {
          cap *= 2;
          const np = new Int32Array(cap);
          np.set(parent);
          parent = np;
          const nm = new Float64Array(cap * 6);
          nm.set(mom);
          mom = nm;
        }
        parent[next] = next;
        lab = next++;
      }
      labels[i] = lab;
      const o = lab * 6;
      mom[o]++;
      mom[o + 1] += x;
      mom[o + 2] += y;
      mom[o + 3] += x * x;
      mom[o + 4] += y * y;
      mom[o + 5] += x * y;
    }
  }
  for (let r = next - 1; r >= 1; r--) {
    const root = find(r);
    if (root !== r) for (let k = 0; k < 6; k++) (mom[root * 6 + k] += mom[r * 6 + k]), (mom[r * 6 + k] = 0);
  }
  const out: Candidate[] = [];
  for (let r = 1; r < next; r++) {
    const n = mom[r * 6];
    if (n < minArea) continue;
    const cx = mom[r * 6 + 1] / n, cy = mom[r * 6 + 2] / n;
    const mxx = mom[r * 6 + 3] / n - cx * cx, myy = mom[r * 6 + 4] / n - cy * cy, mxy = mom[r * 6 + 5] / n - cx * cy;
    const tr = mxx + myy, det = mxx * myy - mxy * mxy;
    const disc = Math.sqrt(Math.max(0, (tr * tr) / 4 - det));
    const l1 = tr / 2 + disc, l2 = Math.max(1e-6, tr / 2 - disc);
    const angle = 0.5 * Math.atan2(2 * mxy, mxx - myy);
    out.push({ cx, cy, angle, length: Math.sqrt(12 * l1), width: Math.sqrt(12 * l2), score: 0, n });
  }
  return out;
}

function scoreCandidate(c: Candidate, chart: StripChart): number {
  const fill = c.n / (c.length * c.width);
  const e = c.length / c.width;
  if (c.width < 2 || e < 2.5 || fill < 0.6 || fill > 1.3) return 0;
  const full = chart.strip.lengthMm / chart.strip.widthMm;
  const padEnd = Math.max(...chart.pads.map((p) => p.centerMm + p.sizeMm / 2));
  const handle = Math.max(2.5, ((chart.strip.lengthMm - padEnd) / chart.strip.widthMm) * 0.6);
  let aspect = 1;
  if (e < handle) aspect = Math.pow(e / handle, 3);
  else if (e > full * 1.3) aspect = Math.pow((full * 1.3) / e, 3);
  const fillScore = Math.pow(Math.min(1, fill / 0.95), 4) * (fill > 1.1 ? 0.7 : 1);
  return Math.sqrt(c.n) * c.width * fillScore * aspect;
}

export function findCandidates(s: Search, chart: StripChart, divs: number[] = [16, 40]): Candidate[] {
  const { w, h, wh } = s;
  const cands: Candidate[] = [];
  const minArea = Math.max(12, Math.round((w * h) / 20000));
  const d = new Float32Array(w * h);
  // Two background scales: a wide one, and a narrow one that keeps shadow edges from
  // reaching far beyond them.
  for (const div of divs) {
    const r = Math.max(5, Math.round(Math.max(w, h) / div));
    const bg = boxMean(wh, w, h, r);
    // log ratio to the background, and its 99.9th percentile from a histogram
    const hist = new Uint32Array(512);
    for (let i = 0; i < d.length; i++) {
      const v = Math.log(wh[i] / bg[i]);
      d[i] = v;
      if (v > 0) hist[Math.min(511, (v * 200) | 0)]++;
    }
    let top = 0;
    for (let b = 511, acc = 0; b >= 0; b--) {
      acc += hist[b];
      if (acc >= d.length * 0.001) {
        top = (b + 0.5) / 200;
        break;
      }
    }
    const ladder = div === 16 ? [0.04, 0.07, 0.11, 0.17, 0.26, 0.4, 0.6] : [0.03, 0.06, 0.1, 0.16, 0.25];
    const thresholds = [...ladder, top * 0.35, top * 0.55].filter((t) => t > 0.02 && t < top);
    for (const t of thresholds) {
      for (const c of components(d, t, w, h, minArea)) {
        c.score = scoreCandidate(c, chart);
        if (c.score > 0) cands.push(c);
      }
    }
  }
  cands.sort((a, b) => b.score - a.score);
  return cands;
}

/**
 * Candidates from pairs of long, straight, parallel edges about one strip width apart: a coarse
 * Hough transform (1° by 1 px) of the sharp edges of the search copy's log whiteness. This finds
 * a strip whose bright blob merges with a pale surface, a grout line or another bright object,
 * where the thresholded components cannot separate it. Each pair's extent along the lines is
 * taken from where its edge pixels lie.
 */
export function edgePairCandidates(s: Search, chart: StripChart, maxOut = 8): Candidate[] {
  const { w, h, wh } = s;
  const L = new Float32Array(w * h);
  for (let i = 0; i < L.length; i++) L[i] = Math.log(wh[i]);
  // Sobel gradient; edge pixels: the strongest few per cent, above a floor.
  const mag = new Float32Array(w * h), ang = new Float32Array(w * h);
  const hist = new Uint32Array(256);
  for (let y = 1; y < h - 1; y++)
    for (let x = 1; x < w - 1; x++) {
      const i = y * w + x;
      const gx = L[i - w + 1] + 2 * L[i + 1] + L[i + w + 1] - L[i - w - 1] - 2 * L[i - 1] - L[i + w - 1];
      const gy = L[i + w - 1] + 2 * L[i + w] + L[i + w + 1] - L[i - w - 1] - 2 * L[i - w] - L[i - w + 1];
      const m = Math.hypot(gx, gy) / 8;
      mag[i] = m;
      ang[i] = Math.atan2(gy, gx);
      hist[Math.min(255, (m * 1000) | 0)]++;
    }
  let thr = 0;
  for (let b = 255, acc = 0; b >= 0; b--) {
    acc += hist[b];
    if (acc >= w * h * 0.1) {
      thr = b / 1000;
      break;
    }
  }
  thr = Math.max(thr, 0.008);
  const nT = 180, diag = Math.ceil(Math.hypot(w, h)), nR = 2 * diag + 1;
  const cosT = new Float32Array(nT), sinT = new Float32Array(nT);
  for (let k = 0; k < nT; k++) (cosT[k] = Math.cos((k * Math.PI) / nT)), (sinT[k] = Math.sin((k * Math.PI) / nT));
  const acc = new Float32Array(nT * nR);
  const ex: number[] = [], ey: number[] = [], et: number[] = [];
  for (let y = 1; y < h - 1; y++)
    for (let x = 1; x < w - 1; x++) {
      const i = y * w + x;
      const m = mag[i];
      if (!(m > thr)) continue;
      // Thin edges: keep local maxima of the magnitude across the edge.
      const a = ang[i], c = Math.cos(a), sn = Math.sin(a);
      const dx = Math.round(c), dy = Math.round(sn);
      if (mag[i + dy * w + dx] > m || mag[i - dy * w - dx] >= m) continue;
      let th = a < 0 ? a + Math.PI : a;
      if (th >= Math.PI) th -= Math.PI;
      const k0 = Math.round((th * nT) / Math.PI);
      ex.push(x), ey.push(y), et.push(k0 % nT);
      for (let dk = -1; dk <= 1; dk++) {
        let k = k0 + dk, sign = 1;
        if (k < 0) (k += nT), (sign = -1);
        else if (k >= nT) (k -= nT), (sign = -1);
        const r = Math.round(sign * (x * cosT[k] + y * sinT[k])) + diag;
        acc[k * nR + r] += dk === 0 ? 1 : 0.5;
      }
    }
  const aspect = chart.strip.lengthMm / chart.strip.widthMm;
  const wMin = 3, wMax = Math.max(6, (0.9 * Math.max(w, h)) / aspect * 1.4);
  const minVotes = Math.max(8, Math.min(40, (0.1 * Math.max(w, h) * 0.35)));
  type Pair = { k: number; r1: number; r2: number; score: number };
  const pairs: Pair[] = [];
  // Votes of a line, with its neighbours on either side (a line's votes spread over ±1 px).
  const votes = (row: number, r: number) => acc[row + r] + 0.5 * (acc[row + r - 1] + acc[row + r + 1]);
  const peaks: number[] = [];
  for (let k = 0; k < nT; k++) {
    const row = k * nR;
    peaks.length = 0;
    for (let r = 1; r < nR - 1; r++) {
      const v = acc[row + r];
      if (v >= minVotes && v >= acc[row + r - 1] && v > acc[row + r + 1]) peaks.push(r);
    }
    for (let a = 0; a < peaks.length; a++)
      for (let b = a + 1; b < peaks.length; b++) {
        const d = peaks[b] - peaks[a];
        if (d < wMin) continue;
        if (d > wMax) break;
        pairs.push({ k, r1: peaks[a], r2: peaks[b], score: Math.sqrt(votes(row, peaks[a]) * votes(row, peaks[b])) });
      }
  }
  pairs.sort((a, b) => b.score - a.score);
  const out: Candidate[] = [];
  const chosen: Pair[] = [];
  const sAlong: number[] = [];
  for (const p of pairs) {
    if (out.length >= maxOut || chosen.length >= maxOut * 4) break;
    if (chosen.some((q) => Math.min(Math.abs(q.k - p.k), nT - Math.abs(q.k - p.k)) <= 3 && Math.abs(q.r1 - p.r1) <= 3 && Math.abs(q.r2 - p.r2) <= 3)) continue;
    chosen.push(p);
    // Extent: where edge pixels of either line lie along the lines.
    const c = cosT[p.k], sn = sinT[p.k];
    sAlong.length = 0;
    let n1 = 0, n2 = 0;
    for (let j = 0; j < ex.length; j++) {
      const dk = Math.abs(et[j] - p.k);
      if (Math.min(dk, nT - dk) > 2) continue;
      const r = ex[j] * c + ey[j] * sn + diag;
      const on1 = Math.abs(r - p.r1) <= 1.5, on2 = Math.abs(r - p.r2) <= 1.5;
      if (!on1 && !on2) continue;
      if (on1) n1++;
      else n2++;
      sAlong.push(-ex[j] * sn + ey[j] * c);
    }
    if (n1 < 5 || n2 < 5) continue;
    sAlong.sort((a, b) => a - b);
    // Longest run of edge pixels with no gap longer than two strip widths.
    const gap = Math.max(4, 2 * (p.r2 - p.r1));
    let bestA = 0, bestB = 0, a0 = 0;
    for (let j = 1; j <= sAlong.length; j++) {
      if (j === sAlong.length || sAlong[j] - sAlong[j - 1] > gap) {
        if (sAlong[j - 1] - sAlong[a0] > sAlong[bestB] - sAlong[bestA]) (bestA = a0), (bestB = j - 1);
        a0 = j;
      }
    }
    const s0 = sAlong[bestA], s1 = sAlong[bestB];
    const width = p.r2 - p.r1, length = s1 - s0;
    if (length < 2.5 * width) continue;
    const rm = (p.r1 + p.r2) / 2 - diag, sm = (s0 + s1) / 2;
    // A strip is a bright plastic band: along most of its length its inside is not clearly darker
    // than the surface on both sides. A grout line, a seam or a shadow's dark band is.
    const Lat = (r: number, sa: number) => {
      const x = Math.round(r * c - sa * sn), y = Math.round(r * sn + sa * c);
      return x >= 0 && y >= 0 && x < w && y < h ? L[y * w + x] : NaN;
    };
    const dOut = width / 2 + Math.max(2, width / 2);
    const contrast: number[] = [];
    for (let k = 0; k <= 24; k++) {
      const sa = s0 + ((s1 - s0) * k) / 24;
      const inside = Lat(rm, sa), o1 = Lat(rm - dOut, sa), o2 = Lat(rm + dOut, sa);
      if (Number.isNaN(inside)) continue;
      const outs = [o1, o2].filter((v) => !Number.isNaN(v));
      if (outs.length) contrast.push(inside - Math.max(...outs));
    }
    if (contrast.length >= 5 && median(contrast) < -0.15) continue;
    out.push({ cx: rm * c - sm * sn, cy: rm * sn + sm * c, angle: Math.atan2(c, -sn), length, width, score: p.score, n: length * width });
  }
  return out;
}

// ---------------------------------------------------------------- working-image sampling

function bilinear(img: RgbImage, x: number, y: number, out: Float32Array, o: number): boolean {
  const W = img.width, H = img.height, data = img.data;
  x -= 0.5;
  y -= 0.5;
  if (x < 0 || y < 0 || x > W - 1.001 || y > H - 1.001) return false;
  const x0 = Math.floor(x), y0 = Math.floor(y);
  const fx = x - x0, fy = y - y0;
  const i00 = (y0 * W + x0) * 3, i01 = i00 + 3, i10 = i00 + W * 3, i11 = i10 + 3;
  const w00 = (1 - fx) * (1 - fy), w01 = fx * (1 - fy), w10 = (1 - fx) * fy, w11 = fx * fy;
  for (let c = 0; c < 3; c++) out[o + c] = data[i00 + c] * w00 + data[i01 + c] * w01 + data[i10 + c] * w10 + data[i11 + c] * w11;
  return true;
}

const tmp = new Float32Array(3);
function whitenessAt(img: RgbImage, x: number, y: number): number {
  if (!bilinear(img, x, y, tmp, 0)) return NaN;
  const r = tmp[0], g = tmp[1], b = tmp[2];
  const mx = Math.max(r, g, b), mn = Math.min(r, g, b);
  return (0.2126 * r + 0.7152 * g + 0.0722 * b - 0.6 * (mx - mn)) / 255;
}

function median(a: number[]): number {
  if (!a.length) return NaN;
  const s = [...a].sort((x, y) => x - y);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

type Axis = { cx: number; cy: number; ux: number; uy: number; width: number; length: number };

/** Locates both long edges on cross-sections and fits the axis line through their mid points. */
function refineAxis(img: RgbImage, a: Axis): Axis {
  const K = 15;
  const ts: number[] = [], mids: number[] = [], widths: number[] = [];
  const vx = -a.uy, vy = a.ux;
  const range = Math.max(4, a.width * 1.6);
  const ds = Math.max(0.5, a.width / 40);
  const ns = Math.floor((2 * range) / ds) + 1;
  const prof = new Float64Array(ns);
  for (let k = 0; k < K; k++) {
    const t = (-0.4 + (0.8 * k) / (K - 1)) * a.length;
    let valid = true;
    for (let i = 0; i < ns; i++) {
      const s = -range + i * ds;
      let sum = 0;
      for (let j = -1; j <= 1; j += 2) {
        const tt = t + j * Math.max(1, a.width * 0.15);
        const val = whitenessAt(img, a.cx + tt * a.ux + s * vx, a.cy + tt * a.uy + s * vy);
        if (Number.isNaN(val)) valid = false;
        sum += val;
      }
      prof[i] = sum / 2;
    }
    if (!valid) continue;
    // derivative over ±1 px
    const g = (i: number) => (i >= 2 && i < ns - 2 ? prof[i + 2] - prof[i - 2] : 0);
    let il = -1, ir = -1, gl = 0, gr = 0;
    const mid = (ns - 1) / 2;
    for (let i = 2; i < ns - 2; i++) {
      const d = g(i);
      if (i <= mid + a.width * 0.25 / ds && d > gl) (gl = d), (il = i);
      if (i >= mid - a.width * 0.25 / ds && -d > gr) (gr = -d), (ir = i);
    }
    if (il < 0 || ir < 0 || ir <= il) continue;
    const sub = (i: number, sign: number) => {
      const y0 = sign * g(i - 1), y1 = sign * g(i), y2 = sign * g(i + 1);
      const den = y0 - 2 * y1 + y2;
      return i + (Math.abs(den) > 1e-12 ? (0.5 * (y0 - y2)) / den : 0);
    };
    const sl = -range + sub(il, 1) * ds, sr = -range + sub(ir, -1) * ds;
    const wdt = sr - sl;
    if (wdt < a.width * 0.4 || wdt > a.width * 2.2) continue;
    ts.push(t), mids.push((sl + sr) / 2), widths.push(wdt);
  }
  if (ts.length < 5) return a;
  // Both edges are straight and parallel: one slope q, two offsets (left pL, right pR), fitted
  // robustly. An edge that barely shows (a pale strip on a pale, textured surface) scatters; it is
  // weighted by its scatter, and the axis is then placed from the clear edge and the width.
  const ls = mids.map((m, i) => m - widths[i] / 2), rs = mids.map((m, i) => m + widths[i] / 2);
  let keepL = ts.map(() => true), keepR = ts.map(() => true);
  let q = 0, pL = 0, pR = 0, madL = 1, madR = 1;
  for (let it = 0; it < 4; it++) {
    const wL = 1 / Math.max(0.25, madL * madL), wR = 1 / Math.max(0.25, madR * madR);
    let nL = 0, tL = 0, sL = 0, nR = 0, tR = 0, sR = 0;
    for (let i = 0; i < ts.length; i++) {
      if (keepL[i]) nL++, (tL += ts[i]), (sL += ls[i]);
      if (keepR[i]) nR++, (tR += ts[i]), (sR += rs[i]);
    }
    if (nL < 3 || nR < 3) break;
    (tL /= nL), (sL /= nL), (tR /= nR), (sR /= nR);
    let num = 0, den = 0;
    for (let i = 0; i < ts.length; i++) {
      if (keepL[i]) (num += wL * (ts[i] - tL) * (ls[i] - sL)), (den += wL * (ts[i] - tL) ** 2);
      if (keepR[i]) (num += wR * (ts[i] - tR) * (rs[i] - sR)), (den += wR * (ts[i] - tR) ** 2);
    }
    q = den > 1e-9 ? num / den : 0;
    (pL = sL - q * tL), (pR = sR - q * tR);
    const resL = ts.map((t, i) => Math.abs(ls[i] - pL - q * t)), resR = ts.map((t, i) => Math.abs(rs[i] - pR - q * t));
    madL = Math.max(0.5, median(resL.filter((_, i) => keepL[i])));
    madR = Math.max(0.5, median(resR.filter((_, i) => keepR[i])));
    keepL = resL.map((r) => r <= Math.max(1, 3 * madL));
    keepR = resR.map((r) => r <= Math.max(1, 3 * madR));
  }
  const both = widths.filter((_, i) => keepL[i] && keepR[i]);
  let width = pR - pL;
  if (!(width > a.width * 0.4 && width < a.width * 2.2)) width = median(both.length >= 3 ? both : widths);
  let p = (pL + pR) / 2;
  // One edge far more scattered than the other: the clear edge and the width place the axis.
  if (madL > 2.5 * madR && madL > 1.5) {
    width = median(both.length >= 3 ? both : widths);
    p = pR - width / 2;
  } else if (madR > 2.5 * madL && madR > 1.5) {
    width = median(both.length >= 3 ? both : widths);
    p = pL + width / 2;
  }
  const nx = a.ux + q * vx, ny = a.uy + q * vy;
  const nn = Math.hypot(nx, ny);
  return { cx: a.cx + p * vx, cy: a.cy + p * vy, ux: nx / nn, uy: ny / nn, width, length: a.length };
}

// ---------------------------------------------------------------- along-axis profile

type Profile = { t0: number; n: number; inner: Float32Array; presence: Float32Array; edge: Float32Array; valid: Uint8Array; surface: Float32Array };

function alongProfile(img: RgbImage, a: Axis, tMin: number, tMax: number): Profile {
  const n = Math.max(1, Math.floor(tMax - tMin) + 1);
  const inner = new Float32Array(n * 3), presence = new Float32Array(n), edges = new Float32Array(n), valid = new Uint8Array(n);
  // Brightness of the surface beside the strip (the brighter side; grout or a dark line on one side is skipped).
  const surface = new Float32Array(n);
  const vx = -a.uy, vy = a.ux;
  const w = a.width;
  const inS = [-0.3, -0.15, 0, 0.15, 0.3].map((k) => k * w);
  const g1 = 0.5 * w + Math.max(2, 0.35 * w), g2 = 0.5 * w + Math.max(4, 0.7 * w);
  const outS = [g1, g2];
  // A fixed, short reach (work pixels): a soft shadow edge has little contrast over it.
  const eD = Math.min(2, 0.1 * w), eIn = 0.5 * w - eD, eOut = 0.5 * w + eD;
  const px = new Float32Array(3);
  for (let i = 0; i < n; i++) {
    const t = tMin + i;
    const bx = a.cx + t * a.ux, by = a.cy + t * a.uy;
    let r = 0, g = 0, b = 0, ok = true;
    for (const s of inS) {
      if (!bilinear(img, bx + s * vx, by + s * vy, px, 0)) {
        ok = false;
        break;
      }
      (r += px[0]), (g += px[1]), (b += px[2]);
    }
    if (!ok) continue;
    r /= inS.length, g /= inS.length, b /= inS.length;
    inner[i * 3] = r, (inner[i * 3 + 1] = g), (inner[i * 3 + 2] = b);
    let best = Infinity, any = false;
    for (const side of [-1, 1]) {
      let or = 0, og = 0, ob = 0, m = 0;
      for (const s of outS) if (bilinear(img, bx + side * s * vx, by + side * s * vy, px, 0)) (or += px[0]), (og += px[1]), (ob += px[2]), m++;
      if (!m) continue;
      any = true;
      const sl = (or + og + ob) / (3 * m);
      if (sl > surface[i]) surface[i] = sl;
      const d = Math.hypot(r - or / m, g - og / m, b - ob / m);
      if (d < best) best = d;
    }
    if (!any) continue;
    // Edge contrast just inside against just outside both long edges: the strip's edges are
    // sharp and straight, so this holds where the strip's colour is close to the surface's.
    let edge = 0, ne = 0;
    for (const side of [-1, 1]) {
      if (!bilinear(img, bx + side * eIn * vx, by + side * eIn * vy, px, 0)) continue;
      const ir = px[0], ig = px[1], ib = px[2];
      if (!bilinear(img, bx + side * eOut * vx, by + side * eOut * vy, px, 0)) continue;
      edge += Math.hypot(ir - px[0], ig - px[1], ib - px[2]);
      ne++;
    }
    edges[i] = ne ? edge / ne : 0;
    presence[i] = Math.max(best, edges[i]);
    valid[i] = 1;
  }
  // light smoothing of presence
  const k = Math.max(1, Math.round(w * 0.08));
  const smooth = (src: Float32Array) => {
    const sm = new Float32Array(n);
    for (let i = 0; i < n; i++) {
      let s = 0, c = 0;
      for (let j = Math.max(0, i - k); j <= Math.min(n - 1, i + k); j++) if (valid[j]) (s += src[j]), c++;
      sm[i] = c ? s / c : 0;
    }
    return sm;
  };
  return { t0: tMin, n, inner, presence: smooth(presence), edge: smooth(edges), valid, surface };
}

// ---------------------------------------------------------------- layout fit

type Layout = { pads: Interval[]; gaps: Interval[] }; // in mm from the tip

function chartLayout(chart: StripChart): Layout {
  const order = chart.pads.map((p, i) => ({ p, i })).sort((a, b) => a.p.centerMm - b.p.centerMm);
  const pads: Interval[] = chart.pads.map((p) => [p.centerMm - p.sizeMm / 2, p.centerMm + p.sizeMm / 2]);
  const gaps: Interval[] = [];
  let prev = 0;
  for (const { i } of order) {
    const [s] = pads[i];
    if (s - prev >= 0.6) gaps.push([prev, s]);
    prev = pads[i][1];
  }
  gaps.push([prev, Math.min(chart.strip.lengthMm, prev + 4)]);
  return { pads, gaps };
}

/**
 * Trust in a placement from how far its pads' colours lie from their swatch paths: pads of a real
 * strip lie near their paths; a pattern of grout, grain or shadow placed as pads lies far off.
 */
function colourTrust(cost: number): number {
  return cost <= 8 ? 1 : Math.max(0.1, 1 - (cost - 8) / 10);
}

/** A placement whose pads stand out from the bare plastic beats one whose gaps look as coloured as its pads, whatever their scores. */
function better(g: StripGeometry, best: StripGeometry | null): boolean {
  if (!best) return true;
  if (g.convincing !== best.convincing) return g.convincing;
  return g.rank > best.rank;
}

/** Where diagnostics go during one locateStrip call (the caller's trace option). */
let activeTrace: ((line: string) => void) | undefined;
function debug(...parts: unknown[]) {
  activeTrace?.(parts.map((p) => (typeof p === "string" ? p : JSON.stringify(p))).join(" "));
}

export function locateStrip(img: RgbImage, chart: StripChart, trace?: (line: string) => void): StripGeometry {
  activeTrace = trace;
  try {
    return locate(img, chart);
  } finally {
    activeTrace = undefined;
  }
}

/**
 * The photo must show the strip at a readable size: a placement whose whole strip would span
 * less than this share of the photo's long side is a pattern in the surface, not the strip
 * (the capture screen asks for the strip to fill most of the frame).
 */
export const MIN_STRIP_SHARE = 0.2;

function locate(img: RgbImage, chart: StripChart): StripGeometry {
  const minPxPerMm = (MIN_STRIP_SHARE * Math.max(img.width, img.height)) / chart.strip.lengthMm;
  const fitBoth = (img: RgbImage, chart: StripChart, layout: Layout, padEndMm: number, axis0: Axis) => {
    const g = fitBothAnySize(img, chart, layout, padEndMm, axis0);
    if (g && g.pxPerMm < minPxPerMm) {
      if (activeTrace) debug("too small", JSON.stringify({ c: g.centre.map(Math.round), s: +g.pxPerMm.toFixed(2) }));
      return null;
    }
    return g;
  };
  const search = makeSearch(img);
  const layout = chartLayout(chart);
  const padEndMm = Math.max(...layout.pads.map((p) => p[1]));
  let best: StripGeometry | null = null;
  const tried: Candidate[] = [];
  // First the wide background scale; the narrow one only if no convincing strip was found.
  for (const divs of [[16], [40]]) {
    const cands = findCandidates(search, chart, divs);
    let n = 0;
    for (const c of cands) {
      if (n >= 5) break;
      if (tried.some((o) => Math.hypot(o.cx - c.cx, o.cy - c.cy) < o.width * 2 && Math.abs(Math.sin(o.angle - c.angle)) < 0.1)) continue;
      tried.push(c);
      n++;
      const f = search.f;
      const axis0: Axis = {
        cx: (c.cx + 0.5) * f,
        cy: (c.cy + 0.5) * f,
        ux: Math.cos(c.angle),
        uy: Math.sin(c.angle),
        width: c.width * f,
        length: c.length * f,
      };
      const g = fitBoth(img, chart, layout, padEndMm, axis0);
      if (g && better(g, best)) best = g;
      // A strip of the chart's length with a clear pad pattern: no need to look further.
      if (best && best.lengthOk && best.convincing && best.rank > 15) return wholeStrip(img, chart, layout, padEndMm, best);
    }
  }
  // Strips the bright components missed (merged with a pale surface or a line beside them):
  // pairs of long parallel edges.
  if (!best || !best.lengthOk || !best.convincing) {
    for (const c of edgePairCandidates(search, chart)) {
      if (activeTrace) debug("edge pair", JSON.stringify({ cx: c.cx, cy: c.cy, a: c.angle, l: c.length, w: c.width, s: c.score }));
      const f = search.f;
      const axis0: Axis = { cx: (c.cx + 0.5) * f, cy: (c.cy + 0.5) * f, ux: Math.cos(c.angle), uy: Math.sin(c.angle), width: c.width * f, length: c.length * f };
      const g = fitBoth(img, chart, layout, padEndMm, axis0);
      if (g && better(g, best)) best = g;
      if (best && best.lengthOk && best.convincing && best.rank > 15) return wholeStrip(img, chart, layout, padEndMm, best);
    }
  }
  if (activeTrace && best) debug("chosen", JSON.stringify({ c: best.centre.map(Math.round), w: +best.widthPx.toFixed(1), s: +best.pxPerMm.toFixed(2), fit: +best.fitScore.toFixed(1), cost: +best.colourCost.toFixed(1), lengthOk: best.lengthOk, convincing: best.convincing }));
  // No candidate shows the chart's pads standing out from bare plastic between them.
  if (!best || !best.convincing) throw new ReadingError("no_strip", NO_STRIP);
  return wholeStrip(img, chart, layout, padEndMm, best);
}

/**
 * The axis was fitted over the candidate's blob, often the handle alone; a small error of its
 * angle moves the pads at the far end off the strip. Fitted again over the whole strip as placed.
 */
function wholeStrip(img: RgbImage, chart: StripChart, layout: Layout, padEndMm: number, g: StripGeometry): StripGeometry {
  const tm = (g.tipT + g.handleT) / 2, len = Math.abs(g.handleT - g.tipT);
  if (g.axisSpan >= 0.75 * len) return g;
  const axis0: Axis = { cx: g.centre[0] + tm * g.u[0], cy: g.centre[1] + tm * g.u[1], ux: g.u[0], uy: g.u[1], width: g.widthPx, length: len * 0.95 };
  const again = fitBothAnySize(img, chart, layout, padEndMm, axis0);
  if (activeTrace && again) debug("whole strip", JSON.stringify({ fit: +again.fitScore.toFixed(1), was: +g.fitScore.toFixed(1), cost: +again.colourCost.toFixed(1), wasCost: +g.colourCost.toFixed(1), convincing: again.convincing }));
  return again && again.convincing && again.fitScore >= 0.9 * g.fitScore ? again : g;
}

/**
 * Fits the chart's layout along a candidate axis. When the strip's length is not confirmed, the
 * fit is tried again with the ends taken from the strip's sharp long edges alone (a strip lying in
 * line with a grout line or a seam: colour differences run on past its ends, its edges do not).
 */
function fitBothAnySize(img: RgbImage, chart: StripChart, layout: Layout, padEndMm: number, axis0: Axis): StripGeometry | null {
  const g = fitStrip(img, chart, layout, padEndMm, axis0);
  if (g && g.lengthOk && g.convincing) return g;
  const e = fitStrip(img, chart, layout, padEndMm, axis0, true);
  // The edges' ends win only with pads fitting at least as well: a confirmed length alone does not.
  if (e && e.convincing && (!g || !g.convincing || e.fitScore >= g.fitScore)) return e;
  return g;
}

function fitStrip(img: RgbImage, chart: StripChart, layout: Layout, padEndMm: number, axis0: Axis, edgeWalk = false): StripGeometry | null {
  let axis = refineAxis(img, axis0);
  axis = refineAxis(img, axis);
  const warnings: string[] = [];
  const wpx = axis.width;
  if (!(wpx > 5)) return null;
  const scaleW = wpx / chart.strip.widthMm;
  const lexp = chart.strip.lengthMm * scaleW;
  const tMin = -(axis.length / 2 + lexp * 1.3), tMax = axis.length / 2 + lexp * 1.3;
  const prof = alongProfile(img, axis, tMin, tMax);
  const idx0 = Math.round(-prof.t0); // index of t = 0
  // Presence over the handle-like middle of the component.
  const mid: number[] = [];
  for (let t = Math.round(-axis.length * 0.4); t <= Math.round(axis.length * 0.4); t++) {
    const i = idx0 + t;
    if (i >= 0 && i < prof.n && prof.valid[i]) mid.push(prof.presence[i]);
  }
  const pHandle = median(mid);
  if (!(pHandle > 4)) return null;
  const thr = Math.max(6, Math.min(0.4 * pHandle, 30));
  const maxPad = Math.max(...chart.pads.map((p) => p.sizeMm));
  const maxGap = maxPad * scaleW * 1.3 + 2;
  const walk = (dir: 1 | -1, pres = prof.presence, thr0 = thr) => {
    let last = 0, falseRun = 0, truncated = false;
    for (let t = 0; ; t += dir) {
      const i = idx0 + t;
      if (i < 0 || i >= prof.n || !prof.valid[i]) {
        truncated = true;
        break;
      }
      if (pres[i] > thr0) (last = t), (falseRun = 0);
      else if (++falseRun > maxGap) break;
    }
    // Reaching the photo's edge after more than half a gap of surface: the strip ended before it.
    if (truncated && falseRun > maxGap / 2) truncated = false;
    return { end: last + dir * 0.5, truncated };
  };
  let wP = walk(1), wM = walk(-1);
  // Neither the colour nor the edges show the strip's ends (a pale strip on a pale surface): the
  // chart's pads are searched for anywhere along the axis, at the scale given by the width.
  let free = false;
  if (edgeWalk) {
    // A strip lying in line with a dark line (grout, a seam) or another object: the colour
    // difference runs on past its ends. Its two sharp long edges stop there; walk those instead.
    const r = (wP.end - wM.end) / chart.strip.lengthMm / scaleW;
    if (wP.truncated || wM.truncated || r > 1.18) {
      const me: number[] = [];
      for (let t = Math.round(-axis.length * 0.4); t <= Math.round(axis.length * 0.4); t++) {
        const i = idx0 + t;
        if (i >= 0 && i < prof.n && prof.valid[i]) me.push(prof.edge[i]);
      }
      const eH = median(me);
      let found = false;
      // A textured surface (weave, grain) has edges of its own: a stricter threshold next.
      for (const frac of [0.4, 0.6]) {
        if (!(eH > 4) || found) break;
        const tE = Math.max(4, frac * eH);
        const eP = walk(1, prof.edge, tE), eM = walk(-1, prof.edge, tE);
        const rE = (eP.end - eM.end) / chart.strip.lengthMm / scaleW;
        if (!eP.truncated && !eM.truncated && rE >= 0.85 && rE <= 1.18) (wP = eP), (wM = eM), (found = true);
      }
      if (!found) free = true;
    } else return null;
  }
  if (activeTrace) debug("walk", JSON.stringify({ c: [Math.round(axis.cx), Math.round(axis.cy)], a: +Math.atan2(axis.uy, axis.ux).toFixed(2), c0: [Math.round(axis0.cx), Math.round(axis0.cy)], w0: +axis0.width.toFixed(1), l0: Math.round(axis0.length) }), wP, wM, "scaleW", scaleW, "thr", thr, "pH", pHandle, "len", (wP.end - wM.end) / chart.strip.lengthMm);
  const eP = wP.end, eM = wM.end;
  const lm = eP - eM;
  let scale = lm / chart.strip.lengthMm;
  const ratio = scale / scaleW;
  let kRange = 0.05;
  let lengthOk = true;
  if (free || wP.truncated || wM.truncated || ratio < 0.85 || ratio > 1.18) {
    lengthOk = false;
    scale = scaleW;
    kRange = 0.12;
  }
  // Local light along the strip, from the surface beside it (median over about ±1 strip
  // width), so that a shadow across the strip does not look like a change of colour.
  const light = new Float32Array(prof.n);
  {
    const reach = Math.max(3, Math.round(wpx)), stepL = Math.max(1, Math.round(reach / 4));
    const win: number[] = [];
    for (let i = 0; i < prof.n; i++) {
      win.length = 0;
      for (let j = i - reach; j <= i + reach; j += stepL) if (j >= 0 && j < prof.n && prof.valid[j]) win.push(prof.surface[j]);
      light[i] = win.length ? median(win) : 0;
    }
  }
  const midLight: number[] = [];
  for (let t = Math.round(-axis.length * 0.4); t <= Math.round(axis.length * 0.4); t++) {
    const i = idx0 + t;
    if (i >= 0 && i < prof.n && prof.valid[i] && light[i] > 0) midLight.push(light[i]);
  }
  const lRef = median(midLight);
  const gain = (i: number) => (lRef > 0 && light[i] > 0 ? Math.max(0.25, Math.min(4, lRef / light[i])) : 1);
  // Bare-plastic colour: median of the inner band over the component's middle.
  const chs: number[][] = [[], [], []];
  for (let t = Math.round(-axis.length * 0.4); t <= Math.round(axis.length * 0.4); t++) {
    const i = idx0 + t;
    if (i >= 0 && i < prof.n && prof.valid[i]) for (let c = 0; c < 3; c++) chs[c].push(prof.inner[i * 3 + c] * gain(i));
  }
  const bare = chs.map(median);
  // Q: difference from bare plastic, prefix-summed.
  const Qp = new Float64Array(prof.n + 1);
  for (let i = 0; i < prof.n; i++) {
    const gi = prof.valid[i] ? gain(i) : 1;
    const q = prof.valid[i] ? Math.hypot(prof.inner[i * 3] * gi - bare[0], prof.inner[i * 3 + 1] * gi - bare[1], prof.inner[i * 3 + 2] * gi - bare[2]) : 0;
    Qp[i + 1] = Qp[i] + q;
  }
  const meanQ = (t0: number, t1: number) => {
    let a = Math.round(t0 - prof.t0), b = Math.round(t1 - prof.t0);
    if (b < a) [a, b] = [b, a];
    a = Math.max(0, a), b = Math.min(prof.n - 1, b);
    if (b < a) return 0;
    return (Qp[b + 1] - Qp[a]) / (b - a + 1);
  };
  type Fit = { score: number; tip: number; dir: 1 | -1; k: number; off: number; ps: number; gs: number; sc: number };
  let bestFit: Fit | null = null;
  const fits: Fit[] = [];
  for (const tipSide of [1, -1] as const) {
    const dir = (-tipSide) as 1 | -1; // t direction from tip to handle
    const tipEnd = tipSide === 1 ? wP : wM, handleEnd = tipSide === 1 ? wM : wP;
    const anchors: { tip: number; sc: number }[] = [];
    let offMin = -(lengthOk ? 2 : 3) * scale, offMax = -offMin, offStep = 0.5;
    if (free) {
      let v0 = -1, v1 = -1;
      for (let i = 0; i < prof.n; i++) if (prof.valid[i]) (v1 = i), v0 < 0 && (v0 = i);
      if (v0 < 0) continue;
      anchors.push({ tip: prof.t0 + (dir === 1 ? v0 : v1), sc: scale });
      (offMin = 0), (offMax = v1 - v0 - padEndMm * scale), (offStep = 1);
    } else {
      if (!tipEnd.truncated || handleEnd.truncated) anchors.push({ tip: tipEnd.end, sc: scale });
      if (!lengthOk && !handleEnd.truncated) anchors.push({ tip: handleEnd.end - dir * chart.strip.lengthMm * scale, sc: scale });
      // One end may run on past the strip (a grain line, a seam or a shadow in line with it): the
      // layout is also placed from the other end at the scale given by the width.
      if (lengthOk) {
        if (!handleEnd.truncated) anchors.push({ tip: handleEnd.end - dir * chart.strip.lengthMm * scaleW, sc: scaleW });
        if (!tipEnd.truncated) anchors.push({ tip: tipEnd.end, sc: scaleW });
      }
    }
    for (const { tip, sc } of anchors) {
    let bf: Fit | null = null;
    for (let k = 1 - kRange; k <= 1 + kRange + 1e-9; k += 0.01) {
      const s = sc * k;
      for (let off = offMin; off <= offMax; off += offStep) {
        const at = (mm: number) => tip + dir * (off + mm * s);
        let ps = 0;
        for (const [a, b] of layout.pads) {
          const m = (a + b) / 2, h = ((b - a) / 2) * 0.7;
          ps += meanQ(at(m - h), at(m + h));
        }
        ps /= layout.pads.length;
        let gs = 0;
        for (const [a, b] of layout.gaps) {
          const m = (a + b) / 2, h = Math.max(0.15, ((b - a) / 2) * 0.6);
          gs += meanQ(at(m - h), at(m + h));
        }
        gs /= layout.gaps.length;
        const score = ps - gs - (free ? 0 : Math.abs(off / scale) * 0.5) - Math.abs(k - 1) * 20;
        if (!bf || score > bf.score) bf = { score, tip, dir, k, off, ps, gs, sc };
      }
    }
    // Another anchor that lands on a placement already found adds nothing.
    if (bf && !fits.some((f) => f.dir === bf!.dir && Math.abs(f.tip + f.dir * f.off - (bf!.tip + bf!.dir * bf!.off)) < 1.5 * bf!.sc && Math.abs(f.sc * f.k - bf!.sc * bf!.k) < 0.03 * bf!.sc)) fits.push(bf);
    if (bf && (!bestFit || bf.score > bestFit.score)) bestFit = bf;
    }
  }
  if (!bestFit) return null;
  if (activeTrace) debug("fit", JSON.stringify(fits.map((f) => ({ s: +f.score.toFixed(1), ps: +f.ps.toFixed(1), gs: +f.gs.toFixed(1), d: f.dir, t: Math.round(f.tip + f.dir * f.off), k: +(f.sc * f.k).toFixed(2) }))), "lengthOk", lengthOk, "w", wpx.toFixed(1));
  const rivals = fits.filter((f) => bestFit!.score - f.score < Math.max(2, 0.15 * bestFit!.score));
  let chosenCost = 0;
  {
    // The pad pattern fits both ways round (or from either end): the placement whose colours lie
    // closer to the chart's swatches (after a white correction from the bare plastic) wins.
    const stripLin = hexToRgb(chart.strip.color).map(srgbToLinear);
    const colourCost = (f: Fit) => {
      let cost = 0;
      const sc = f.sc * f.k;
      const span = (a: number, b: number) => {
        let i0 = Math.round(f.tip + f.dir * (f.off + a * sc) - prof.t0), i1 = Math.round(f.tip + f.dir * (f.off + b * sc) - prof.t0);
        if (i1 < i0) [i0, i1] = [i1, i0];
        return [Math.max(0, i0), Math.min(prof.n - 1, i1)];
      };
      // White reference: the bare plastic in this placement's gaps.
      const gch: number[][] = [[], [], []];
      for (const [a, b] of layout.gaps) {
        const m = (a + b) / 2, h = ((b - a) / 2) * 0.6;
        const [i0, i1] = span(m - h, m + h);
        for (let i = i0; i <= i1; i++) if (prof.valid[i]) for (let ch = 0; ch < 3; ch++) gch[ch].push(prof.inner[i * 3 + ch]);
      }
      const bareLin = gch[0].length ? gch.map((a) => srgbToLinear(median(a) / 255)) : bare.map((v) => srgbToLinear(v / 255));
      const wm = whiteCorrectionMatrix(bareLin, stripLin);
      chart.pads.forEach((p, pi) => {
        const [a, b] = layout.pads[pi];
        const m = (a + b) / 2, h = ((b - a) / 2) * 0.6;
        const [i0, i1] = span(m - h, m + h);
        const c = [0, 0, 0];
        let n = 0;
        for (let i = i0; i <= i1; i++) if (prof.valid[i]) for (let ch = 0; ch < 3; ch++) (c[ch] += prof.inner[i * 3 + ch]), ch === 0 && n++;
        if (!n) return void (cost += 50);
        const lin = correctLinear(wm, c.map((v) => srgbToLinear(v / n / 255)));
        const lab = linearRgbToLab(lin[0], lin[1], lin[2]);
        let best = Infinity;
        for (let j = 0; j < p.swatches.length; j++) {
          best = Math.min(best, deltaE2000(lab, p.swatches[j].lab));
          if (j > 0) best = Math.min(best, deltaE2000(lab, lerpLab(p.swatches[j - 1].lab, p.swatches[j].lab, 0.5)));
        }
        cost += Math.min(best, 50);
      });
      return cost / chart.pads.length;
    };
    if (rivals.length >= 2) {
      const costs = rivals.map(colourCost);
      if (activeTrace) debug("placement by colour", costs.map((c) => c.toFixed(1)).join(" "));
      const order = costs.map((c, i) => i).sort((a, b) => costs[a] - costs[b]);
      const [i0, i1] = order;
      if (costs[i1] - costs[i0] > 3) bestFit = rivals[i0];
      else if (rivals[i0].dir !== rivals[i1].dir) warnings.push("The tip and the handle of the strip could not be told apart with certainty.");
      chosenCost = costs[rivals.indexOf(bestFit)] ?? colourCost(bestFit);
    } else chosenCost = colourCost(bestFit);
  }
  if (!lengthOk) warnings.push("The strip in the photo is not the length the chart describes; the pads were placed from its width.");
  const s = bestFit.sc * bestFit.k;
  const { dir, tip, off } = bestFit;
  const vx = -axis.uy, vy = axis.ux;
  const widthMm = chart.strip.widthMm;
  const pads: PadPlacement[] = chart.pads.map((p) => {
    const t = tip + dir * (off + p.centerMm * s);
    return {
      t,
      centre: [axis.cx + t * axis.ux, axis.cy + t * axis.uy],
      halfAlong: (p.sizeMm / 2) * s,
      halfAcross: (Math.min(p.sizeMm, widthMm) / 2) * (wpx / widthMm),
    };
  });
  const bareIv: Interval[] = layout.gaps.map(([a, b]) => {
    const t0 = tip + dir * (off + a * s), t1 = tip + dir * (off + b * s);
    return t0 < t1 ? [t0, t1] : [t1, t0];
  });
  bareIv.sort((x, y) => x[0] - y[0]);
  const handleT = tip + dir * (off + chart.strip.lengthMm * s);
  void padEndMm;
  void vx;
  void vy;
  return {
    centre: [axis.cx, axis.cy],
    u: [axis.ux, axis.uy],
    v: [-axis.uy, axis.ux],
    dir,
    tipT: tip + dir * off,
    handleT,
    widthPx: wpx,
    pxPerMm: s,
    pads,
    bare: bareIv,
    fitScore: bestFit.score,
    rank: bestFit.score * (lengthOk ? 1 : 0.6) * colourTrust(chosenCost),
    colourCost: chosenCost,
    axisSpan: axis.length,
    lengthOk,
    // Searched for anywhere along the axis, the best of many placements must stand out further.
    convincing: free ? bestFit.score >= Math.max(10, 2 * bestFit.gs) : bestFit.score >= Math.max(4, bestFit.gs),
    warnings,
  };
}
