// Candidate strips from bright components: on the search copy, the whiteness against the local
// background (log ratio) is thresholded at a ladder of levels; each connected component is
// scored as a strip (or a strip's handle) from its image moments.
import type { StripChart } from "./chart";
import type { StripCandidate } from "./geometry";
import { boxMean, type SearchCopy } from "./search-copy";

let labelBuffer = new Int32Array(0);
/** Union-find parents and moments per provisional label, kept between calls (grown as needed). */
let parentBuffer = new Int32Array(1024);
let momentBuffer = new Float64Array(1024 * 6);

/**
 * Connected components (4-connected) of the pixels of `values` above `threshold`, with their
 * image moments, in one pass: moments are gathered per provisional label and merged by root.
 * Each component comes back as its moment rectangle (centre, angle, length, width, pixel count).
 */
export function components(values: Float32Array, threshold: number, w: number, h: number, minArea: number, rowMax?: Float32Array): StripCandidate[] {
  if (labelBuffer.length < w * h) labelBuffer = new Int32Array(w * h);
  const labels = labelBuffer;
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
    const row = y * w;
    // A row with nothing above the threshold (its maximum given) holds no component.
    if (rowMax && !(rowMax[y] > threshold)) {
      labels.fill(0, row, row + w);
      continue;
    }
    for (let x = 0; x < w; x++) {
      const i = row + x;
      if (!(values[i] > threshold)) {
        labels[i] = 0;
        continue;
      }
      const left = x > 0 ? labels[i - 1] : 0;
      const up = y > 0 ? labels[i - w] : 0;
      let lab: number;
      if (left && up) {
        if (left === up) lab = left;
        else {
          const a = find(left), b = find(up);
          lab = a < b ? a : b;
          if (a !== b) parent[a < b ? b : a] = lab;
        }
      } else if (left || up) lab = left || up;
      else {
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
      labels[i] = lab;
      const o = lab * 6;
      moments[o]++;
      moments[o + 1] += x;
      moments[o + 2] += y;
      moments[o + 3] += x * x;
      moments[o + 4] += y * y;
      moments[o + 5] += x * y;
    }
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
