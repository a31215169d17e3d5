// Candidate strips from bright components: on the search copy, the whiteness against the local
// background (log ratio) is thresholded at a ladder of levels; each connected component is
// scored as a strip (or a strip's handle) from its image moments.
import type { StripChart } from "./chart";
import type { StripCandidate } from "./geometry";
import { boxMean, type SearchCopy } from "./search-copy";

let labelBuffer = new Int32Array(0);

/**
 * Connected components (4-connected) of the pixels of `values` above `threshold`, with their
 * image moments, in one pass: moments are gathered per provisional label and merged by root.
 * Each component comes back as its moment rectangle (centre, angle, length, width, pixel count).
 */
export function components(values: Float32Array, threshold: number, w: number, h: number, minArea: number): StripCandidate[] {
  if (labelBuffer.length < w * h) labelBuffer = new Int32Array(w * h);
  const labels = labelBuffer;
  let cap = 1024;
  let parent = new Int32Array(cap);
  // Per label: count, Σx, Σy, Σx², Σy², Σxy.
  let moments = new Float64Array(cap * 6);
  const find = (a: number) => {
    while (parent[a] !== a) (parent[a] = parent[parent[a]]), (a = parent[a]);
    return a;
  };
  let next = 1;
  for (let y = 0; y < h; y++) {
    const row = y * w;
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
        }
        parent[next] = next;
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
 * Candidates at one background scale (the box mean's radius is the long side / `div`), best
 * first. Thresholds: a fixed ladder of log ratios and two shares of the 99.9th percentile.
 */
export function brightCandidates(s: SearchCopy, chart: StripChart, div: number): StripCandidate[] {
  const { w, h, whiteness } = s;
  const cands: StripCandidate[] = [];
  const minArea = Math.max(12, Math.round((w * h) / 20000));
  const logRatio = new Float32Array(w * h);
  const r = Math.max(5, Math.round(Math.max(w, h) / div));
  const bg = boxMean(whiteness, w, h, r);
  const hist = new Uint32Array(512);
  for (let i = 0; i < logRatio.length; i++) {
    const v = Math.log(whiteness[i] / bg[i]);
    logRatio[i] = v;
    if (v > 0) hist[Math.min(511, (v * 200) | 0)]++;
  }
  let top = 0;
  for (let b = 511, acc = 0; b >= 0; b--) {
    acc += hist[b];
    if (acc >= logRatio.length * 0.001) {
      top = (b + 0.5) / 200;
      break;
    }
  }
  const ladder = div === 16 ? [0.04, 0.07, 0.11, 0.17, 0.26, 0.4, 0.6] : [0.03, 0.06, 0.1, 0.16, 0.25];
  const thresholds = [...ladder, top * 0.35, top * 0.55].filter((t) => t > 0.02 && t < top);
  for (const t of thresholds) {
    for (const c of components(logRatio, t, w, h, minArea)) {
      c.score = scoreCandidate(c, chart);
      if (c.score > 0) cands.push(c);
    }
  }
  cands.sort((a, b) => b.score - a.score);
  return cands;
}
