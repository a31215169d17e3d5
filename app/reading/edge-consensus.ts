// Both long edges of a strip as the lines its cross-sections agree on. The cross-sections' colour
// steps are combined (their median) along lines of one slope: a strip's edges are straight, so
// their steps line up section after section, while a textured surface's (a weave, wood grain), a
// single section's shadow or glare and the pads' own edges do not. The slope and the two edges
// with the largest combined steps win. Steps are sizes of colour change, not signs: a strip may be
// a little lighter or a little darker than the surface. A dark band beside the strongest step (a
// shadow, a dark line along the strip) lies outside the strip: the step nearer the middle is its edge.

/** Cross-sections across a candidate axis: each one's position along it and its derivative. */
export type EdgeSections = {
  /** Position of each section along the axis (px). */
  ts: number[];
  /** Each section's colour step across the axis (size of the colour change, ≥ 0), one value per sample. */
  grads: Float64Array[];
  /** Spacing of the samples across the axis (px); sample i lies at −range + i × ds. */
  ds: number;
  range: number;
  /** Each section's brightness (0..1) per sample, when known: tells a shadow beside an edge. */
  levels?: Float64Array[];
};

/** Both edges (left, right) as lines s = p + q × t (px across, t along). */
export type EdgeLines = { q: number; pL: number; pR: number; score: number };

/** Each section's shift (in samples) along a line of the slope tried, kept between calls. */
let shiftBuffer = new Int32Array(0);

/**
 * The median over the sections of their steps along lines of slope q, at every `stride`-th sample
 * offset (a step spreads over several samples; for the slope search, the samples between are
 * their neighbours' mean):
 * an edge counts where most sections show it (a few sections across the pads, much darker than
 * the plastic, do not outvote the plastic's faint edges).
 */
function medianAlong(sec: EdgeSections, q: number, out: Float64Array, vals: Float64Array, stride: 1 | 2, of = sec.grads) {
  const n = out.length, K = sec.ts.length;
  if (shiftBuffer.length < K) shiftBuffer = new Int32Array(2 * K);
  const shifts = shiftBuffer;
  for (let k = 0; k < K; k++) shifts[k] = Math.round((q * sec.ts[k]) / sec.ds);
  for (let i = 0; i < n; i += stride) {
    let m = 0;
    for (let k = 0; k < K; k++) {
      const j = i + shifts[k];
      if (j < 0 || j >= n) continue;
      const v = of[k][j];
      // Insertion into the sorted values so far.
      let s = m++;
      while (s > 0 && vals[s - 1] > v) (vals[s] = vals[s - 1]), s--;
      vals[s] = v;
    }
    out[i] = 2 * m >= K ? (m % 2 ? vals[m >> 1] : (vals[(m >> 1) - 1] + vals[m >> 1]) / 2) : 0;
  }
  if (stride === 2) for (let i = 1; i < n; i += 2) out[i] = i + 1 < n ? (out[i - 1] + out[i + 1]) / 2 : out[i - 1];
}

/** Local maxima of the values (the strongest `max` of them), as sample indices. */
function peaks(values: Float64Array, from: number, to: number, max: number): number[] {
  const out: number[] = [];
  for (let i = Math.max(1, from); i <= Math.min(values.length - 2, to); i++) {
    const v = values[i];
    if (v > 0 && v >= values[i - 1] && v > values[i + 1]) out.push(i);
  }
  return out.sort((a, b) => values[b] - values[a]).slice(0, max);
}

/**
 * The slope (within ±maxSlope) and the pair of edges, one left of the middle and one right of
 * it, `minWidth`..`maxWidth` apart (px), whose combined steps are largest. Slopes are tried in
 * steps that move the farthest sections by `tolerance` px, then in quarter steps around the best:
 * the lines are found to about a quarter of it, and each section's own step is then looked for
 * close to them. Null when no such pair shows.
 */
export function consensusEdges(sec: EdgeSections, width: number, minWidth: number, maxWidth: number, maxSlope: number, tolerance: number): EdgeLines | null {
  const n = sec.grads[0]?.length ?? 0;
  if (!n || sec.ts.length < 3) return null;
  const reach = Math.max(...sec.ts.map(Math.abs)) || 1;
  const mid = (n - 1) / 2, slack = (0.25 * width) / sec.ds;
  const comb = new Float64Array(n), vals = new Float64Array(sec.ts.length);
  let best: EdgeLines | null = null;
  const step = Math.max(tolerance, sec.ds) / reach;
  const steps = Math.floor(maxSlope / step);
  const tryAt = (q: number) => {
    medianAlong(sec, q, comb, vals, 2);
    const left = peaks(comb, 0, Math.floor(mid + slack), 6), right = peaks(comb, Math.ceil(mid - slack), n - 1, 6);
    for (const il of left)
      for (const ir of right) {
        const w = (ir - il) * sec.ds;
        if (w < minWidth || w > maxWidth) continue;
        const score = comb[il] + comb[ir];
        if (!best || score > best.score) best = { q, pL: -sec.range + il * sec.ds, pR: -sec.range + ir * sec.ds, score };
      }
  };
  for (let k = -steps; k <= steps; k++) tryAt(k * step);
  // Then quarter steps around the best: the lines to about a quarter of the tolerance.
  const coarse = best as EdgeLines | null;
  if (!coarse) return null;
  for (const k of [-3, -2, -1, 1, 2, 3]) tryAt(coarse.q + (k * step) / 4);
  return innermost(sec, best!, comb, vals, mid + slack, mid - slack, minWidth);
}

/** A step at least this share of the strongest one on its side, nearer the middle, may be the strip's edge. */
const INNER_SHARE = 0.5;

/**
 * The strip's edge is the first clear step out from its middle when the band between it and the
 * strongest step is darker than both sides (a shadow or a dark line beside the strip); a band
 * lighter than the strip (its edge catching the light) belongs to the strip. On each side, the
 * step nearest the middle that is at least INNER_SHARE of the strongest one there and has such a
 * dark band outside it (the pair kept at least minWidth apart).
 */
function innermost(sec: EdgeSections, b: EdgeLines, comb: Float64Array, vals: Float64Array, leftEnd: number, rightStart: number, minWidth: number): EdgeLines {
  if (!sec.levels) return b;
  // At every sample now: a step centred between two samples keeps its height.
  medianAlong(sec, b.q, comb, vals, 1);
  const level = new Float64Array(comb.length);
  medianAlong(sec, b.q, level, vals, 1, sec.levels);
  const n = comb.length;
  const mean = (a: number, z: number) => {
    let sum = 0, c = 0;
    for (let i = Math.max(0, Math.min(a, z)); i <= Math.min(n - 1, Math.max(a, z)); i++) (sum += level[i]), c++;
    return c ? sum / c : NaN;
  };
  // The band between an inner step i and the outer step o is darker than a few samples inside i and outside o.
  const w = Math.max(1, Math.round(2 / sec.ds));
  const darkBand = (i: number, o: number, out: 1 | -1) => {
    if (Math.abs(o - i) < 2) return false;
    const band = mean(i + out, o - out), inside = mean(i - out * 3 * w, i - out * w), outside = mean(o + out * w, o + out * 3 * w);
    return band < inside && band < outside;
  };
  const at = (p: number) => Math.round((p + sec.range) / sec.ds);
  const il0 = at(b.pL), ir0 = at(b.pR);
  let il = il0, ir = ir0;
  for (const i of peaks(comb, il0 + 1, Math.floor(leftEnd), 64))
    if (i > il && comb[i] >= INNER_SHARE * comb[il0] && (ir0 - i) * sec.ds >= minWidth && darkBand(i, il0, -1)) il = i;
  for (const i of peaks(comb, Math.ceil(rightStart), ir0 - 1, 64))
    if (i < ir && comb[i] >= INNER_SHARE * comb[ir0] && (i - il) * sec.ds >= minWidth && darkBand(i, ir0, 1)) ir = i;
  return { q: b.q, pL: -sec.range + il * sec.ds, pR: -sec.range + ir * sec.ds, score: comb[il] + comb[ir] };
}
