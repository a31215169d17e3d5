// The strip's axis in the working image: both long edges located on cross-sections, and one
// slope and two offsets fitted robustly through them (the edges of a strip are straight and
// parallel). Gives the axis direction, its centre line and the strip's width in pixels.
import { whitenessAt } from "./bilinear";
import type { Axis } from "./geometry";
import type { RgbImage } from "./image";
import { median } from "./stats";

/** Locates both long edges on cross-sections and fits the axis line through their mid points. */
export function refineAxis(img: RgbImage, a: Axis): Axis {
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
