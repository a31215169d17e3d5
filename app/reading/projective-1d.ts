// A one-dimensional projective map t = (a·m + b)/(c·m + d): how a straight line on a plane seen
// through a camera (a homography) maps its length m (millimetres along the strip) to positions t
// in the photo (pixels along the strip's axis). Fitted by least squares on normalised coordinates
// (zero mean, unit spread, as for the DLT), and by consensus over candidate correspondences:
// exact fits through three (or two) correspondences, scored by a truncated squared residual
// (MSAC), the best refitted on its inliers.

/** t = (a·m + b)/(c·m + d); c = 0, d = 1 for a uniform scale and offset. */
export type Map1D = { a: number; b: number; c: number; d: number };

export const applyMap = (p: Map1D, m: number) => (p.a * m + p.b) / (p.c * m + p.d);

/** dt/dm at m: the local scale (px per mm) of the map. */
export const mapSlope = (p: Map1D, m: number) => (p.a * p.d - p.b * p.c) / (p.c * m + p.d) ** 2;

/** The inverse map: m from t. */
export const invertMap = (p: Map1D): Map1D => ({ a: p.d, b: -p.b, c: -p.c, d: p.a });

/** Solves a 3×3 system by Cramer's rule; null when singular. */
function solve3(A: number[], r: number[]): number[] | null {
  const det = (M: number[]) => M[0] * (M[4] * M[8] - M[5] * M[7]) - M[1] * (M[3] * M[8] - M[5] * M[6]) + M[2] * (M[3] * M[7] - M[4] * M[6]);
  const D = det(A);
  if (!(Math.abs(D) > 1e-12)) return null;
  return [0, 1, 2].map((k) => det(A.map((v, i) => (i % 3 === k ? r[Math.floor(i / 3)] : v))) / D);
}

/** Mean and root-mean-square spread, for normalising a coordinate. */
function norm(xs: number[]): [number, number] {
  const mean = xs.reduce((s, x) => s + x, 0) / xs.length;
  const rms = Math.sqrt(xs.reduce((s, x) => s + (x - mean) ** 2, 0) / xs.length);
  return [mean, rms > 1e-9 ? rms : 1];
}

/**
 * Least-squares map through (m, t) pairs: projective with three or more pairs, or a uniform scale
 * and offset (`affine`) with two or more. Each pass minimises t·(c·m + 1) − (a·m + b) weighted by
 * 1/(c·m + 1) of the pass before, so that the residual minimised is that of t itself.
 */
export function fitMap(ms: number[], ts: number[], affine = false): Map1D | null {
  const n = ms.length;
  if (n < (affine ? 2 : 3)) return null;
  const [m0, sm] = norm(ms), [t0, st] = norm(ts);
  const x = ms.map((m) => (m - m0) / sm), y = ts.map((t) => (t - t0) / st);
  let a = 0, b = 0, c = 0;
  // Through exactly three points the fit is exact whatever the weights: one pass.
  for (let pass = 0; pass < (affine || n === 3 ? 1 : 3); pass++) {
    // Normal equations of rows [x, 1, −x·y] · [a, b, c] = y.
    const A = new Array(9).fill(0), r = [0, 0, 0];
    for (let i = 0; i < n; i++) {
      const w = 1 / Math.max(1e-6, (c * x[i] + 1) ** 2);
      const row = [x[i], 1, affine ? 0 : -x[i] * y[i]];
      for (let j = 0; j < 3; j++) {
        r[j] += w * row[j] * y[i];
        for (let k = 0; k < 3; k++) A[j * 3 + k] += w * row[j] * row[k];
      }
    }
    if (affine) A[8] = 1;
    const s = solve3(A, r);
    if (!s) return null;
    [a, b, c] = s;
  }
  // Back to millimetres and pixels: t = t0 + st·(a·x + b)/(c·x + 1) with x = (m − m0)/sm, multiplied
  // out over the denominator c·m + (sm − c·m0).
  const q: Map1D = { a: t0 * c + st * a, b: t0 * (sm - c * m0) + st * (b * sm - a * m0), c, d: sm - c * m0 };
  return Number.isFinite(q.a + q.b + q.c + q.d) && Math.abs(q.d) > 1e-12 ? scaled(q) : null;
}

/** The same map with d = 1 (when d is not zero). */
const scaled = (p: Map1D): Map1D => ({ a: p.a / p.d, b: p.b / p.d, c: p.c / p.d, d: 1 });

/** The map through exactly three points (Cramer's rule on a·m + b − c·m·t = t, no allocation). */
export function through3(ms: number[], ts: number[]): Map1D | null {
  const [m0, m1, m2] = ms, [t0, t1, t2] = ts;
  const q0 = -m0 * t0, q1 = -m1 * t1, q2 = -m2 * t2;
  // Rows [m, 1, −m·t] · [a, b, c] = t.
  const D = m0 * (q2 - q1) - (m1 * q2 - m2 * q1) + q0 * (m1 - m2);
  if (!(Math.abs(D) > 1e-9)) return null;
  const a = (t0 * (q2 - q1) - (t1 * q2 - t2 * q1) + q0 * (t1 - t2)) / D;
  const b = (m0 * (t1 * q2 - t2 * q1) - t0 * (m1 * q2 - m2 * q1) + q0 * (m1 * t2 - m2 * t1)) / D;
  const c = (m0 * (t2 - t1) - (m1 * t2 - m2 * t1) + t0 * (m1 - m2)) / D;
  return Number.isFinite(a + b + c) ? { a, b, c, d: 1 } : null;
}

/** One landmark of the model (mm) and the positions in the photo that might be it (px). */
export type Candidates = { mm: number; ts: number[] };

export type ConsensusFit = {
  map: Map1D;
  /** Landmarks matched within the tolerance, with the matched position. */
  inliers: { mm: number; t: number }[];
  /** Root-mean-square residual over the inliers (px). */
  rms: number;
};

/** Each landmark's nearest candidate under a map, when within `tol`. */
export function matchLandmarks(p: Map1D, cands: Candidates[], tol: number): { mm: number; t: number; r: number }[] {
  const out: { mm: number; t: number; r: number }[] = [];
  for (const c of cands) {
    const pred = applyMap(p, c.mm);
    let best = Infinity, bt = 0;
    for (const t of c.ts) if (Math.abs(t - pred) < best) (best = Math.abs(t - pred)), (bt = t);
    if (best <= tol) out.push({ mm: c.mm, t: bt, r: best });
  }
  return out;
}

/** Truncated squared residual of a map over all landmarks (MSAC): a landmark not matched costs tol². */
function msacCost(p: Map1D, cands: Candidates[], tol: number): number {
  let cost = 0;
  for (const c of cands) {
    const pred = applyMap(p, c.mm);
    let best = tol;
    for (const t of c.ts) best = Math.min(best, Math.abs(t - pred));
    cost += best * best;
  }
  return cost;
}

/**
 * The map agreeing with the most landmarks: every minimal set (three landmarks for a projective
 * map, two for a uniform scale), each with every choice of their candidates, up to `maxTrials`
 * drawn at random when there are more; the best by MSAC cost refitted on its inliers twice.
 * `range` (mm): maps that fold or blow up within it are rejected.
 */
export function consensusMap(cands: Candidates[], tol: number, opts: { affine?: boolean; range: [number, number]; maxTrials?: number }): ConsensusFit | null {
  const k = opts.affine ? 2 : 3;
  const usable = cands.filter((c) => c.ts.length > 0);
  if (usable.length < k) return null;
  const maxTrials = opts.maxTrials ?? 300;
  const ok = (p: Map1D | null): p is Map1D => {
    if (!p) return false;
    const [lo, hi] = opts.range;
    // The denominator keeps its sign over the range, and the map runs one way only.
    return (p.c * lo + p.d) * (p.c * hi + p.d) > 0 && mapSlope(p, lo) * mapSlope(p, hi) > 0;
  };
  const top: { map: Map1D | null; cost: number } = { map: null, cost: Infinity };
  const ms = new Array<number>(k), ts = new Array<number>(k);
  const tryIt = () => {
    const p = opts.affine ? fitMap(ms, ts, true) : through3(ms, ts);
    if (!ok(p)) return;
    const cost = msacCost(p, usable, tol);
    if (cost < top.cost) (top.cost = cost), (top.map = p);
  };
  // Every minimal set with every choice of its candidates when they are few; else as many drawn
  // at random (a fixed seed: the same photo always gives the same fit).
  const sets: number[][] = [];
  const rec = (start: number, chosen: number[]) => {
    if (chosen.length === k) return void sets.push(chosen);
    for (let i = start; i < usable.length; i++) rec(i + 1, [...chosen, i]);
  };
  rec(0, []);
  const total = sets.reduce((acc, set) => acc + set.reduce((x, i) => x * usable[i].ts.length, 1), 0);
  if (total <= maxTrials) {
    for (const set of sets) {
      const counts = set.map((i) => usable[i].ts.length);
      const n = counts.reduce((x, y) => x * y, 1);
      for (let combo = 0; combo < n; combo++) {
        let rest = combo;
        for (let j = 0; j < k; j++) (ms[j] = usable[set[j]].mm), (ts[j] = usable[set[j]].ts[rest % counts[j]]), (rest = Math.floor(rest / counts[j]));
        tryIt();
      }
    }
  } else {
    let state = 0x9e3779b9;
    const rand = (n: number) => ((state = (Math.imul(state, 1664525) + 1013904223) >>> 0), Math.floor((state / 4294967296) * n));
    for (let trial = 0; trial < maxTrials; trial++) {
      const set = sets[rand(sets.length)];
      for (let j = 0; j < k; j++) {
        const c = usable[set[j]];
        (ms[j] = c.mm), (ts[j] = c.ts[rand(c.ts.length)]);
      }
      tryIt();
    }
  }
  if (!top.map) return null;
  let map: Map1D = top.map;
  for (let it = 0; it < 2; it++) {
    const inl = matchLandmarks(map, usable, tol);
    const refit = fitMap(inl.map((x) => x.mm), inl.map((x) => x.t), opts.affine);
    if (!ok(refit)) break;
    map = refit;
  }
  const inliers = matchLandmarks(map, usable, tol);
  if (inliers.length < k) return null;
  const rms = Math.sqrt(inliers.reduce((s, x) => s + (applyMap(map, x.mm) - x.t) ** 2, 0) / inliers.length);
  return { map, inliers: inliers.map(({ mm, t }) => ({ mm, t })), rms };
}
