// Candidate strips from bright components: on the search copy, the whiteness against the local
// background (log ratio) is thresholded at a ladder of levels; each connected component is
// scored as a strip (or a strip's handle) from its image moments.
import type { StripChart } from "./chart";
import type { StripCandidate } from "./geometry";
import { boxMean, type SearchCopy } from "./search-copy";

/** Union-find parents and moments per provisional label, kept between calls (grown as needed). */
let parentBuffer = new Int32Array(1024);
let momentBuffer = new Float64Array(1024 * 6);
/** Labels of the previous and the current row's runs, kept between calls. */
let labelBuffer = new Int32Array(0);

/** Σ k² for k = 0 … n (0 for n < 0). */
const sumSquares = (n: number) => (n < 0 ? 0 : (n * (n + 1) * (2 * n + 1)) / 6);

/**
 * Runs of pixels above a threshold, row by row: row y's runs are runs[rowStart[y]] …
 * runs[rowStart[y + 1] − 1], each a start and an end x (inclusive) at runs[2k], runs[2k + 1].
 */
export type Runs = { h: number; rowStart: Int32Array; x: Int32Array; pixels: number };

/**
 * The runs of the pixels of `values` above `threshold`. Within the runs of a lower threshold when
 * given (a pixel above this one is above that one too, so only their pixels are looked at: the
 * levels of a ladder each cost what lies above the one below), else over every row (a row whose
 * maximum `rowMax` gives is not above the threshold is skipped). Into `into` when it is large enough.
 */
export function runsAbove(values: Float32Array, threshold: number, w: number, h: number, within?: Runs, rowMax?: Float32Array, into?: Runs): Runs {
  const rowStart = into && into.rowStart.length >= h + 1 ? into.rowStart : new Int32Array(h + 1);
  // At most ⌈w/2⌉ runs per row; within runs of a lower level, at most ⌈L/2⌉ in a run of L pixels.
  const cap = 2 * (within ? Math.ceil((within.pixels + within.rowStart[within.h]) / 2) : h * Math.ceil(w / 2));
  const x = into && into.x.length >= cap ? into.x : new Int32Array(Math.max(2, cap));
  let n = 0, pixels = 0;
  for (let y = 0; y < h; y++) {
    rowStart[y] = n;
    const row = y * w;
    // The spans looked at: the lower level's runs, else the whole row (unless its maximum is not above).
    const k0 = within ? within.rowStart[y] : 0, k1 = within ? within.rowStart[y + 1] : !rowMax || rowMax[y] > threshold ? 1 : 0;
    for (let k = k0; k < k1; k++) {
      const x1 = within ? within.x[2 * k + 1] : w - 1;
      for (let i = within ? within.x[2 * k] : 0; i <= x1; i++) {
        if (!(values[row + i] > threshold)) continue;
        const x0 = i;
        while (i < x1 && values[row + i + 1] > threshold) i++;
        (x[2 * n] = x0), (x[2 * n + 1] = i), n++, (pixels += i - x0 + 1);
      }
    }
  }
  rowStart[h] = n;
  return { h, rowStart, x, pixels };
}

/**
 * Connected components (4-connected) of the pixels of `values` above `threshold`, with their
 * image moments (see componentsOfRuns).
 */
export function components(values: Float32Array, threshold: number, w: number, h: number, minArea: number, rowMax?: Float32Array): StripCandidate[] {
  componentRuns = runsAbove(values, threshold, w, h, undefined, rowMax, componentRuns);
  return componentsOfRuns(componentRuns, minArea);
}
/** The runs components() takes, kept between calls. */
let componentRuns: Runs | undefined;

/**
 * Connected components (4-connected) of rows of runs, with their image moments, in one pass: each
 * row's runs join the runs above them that they overlap, and a run adds its moments in closed
 * form (its pixels are consecutive x at one y). Each component comes back as its moment rectangle
 * (centre, angle, length, width, pixel count), in the raster order of its first pixel.
 */
export function componentsOfRuns(runs: Runs, minArea: number): StripCandidate[] {
  const { h, rowStart, x: rx } = runs;
  let widest = 0;
  for (let y = 0; y < h; y++) widest = Math.max(widest, rowStart[y + 1] - rowStart[y]);
  if (labelBuffer.length < 2 * widest) labelBuffer = new Int32Array(2 * widest);
  // Labels of the previous row's runs and of the current row's.
  let prevLab = labelBuffer.subarray(0, widest), curLab = labelBuffer.subarray(widest, 2 * widest);
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
    const r0 = rowStart[y], r1 = rowStart[y + 1];
    // The runs above (none on the first row).
    const p0 = y > 0 ? rowStart[y - 1] : r0, nPrev = y > 0 ? r0 - p0 : 0;
    let j = 0; // the first run above that may still overlap
    for (let r = r0; r < r1; r++) {
      const x0 = rx[2 * r], x1 = rx[2 * r + 1];
      // Runs above overlapping [x0, x1]: those ending at x0 or later and starting at x1 or before.
      while (j < nPrev && rx[2 * (p0 + j) + 1] < x0) j++;
      let lab = 0;
      for (let k = j; k < nPrev && rx[2 * (p0 + k)] <= x1; k++) {
        const other = find(prevLab[k]);
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
      curLab[r - r0] = lab;
      const n = x1 - x0 + 1, sx = (n * (x0 + x1)) / 2;
      const o = lab * 6;
      moments[o] += n;
      moments[o + 1] += sx;
      moments[o + 2] += n * y;
      moments[o + 3] += sumSquares(x1) - sumSquares(x0 - 1);
      moments[o + 4] += n * y * y;
      moments[o + 5] += sx * y;
    }
    [prevLab, curLab] = [curLab, prevLab];
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
 * min-heap of the k largest seen. Once it is full, every value in it lies above the floor, so a
 * value is only compared with its smallest (a comparison that is rarely true, so well predicted,
 * where the floor splits the values about evenly).
 */
export function kthLargestAbove(values: Float32Array, floor: number, k: number): number {
  const heap = new Float64Array(k);
  let n = 0, i = 0;
  // Filling the heap: values above the floor, sifted up.
  for (; i < values.length && n < k; i++) {
    const v = values[i];
    if (!(v > floor)) continue;
    let j = n++;
    while (j > 0) {
      const p = (j - 1) >> 1;
      if (heap[p] <= v) break;
      heap[j] = heap[p];
      j = p;
    }
    heap[j] = v;
  }
  if (n < k) return NaN;
  // Full: a value above the smallest replaces it and is sifted down.
  for (; i < values.length; i++) {
    const v = values[i];
    if (!(v > heap[0])) continue;
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
  return heap[0];
}

/** The whiteness-to-background ratio, and the runs of each level of the ladder, kept between searches. */
let ratioBuffer = new Float32Array(0);
const runStore: Runs[] = [];

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
  // Each level's runs from those of the level below it (lowest first); the components are then
  // taken level by level in the ladder's order.
  const byLevel = new Map<number, Runs>();
  let below: Runs | undefined;
  [...thresholds].sort((a, b) => a - b).forEach((t, k) => {
    if (runStore.length <= k) runStore.push({ h: 0, rowStart: new Int32Array(0), x: new Int32Array(0), pixels: 0 });
    below = runStore[k] = runsAbove(ratio, Math.exp(t), w, h, below, rowMax, runStore[k]);
    byLevel.set(t, below);
  });
  for (const t of thresholds) {
    for (const c of componentsOfRuns(byLevel.get(t)!, minArea)) {
      c.score = scoreCandidate(c, chart);
      if (c.score > 0) cands.push(c);
    }
  }
  cands.sort((a, b) => b.score - a.score);
  return cands;
}
