// The strip's width and centre line from its pads. A pale strip whose long edge barely differs
// from a pale surface, with a dark line running beside it (a grout line along the strip, a tile
// gap between), reads as wide as strip, gap and line together: the line's sharp steps outvote
// the plastic's faint edge. The pads are coloured squares across the strip's whole width (or
// centred on it), so the colour steps at their sides show the strip's true width and where it
// lies across the axis, whatever the surface beside it does.
import { bilinear } from "./bilinear";
import type { StripChart } from "./chart";
import type { Axis } from "./geometry";
import type { RgbImage } from "./image";
import type { Profile } from "./axis-profile";
import type { PlasticDifference } from "./plastic-difference";
import { median } from "./stats";

/** A pad's difference from bare plastic (RGB distance, 0..255) below which it is too pale to measure. */
const MIN_PAD_DIFF = 24;
/** Pads measured at most (the clearest first; dark lines across the strip may come first). */
const MAX_PADS = 10;
/** A pad's sides lie where its colour departs from its middle's by this share of its difference from the plastic. */
const DEPART = 0.3;
/** The pads' widths agree within this share of their median; their centres within this share of it. */
const AGREE = 0.12;
/** The axis is left as it is when the pads' width lies within this share of its own, and their centre within it too. */
const SAME = 0.12;

/** One pad's sides across the axis (px from the axis, `t` along it). */
export type PadSides = { t: number; left: number; right: number };

/** Levels (shares of the largest difference) at which runs are taken: the clear pads first, then those the band only grazes. */
const RUN_LEVELS = [0.4, 0.2];

/**
 * Runs of the profile where the inner band differs clearly from bare plastic, each widened to
 * half its own peak: at 40 % of the largest difference, then at a fifth of it (a pad the band only
 * grazes, where the axis runs off the pads) where that run holds none of the first (at the lower
 * level, a pad may run together with plastic in shadow beside it).
 */
export function padRuns(diff: Pick<PlasticDifference, "prefix">, profile: Pick<Profile, "n" | "valid" | "t0">): { t0: number; t1: number; peak: number }[] {
  const n = profile.n, d = new Float32Array(n);
  // A light running mean over ±2 samples.
  for (let i = 0; i < n; i++) {
    const a = Math.max(0, i - 2), b = Math.min(n - 1, i + 2);
    d[i] = profile.valid[i] ? (diff.prefix[b + 1] - diff.prefix[a]) / (b - a + 1) : 0;
  }
  let top = 0;
  for (let i = 0; i < n; i++) if (d[i] > top) top = d[i];
  const runs: { t0: number; t1: number; peak: number }[] = [];
  for (const share of RUN_LEVELS) {
    const level = Math.max(MIN_PAD_DIFF, share * top), before = runs.length;
    for (let i = 0; i < n; i++) {
      if (!(d[i] > level)) continue;
      let j = i, peak = 0;
      while (j < n && d[j] > level) peak = Math.max(peak, d[j++]);
      let a = i, b = j - 1;
      while (a > 0 && d[a - 1] > peak / 2 && d[a - 1] <= d[a] + 1) a--;
      while (b < n - 1 && d[b + 1] > peak / 2 && d[b + 1] <= d[b] + 1) b++;
      const t0 = profile.t0 + a, t1 = profile.t0 + b;
      if (b - a >= 3 && !runs.some((r, k) => r.t0 < t1 && r.t1 > t0 && (k < before || r.peak >= peak))) runs.push({ t0, t1, peak });
      i = j;
    }
  }
  return runs.sort((x, y) => y.peak - x.peak).slice(0, MAX_PADS);
}

/**
 * One pad's sides on a cross-section (colours 0..255, 3 per sample, sample i at −range + i × ds).
 * The inner band over the pad (`mix`) may take in plastic or surface beside it: the pad's middle
 * is the sample within `reach` px of the axis that lies furthest from `bare` the way the band
 * does, on an even stretch `plateau` px either side (a narrow dark line is no pad). From there,
 * outwards while the colour stays near the middle's, each side then placed at the largest colour
 * step near where it left. Null when no such middle shows or the section ends on the pad.
 */
export function sidesOnSection(c: Float32Array, ds: number, range: number, mix: readonly number[], bare: readonly number[], reach: number, plateau: number): [number, number] | null {
  const ns = c.length / 3;
  const dist = (i: number, p: readonly number[]) => Math.hypot(c[i * 3] - p[0], c[i * 3 + 1] - p[1], c[i * 3 + 2] - p[2]);
  const dir = [mix[0] - bare[0], mix[1] - bare[1], mix[2] - bare[2]];
  const mixOff = Math.hypot(dir[0], dir[1], dir[2]);
  if (mixOff < MIN_PAD_DIFF) return null;
  const h = Math.max(1, Math.round(plateau / ds));
  const even = (i: number, limit: number) => {
    for (let j = i - h; j <= i + h; j++) if (j < 0 || j >= ns || dist(j, [c[i * 3], c[i * 3 + 1], c[i * 3 + 2]]) > limit) return false;
    return true;
  };
  let s0 = -1, best = 0;
  for (let i = 0; i < ns; i++) {
    if (Math.abs(-range + i * ds) > reach) continue;
    const proj = ((c[i * 3] - bare[0]) * dir[0] + (c[i * 3 + 1] - bare[1]) * dir[1] + (c[i * 3 + 2] - bare[2]) * dir[2]) / mixOff;
    if (proj < mixOff || proj <= best) continue;
    if (even(i, Math.max(10, DEPART * dist(i, bare)))) (best = proj), (s0 = i);
  }
  if (s0 < 0) return null;
  const mid = [c[s0 * 3], c[s0 * 3 + 1], c[s0 * 3 + 2]];
  const limit = Math.max(10, DEPART * dist(s0, bare));
  const w = Math.max(1, Math.round(3 / ds)), g = Math.max(1, Math.round(1 / ds));
  const side = (dir: 1 | -1): number | null => {
    let i = s0;
    while (i >= 0 && i < ns && dist(i, mid) <= limit) i += dir;
    if (i < 0 || i >= ns) return null;
    // The largest step (colour change over about two pixels) within ±3 px of the departure.
    let at = -1, big = -1;
    for (let j = i - w; j <= i + w; j++) {
      if (j - g < 0 || j + g >= ns) continue;
      const v = Math.hypot(c[(j + g) * 3] - c[(j - g) * 3], c[(j + g) * 3 + 1] - c[(j - g) * 3 + 1], c[(j + g) * 3 + 2] - c[(j - g) * 3 + 2]);
      if (v > big) (big = v), (at = j);
    }
    if (at < 0) return null;
    // The pad stands out from what lies beside it (plastic, the surface, a line), not only from
    // the plastic's colour elsewhere (plastic in a shadow is no pad).
    const o = Math.min(ns - 1, Math.max(0, at + dir * w));
    return dist(o, mid) >= Math.max(MIN_PAD_DIFF, 0.4 * dist(s0, bare)) ? -range + at * ds : null;
  };
  const l = side(-1), r = side(1);
  return l === null || r === null || r <= l ? null : [l, r];
}

const px = new Float32Array(3);

/** The sides of the clearest pads along the axis (their colour steps across it, the median over a few sections through each pad). */
export function padSides(img: RgbImage, axis: Axis, profile: Profile, diff: PlasticDifference, alongOverAcross: number): PadSides[] {
  const out: PadSides[] = [];
  const vx = -axis.uy, vy = axis.ux;
  const range = 1.2 * axis.width + 4, ds = Math.max(0.5, axis.width / 80);
  const ns = Math.floor((2 * range) / ds) + 1;
  const K = 5;
  const sec = new Float32Array(K * ns * 3), c = new Float32Array(ns * 3), vals = new Float32Array(K);
  for (const run of padRuns(diff, profile)) {
    const len = run.t1 - run.t0 + 1, tc = (run.t0 + run.t1) / 2;
    // The inner band's colour over the run's middle.
    const colour = [0, 0, 0];
    let m = 0;
    for (let t = Math.round(tc - 0.2 * len); t <= Math.round(tc + 0.2 * len); t++) {
      const i = Math.round(t - profile.t0);
      if (i >= 0 && i < profile.n && profile.valid[i]) for (let k = 0; k < 3; k++) (colour[k] += profile.inner[i * 3 + k]), k === 0 && m++;
    }
    if (!m) continue;
    for (let k = 0; k < 3; k++) colour[k] /= m;
    // K sections over the run's middle, their median per sample and channel (glare on part of
    // the pad, noise).
    let ok = true;
    for (let k = 0; k < K && ok; k++) {
      const t = tc + (k / (K - 1) - 0.5) * 0.6 * len;
      for (let i = 0; i < ns && ok; i++) {
        const s = -range + i * ds;
        ok = bilinear(img, axis.cx + t * axis.ux + s * vx, axis.cy + t * axis.uy + s * vy, px, 0);
        sec.set(px, (k * ns + i) * 3);
      }
    }
    if (!ok) continue;
    for (let i = 0; i < ns * 3; i++) {
      for (let k = 0; k < K; k++) vals[k] = sec[k * ns * 3 + i];
      vals.sort();
      c[i] = vals[K >> 1];
    }
    const sides = sidesOnSection(c, ds, range, colour, diff.bare, 0.6 * axis.width, 0.15 * axis.width);
    if (!sides) continue;
    // A run far shorter than the pad is wide is a line across the strip, not a pad (a pad split
    // by a glare spot still leaves runs a good share of its length; pads run together, longer ones).
    if (len < 0.25 * (sides[1] - sides[0]) * alongOverAcross) continue;
    out.push({ t: tc, left: sides[0], right: sides[1] });
  }
  return out;
}

/**
 * The axis moved across and its width set from the pads' sides, when at least two clear pads
 * agree on them and they differ from the axis's own (null otherwise: the axis stands).
 */
export function axisFromPads(img: RgbImage, chart: StripChart, axis: Axis, profile: Profile, diff: PlasticDifference): Axis | null {
  const acrossMm = median(chart.pads.map((p) => Math.min(p.sizeMm, chart.strip.widthMm)));
  const alongMm = median(chart.pads.map((p) => p.sizeMm));
  const pads = padSides(img, axis, profile, diff, alongMm / acrossMm);
  return axisFromSides(axis, pads, chart.strip.widthMm / acrossMm);
}

/** The axis the pads' sides give (`stripOverPad`: the strip's width over a pad's width), or null (see axisFromPads). */
export function axisFromSides(axis: Axis, pads: PadSides[], stripOverPad: number): Axis | null {
  if (pads.length < 2) return null;
  const widths = pads.map((p) => p.right - p.left), centres = pads.map((p) => (p.left + p.right) / 2);
  const w = median(widths), c = median(centres);
  const agree = pads.filter((_, i) => Math.abs(widths[i] - w) <= AGREE * w && Math.abs(centres[i] - c) <= AGREE * w + 0.1 * Math.abs(pads[i].t - pads[0].t));
  if (agree.length < 2) return null;
  const width = median(agree.map((p) => p.right - p.left)) * stripOverPad;
  // The line through the pads' centres when they lie far enough apart along the axis to give its
  // slope (the axis may run a few degrees off the strip: its edges taken from lines beside it).
  const ts = agree.map((p) => p.t), cs = agree.map((p) => (p.left + p.right) / 2);
  const tm = ts.reduce((a, b) => a + b, 0) / ts.length, cm = cs.reduce((a, b) => a + b, 0) / cs.length;
  let q = 0;
  if (Math.max(...ts) - Math.min(...ts) >= w) {
    let num = 0, den = 0;
    for (let i = 0; i < ts.length; i++) (num += (ts[i] - tm) * (cs[i] - cm)), (den += (ts[i] - tm) ** 2);
    q = num / den;
  }
  const off = q ? cm - q * tm : median(cs);
  if (Math.abs(width / axis.width - 1) <= SAME && Math.abs(off) <= SAME * width && Math.abs(q) < 0.01) return null;
  const vx = -axis.uy, vy = axis.ux;
  const ux = axis.ux + q * vx, uy = axis.uy + q * vy, n = Math.hypot(ux, uy);
  return { ...axis, cx: axis.cx + off * vx, cy: axis.cy + off * vy, ux: ux / n, uy: uy / n, width };
}
