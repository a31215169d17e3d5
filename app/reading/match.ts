// Matching a measured pad colour to a pad's printed swatches.
//
// The swatches of a pad form a colour path in CIELAB (D65). The measured colour is
// compared with every segment of that path: the point of the segment with the least
// CIEDE2000 difference is found, and the segment with the least difference wins. Its
// fractional position gives the value, linearly between the two swatch values.
import type { ChartPad } from "./chart";
import { deltaE2000, deltaE2000Along, type Lab } from "./colour";

export type SwatchMatch = {
  /** Fractional position on the swatch scale (0 = first swatch). */
  swatchIndex: number;
  value: number;
  /** CIEDE2000 from the measured colour to the nearest point of the colour path. */
  deltaE: number;
  /** Half the CIEDE2000 between the two swatches of the chosen segment. */
  halfStep: number;
  /** Least ΔE00 reached on a segment that is not next to the chosen one (Infinity if none). */
  rivalDeltaE: number;
  rivalIndex: number;
};

function bestOnSegment(dx: (p: Lab, q: Lab, t: number) => number, p: Lab, q: Lab): { t: number; d: number } {
  // Coarse scan then golden-section refinement of ΔE00 along the segment.
  const N = 16;
  let bt = 0, bd = Infinity;
  for (let k = 0; k <= N; k++) {
    const t = k / N;
    const d = dx(p, q, t);
    if (d < bd) (bd = d), (bt = t);
  }
  let lo = Math.max(0, bt - 1 / N), hi = Math.min(1, bt + 1 / N);
  const g = (Math.sqrt(5) - 1) / 2;
  let c = hi - g * (hi - lo), dd = lo + g * (hi - lo);
  let fc = dx(p, q, c), fd = dx(p, q, dd);
  for (let it = 0; it < 30; it++) {
    if (fc < fd) (hi = dd), (dd = c), (fd = fc), (c = hi - g * (hi - lo)), (fc = dx(p, q, c));
    else (lo = c), (c = dd), (fc = fd), (dd = lo + g * (hi - lo)), (fd = dx(p, q, dd));
  }
  const t = (lo + hi) / 2;
  const d = dx(p, q, t);
  return d <= bd ? { t, d } : { t: bt, d: bd };
}

/**
 * The last match made on each pad: a read matches each pad's measured colour twice (whether the
 * strip shows at all, then its reading), the same colour object against the same swatches. Kept
 * by the colour object itself, so that the next read's colours, new objects, are matched afresh
 * even when their values are the same.
 */
const lastMatch = new WeakMap<ChartPad, { swatches: ChartPad["swatches"]; x: Lab; l: number; a: number; b: number; m: SwatchMatch }>();

export function matchSwatches(pad: ChartPad, x: Lab): SwatchMatch {
  const last = lastMatch.get(pad);
  if (last && last.x === x && last.swatches === pad.swatches && last.l === x.l && last.a === x.a && last.b === x.b) return { ...last.m };
  const m = matchOnPath(pad, x);
  lastMatch.set(pad, { swatches: pad.swatches, x, l: x.l, a: x.a, b: x.b, m });
  return { ...m };
}

function matchOnPath(pad: ChartPad, x: Lab): SwatchMatch {
  const s = pad.swatches;
  const segs: { i: number; t: number; d: number }[] = [];
  const dx = deltaE2000Along(x);
  for (let i = 0; i < s.length - 1; i++) segs.push({ i, ...bestOnSegment(dx, s[i].lab, s[i + 1].lab) });
  let best = segs[0];
  for (const g of segs) if (g.d < best.d - 1e-12) best = g;
  const idx = best.i + best.t;
  const value = s[best.i].value + best.t * (s[best.i + 1].value - s[best.i].value);
  const halfStep = Math.max(0.5, deltaE2000(s[best.i].lab, s[best.i + 1].lab) / 2);
  let rivalDeltaE = Infinity, rivalIndex = -1;
  for (const g of segs) {
    const gi = g.i + g.t;
    if (Math.abs(gi - idx) > 1.5 && g.d < rivalDeltaE) (rivalDeltaE = g.d), (rivalIndex = gi);
  }
  return { swatchIndex: idx, value, deltaE: best.d, halfStep, rivalDeltaE, rivalIndex };
}
