// Candidate strips from bright components: on the search copy, the whiteness against the local
// background (log ratio) is thresholded at a ladder of levels; each connected component is
// scored as a strip (or a strip's handle) from its image moments.
import type { StripChart } from "./chart";
import type { StripCandidate } from "./geometry";
import { boxMean, type SearchCopy } from "./search-copy";

/** Union-find parents and moments per provisional label, kept between calls (grown as needed). */
let parentBuffer = new Int32Array(1024);
let momentBuffer = new Float64Array(1024 * 6);
/** Runs of the previous and the current row (start, end inclusive, label), kept between calls. */
let runBuffer = new Int32Array(0);

/** Σ k² for k = 0 … n (0 for n < 0). */
const sumSquares = (n: number) => (n < 0 ? 0 : (n * (n + 1) * (2 * n + 1)) / 6);

/**
 * Connected components (4-connected) of the pixels of `values` above `threshold`, with their
 * image moments, in one pass over runs: each row's runs of pixels above the threshold join the
 * runs above them that they overlap, and a run adds its moments in closed form (its pixels are
 * consecutive x at one y). Each component comes back as its moment rectangle (centre, angle,
 * length, width, pixel count), in the raster order of its first pixel.
 */
export function components(values: Float32Array, threshold: number, w: number, h: number, minArea: number, rowMax?: Float32Array): StripCandidate[] {
  // At most ⌈w/2⌉ runs per row; two rows of (start, end, label).
  if (runBuffer.length < 6 * (w + 1)) runBuffer = new Int32Array(6 * (w + 1));
  let prev = runBuffer.subarray(0, 3 * (w + 1)), cur = runBuffer.subarray(3 * (w + 1), 6 * (w + 1));
  let nPrev = 0;
  let cap = parentBuffer.length;
  let parent = parentBuffer;
  // Per label: count, Σx, Σy, Σx², Σy², Σxy (zeroed as each label is opened).
  let moments = momentBuffer;
  const find = (a: number) => {
    while (parent[a] !== a) (parent[a] = parent[parent[a]]), (a = parent[a]);
    return a;
  };
  let next = 1;
  for (let y = 0; y < h; y++) {
    // A row with nothing above the threshold (its maximum given) holds no run.
    if (rowMax && !(rowMax[y] > threshold)) {
      nPrev = 0;
      continue;
    }
    const row = y * w;
    let nCur = 0, j = 0; // j: the first run above that may still overlap
    for (let x = 0; x < w; x++) {
      if (!(values[row + x] > threshold)) continue;
      const x0 = x;
      while (x + 1 < w && values[row + x + 1] > threshold) x++;
      const x1 = x;
      // Runs above overlapping [x0, x1]: those ending at x0 or later and starting at x1 or before.
      while (j < nPrev && prev[3 * j + 1] < x0) j++;
      let lab = 0;
      for (let k = j; k < nPrev && prev[3 * k] <= x1; k++) {
        const other = find(prev[3 * k + 2]);
        if (!lab) lab = other;
        else if (other !== lab) {
          const root = other < lab ? other : lab;
          parent[other < lab ? lab : other] = root;
          lab = root;
        }
      }
      if (!lab) {
        if (next >= cap) {
          cap *= 2;
          const np = new Int32Array(cap);
          np.set(parent);
          parent = np;
          const nm = new Float64Array(cap * 6);
          nm.set(moments);
          moments = nm;
          (parentBuffer = parent), (momentBuffer = moments);
        }
        parent[next] = next;
        moments.fill(0, next * 6, next * 6 + 6);
        lab = next++;
      }
      cur[3 * nCur] = x0;
      cur[3 * nCur + 1] = x1;
      cur[3 * nCur + 2] = lab;
      nCur++;
      const n = x1 - x0 + 1, sx = (n * (x0 + x1)) / 2;
      const o = lab * 6;
      moments[o] += n;
      moments[o + 1] += sx;
      moments[o + 2] += n * y;
      moments[o + 3] += sumSquares(x1) - sumSquares(x0 - 1);
      moments[o + 4] += n * y * y;
      moments[o + 5] += sx * y;
    }
    [prev, cur] = [cur, prev];
    nPrev = nCur;
  }
  for (let r = next - 1; r >= 1; r--) {
    const root = find(r);
    if (root !== r) for (let k = 0; k < 6; k++) (moments[root * 6 + k] += moments[r * 6 + k]), (moments[r * 6 + k] = 0);
  }
  const out: StripCandidate[] = [];
  for (let r = 1; r < next; r++) {
    const n = moments[r * 6];
    if (n < minArea) continue;
    const cx = moments[r * 6 + 1] / n, cy = moments[r * 6 + 2] / n;
    const mxx = moments[r * 6 + 3] / n - cx * cx, myy = moments[r * 6 + 4] / n - cy * cy, mxy = moments[r * 6 + 5] / n - cx * cy;
    const tr = mxx + myy, det = mxx * myy - mxy * mxy;
    const disc = Math.sqrt(Math.max(0, (tr * tr) / 4 - det));
    const l1 = tr / 2 + disc, l2 = Math.max(1e-6, tr / 2 - disc);
    const angle = 0.5 * Math.atan2(2 * mxy, mxx - myy);
    out.push({ cx, cy, angle, length: Math.sqrt(12 * l1), width: Math.sqrt(12 * l2), score: 0, n });
  }
  return out;
}

/**
 * How much a component looks like the chart's strip (0: not at all): a filled rectangle, long
 * against its width, between a handle's length and a little more than the whole strip's.
 */
export function scoreCandidate(c: StripCandidate, chart: StripChart): number {
  const fill = c.n / (c.length * c.width);
  const elongation = c.length / c.width;
  if (c.width < 2 || elongation < 2.5 || fill < 0.6 || fill > 1.3) return 0;
  const full = chart.strip.lengthMm / chart.strip.widthMm;
  const padEnd = Math.max(...chart.pads.map((p) => p.centerMm + p.sizeMm / 2));
  const handle = Math.max(2.5, ((chart.strip.lengthMm - padEnd) / chart.strip.widthMm) * 0.6);
  let aspect = 1;
  if (elongation < handle) aspect = Math.pow(elongation / handle, 3);
  else if (elongation > full * 1.3) aspect = Math.pow((full * 1.3) / elongation, 3);
  const fillScore = Math.pow(Math.min(1, fill / 0.95), 4) * (fill > 1.1 ? 0.7 : 1);
  return Math.sqrt(c.n) * c.width * fillScore * aspect;
}

/**
 * The k-th largest of the values above `floor` (k ≥ 1), or NaN when fewer lie above it: a small
 * min-heap of the k largest seen, one comparison for most values.
 */
export function kthLargestAbove(values: Float32Array, floor: number, k: number): number {
  const heap = new Float64Array(k);
  let n = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (!(v > floor)) continue;
    if (n < k) {
      // Sift up.
      let j = n++;
      while (j > 0) {
        const p = (j - 1) >> 1;
        if (heap[p] <= v) break;
        heap[j] = heap[p];
        j = p;
      }
      heap[j] = v;
    } else if (v > heap[0]) {
      // Replace the smallest and sift down.
      let j = 0;
      for (;;) {
        const l = 2 * j + 1;
        if (l >= k) break;
        const c = l + 1 < k && heap[l + 1] < heap[l] ? l + 1 : l;
        if (heap[c] >= v) break;
        heap[j] = heap[c];
        j = c;
      }
      heap[j] = v;
    }
  }
  return n === k ? heap[0] : NaN;
}

/** The whiteness-to-background ratio, kept between searches. */
let ratioBuffer = new Float32Array(0);

/**
 * Candidates at one background scale (the box mean's radius is the long side / `div`), best
 * first. Levels of the log ratio of whiteness to background: a fixed ladder and two shares of
 * its 99.9th percentile (in steps of 1/200, the top step at most 511/200). The ratio itself is
 * compared with e^level: the same test without a logarithm per pixel.
 */
export function brightCandidates(s: SearchCopy, chart: StripChart, div: number): StripCandidate[] {
  const { w, h, whiteness } = s;
  const cands: StripCandidate[] = [];
  const minArea = Math.max(12, Math.round((w * h) / 20000));
  const r = Math.max(5, Math.round(Math.max(w, h) / div));
  if (ratioBuffer.length < w * h) ratioBuffer = new Float32Array(w * h);
  const ratio = boxMean(whiteness, w, h, r, ratioBuffer.subarray(0, w * h));
  const rowMax = new Float32Array(h);
  for (let y = 0; y < h; y++) {
    let m = 0;
    for (let i = y * w; i < (y + 1) * w; i++) {
      const v = (ratio[i] = whiteness[i] / ratio[i]);
      if (v > m) m = v;
    }
    rowMax[y] = m;
  }
  // The 99.9th percentile of the positive log ratios, as the middle of its 1/200 step.
  const kth = kthLargestAbove(ratio, 1, Math.max(1, Math.ceil(ratio.length * 0.001)));
  const top = Number.isNaN(kth) ? 0 : (Math.min(511, Math.floor(Math.log(kth) * 200)) + 0.5) / 200;
  const ladder = div === 16 ? [0.04, 0.07, 0.11, 0.17, 0.26, 0.4, 0.6] : [0.03, 0.06, 0.1, 0.16, 0.25];
  const thresholds = [...ladder, top * 0.35, top * 0.55].filter((t) => t > 0.02 && t < top);
  for (const t of thresholds) {
    for (const c of components(ratio, Math.exp(t), w, h, minArea, rowMax)) {
      c.score = scoreCandidate(c, chart);
      if (c.score > 0) cands.push(c);
    }
  }
  cands.sort((a, b) => b.score - a.score);
  return cands;
}
