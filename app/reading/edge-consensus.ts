// Both long edges of a strip as the lines its cross-sections agree on. The cross-sections' colour
// steps are combined (their median) along lines of one slope: a strip's edges are straight, so
// their steps line up section after section, while a textured surface's (a weave, wood grain), a
// single section's shadow or glare and the pads' own edges do not. The slope and the two edges
// with the largest combined steps win. Steps are sizes of colour change, not signs: a strip may be
// a little lighter or a little darker than the surface, and a shadow may border one edge.

/** Cross-sections across a candidate axis: each one's position along it and its derivative. */
export type EdgeSections = {
  /** Position of each section along the axis (px). */
  ts: number[];
  /** Each section's colour step across the axis (size of the colour change, ≥ 0), one value per sample. */
  grads: Float64Array[];
  /** Spacing of the samples across the axis (px); sample i lies at −range + i × ds. */
  ds: number;
  range: number;
};

/** Both edges (left, right) as lines s = p + q × t (px across, t along). */
export type EdgeLines = { q: number; pL: number; pR: number; score: number };

/**
 * The median over the sections of their steps along lines of slope q, at every other sample
 * offset (a step spreads over several samples; the samples between are their neighbours' mean):
 * an edge counts where most sections show it (a few sections across the pads, much darker than
 * the plastic, do not outvote the plastic's faint edges).
 */
function medianAlong(sec: EdgeSections, q: number, out: Float64Array, vals: Float64Array) {
  const n = out.length, K = sec.ts.length;
  const shifts = sec.ts.map((t) => Math.round((q * t) / sec.ds));
  for (let i = 0; i < n; i += 2) {
    let m = 0;
    for (let k = 0; k < K; k++) {
      const j = i + shifts[k];
      if (j < 0 || j >= n) continue;
      const v = sec.grads[k][j];
      // Insertion into the sorted values so far.
      let s = m++;
      while (s > 0 && vals[s - 1] > v) (vals[s] = vals[s - 1]), s--;
      vals[s] = v;
    }
    out[i] = 2 * m >= K ? (m % 2 ? vals[m >> 1] : (vals[(m >> 1) - 1] + vals[m >> 1]) / 2) : 0;
  }
  for (let i = 1; i < n; i += 2) out[i] = i + 1 < n ? (out[i - 1] + out[i + 1]) / 2 : out[i - 1];
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
 * steps that move the farthest sections by `tolerance` px: the lines are found to about that, and
 * each section's own step is then looked for near them. Null when no such pair shows.
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
  for (let k = -steps; k <= steps; k++) {
    const q = k * step;
    medianAlong(sec, q, comb, vals);
    const left = peaks(comb, 0, Math.floor(mid + slack), 6), right = peaks(comb, Math.ceil(mid - slack), n - 1, 6);
    for (const il of left)
      for (const ir of right) {
        const w = (ir - il) * sec.ds;
        if (w < minWidth || w > maxWidth) continue;
        const score = comb[il] + comb[ir];
        if (!best || score > best.score) best = { q, pL: -sec.range + il * sec.ds, pR: -sec.range + ir * sec.ds, score };
      }
  }
  return best;
}
