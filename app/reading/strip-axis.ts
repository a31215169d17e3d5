// The strip's axis in the working image: both long edges located on cross-sections, and one
// slope and two offsets fitted robustly through them (the edges of a strip are straight and
// parallel). Gives the axis direction, its centre line and the strip's width in pixels.
import { bilinear } from "./bilinear";
import type { Axis } from "./geometry";
import type { RgbImage } from "./image";
import { consensusEdges, type EdgeSections } from "./edge-consensus";
import { median } from "./stats";

const pair = new Float32Array(3);

/**
 * Size of the colour change at each sample of an RGB profile (0..1 per channel, ns samples):
 * the distance between the mean colours of the m samples before it and the m samples after it.
 */
export function colourSteps(prof: Float32Array, ns: number, m: number): Float64Array {
  const step = new Float64Array(ns);
  const cum = new Float64Array((ns + 1) * 3);
  for (let i = 0; i < ns; i++) for (let c = 0; c < 3; c++) cum[(i + 1) * 3 + c] = cum[i * 3 + c] + prof[i * 3 + c];
  for (let i = m; i + m < ns; i++) {
    let d = 0;
    for (let c = 0; c < 3; c++) {
      const before = cum[i * 3 + c] - cum[(i - m) * 3 + c], after = cum[(i + m + 1) * 3 + c] - cum[(i + 1) * 3 + c];
      d += ((after - before) / m) ** 2;
    }
    step[i] = Math.sqrt(d);
  }
  return step;
}

/**
 * How far a refinement may move from the axis it is given: the strip's width as a share of the
 * given width, and the slope of its edges against the given axis.
 */
export type AxisReach = { minWidth: number; maxWidth: number; maxSlope: number };
/** From a candidate found on the search copy: its width and angle are rough. */
export const ROUGH: AxisReach = { minWidth: 0.4, maxWidth: 2.2, maxSlope: 0.07 };
/** From an axis already refined once: its edges are close. */
export const CLOSE: AxisReach = { minWidth: 0.8, maxWidth: 1.25, maxSlope: 0.01 };

/** Locates both long edges on cross-sections and fits the axis line through their mid points. */
export function refineAxis(img: RgbImage, a: Axis, reach: AxisReach = ROUGH): Axis {
  const K = 15;
  const ts: number[] = [], mids: number[] = [], widths: number[] = [];
  const vx = -a.uy, vy = a.ux;
  const range = Math.max(4, a.width * 1.6);
  const ds = Math.max(0.5, a.width / 40);
  const ns = Math.floor((2 * range) / ds) + 1;
  const sections: EdgeSections = { ts: [], grads: [], ds, range, levels: [] };
  const prof = new Float32Array(ns * 3);
  // The colour step between the means of m samples on either side (about 4 px): a fine texture
  // (a weave) averages out, a strip's edge does not.
  const m = Math.max(2, Math.round(4 / ds));
  for (let k = 0; k < K; k++) {
    const t = (-0.4 + (0.8 * k) / (K - 1)) * a.length;
    let valid = true;
    const along = Math.max(1, a.width * 0.15);
    for (let i = 0; i < ns && valid; i++) {
      const s = -range + i * ds;
      const x = a.cx + t * a.ux + s * vx, y = a.cy + t * a.uy + s * vy;
      // Two samples a little apart along the axis, averaged.
      valid = bilinear(img, x - along * a.ux, y - along * a.uy, prof, i * 3) && bilinear(img, x + along * a.ux, y + along * a.uy, pair, 0);
      for (let c = 0; c < 3; c++) prof[i * 3 + c] = (prof[i * 3 + c] + pair[c]) / 510;
    }
    if (!valid) continue;
    const level = new Float64Array(ns);
    for (let i = 0; i < ns; i++) level[i] = (prof[i * 3] + prof[i * 3 + 1] + prof[i * 3 + 2]) / 3;
    sections.ts.push(t), sections.grads.push(colourSteps(prof, ns, m)), sections.levels!.push(level);
  }
  if (sections.ts.length < 5) return a;
  // The edges every section agrees on (a textured surface's own steps do not line up), then each
  // section's own step near them, to sub-pixel.
  const lines = consensusEdges(sections, a.width, a.width * reach.minWidth, a.width * reach.maxWidth, reach.maxSlope, Math.max(3, 0.1 * a.width));
  if (!lines) return a;
  // Close to the lines: a pad's own edge a few px inside the strip's is not taken for it.
  const near = Math.max(2.5, 0.04 * a.width, 1.5 * ds) / ds;
  sections.ts.forEach((t, k) => {
    const g = sections.grads[k];
    const strongest = (p: number) => {
      const c = (p + lines.q * t + range) / ds;
      let best = -1, bv = 0;
      for (let i = Math.max(3, Math.floor(c - near)); i <= Math.min(ns - 4, Math.ceil(c + near)); i++) if (g[i] > bv) (bv = g[i]), (best = i);
      // A step still rising at the window's end is another edge beyond it (a pad's): none here.
      return best >= 0 && g[best] >= g[best - 1] && g[best] >= g[best + 1] ? best : -1;
    };
    const il = strongest(lines.pL), ir = strongest(lines.pR);
    if (il < 0 || ir < 0 || ir <= il) return;
    const sub = (i: number) => {
      const y0 = g[i - 1], y1 = g[i], y2 = g[i + 1];
      const den = y0 - 2 * y1 + y2;
      return i + (den < -1e-12 ? Math.max(-0.5, Math.min(0.5, (0.5 * (y0 - y2)) / den)) : 0);
    };
    const sl = -range + sub(il) * ds, sr = -range + sub(ir) * ds;
    const wdt = sr - sl;
    if (wdt < a.width * reach.minWidth || wdt > a.width * reach.maxWidth) return;
    ts.push(t), mids.push((sl + sr) / 2), widths.push(wdt);
  });
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
  if (!(width > a.width * reach.minWidth && width < a.width * reach.maxWidth)) width = median(both.length >= 3 ? both : widths);
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
