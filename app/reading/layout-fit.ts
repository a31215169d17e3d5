// Fitting the chart's pad layout along the strip's axis: over offset and scale, from either end,
// both ways round. A placement scores by how much its pads differ from bare plastic against how
// much its gaps do. When several placements score alike, the one whose pads' colours lie closest
// to the chart's swatches (white-corrected from its own gaps) wins.
import type { Profile } from "./axis-profile";
import type { StripChart } from "./chart";
import { correctLinear, deltaE2000Along, hexToRgb, linearRgbToLab, srgbToLinear, whiteCorrectionMatrix } from "./colour";
import type { Interval } from "./geometry";
import type { PlasticDifference } from "./plastic-difference";
import { median } from "./stats";
import type { StripEnd } from "./strip-ends";

/** Pads and the bare gaps between them, in mm from the tip. */
export type Layout = { pads: Interval[]; gaps: Interval[] };

export function chartLayout(chart: StripChart): Layout {
  const order = chart.pads.map((p, i) => ({ p, i })).sort((a, b) => a.p.centerMm - b.p.centerMm);
  const pads: Interval[] = chart.pads.map((p) => [p.centerMm - p.sizeMm / 2, p.centerMm + p.sizeMm / 2]);
  const gaps: Interval[] = [];
  let prev = 0;
  for (const { i } of order) {
    const [s] = pads[i];
    if (s - prev >= 0.6) gaps.push([prev, s]);
    prev = pads[i][1];
  }
  gaps.push([prev, Math.min(chart.strip.lengthMm, prev + 4)]);
  return { pads, gaps };
}

/**
 * One placement: the tip at `tip + dir × offset`, `baseScale × scaleFactor` px per mm, t growing
 * from the tip to the handle when dir is +1.
 */
export type LayoutFit = {
  score: number;
  tip: number;
  dir: 1 | -1;
  scaleFactor: number;
  offset: number;
  baseScale: number;
  /** Mean difference from bare plastic over the pads' middles. */
  padScore: number;
  /** The same over the gaps' middles. */
  gapScore: number;
  /** The placement this one is a pad's pitch along from (searchLayout). */
  shiftOf?: LayoutFit;
};

export const pxPerMm = (f: LayoutFit) => f.baseScale * f.scaleFactor;
/** t of a point `mm` from the tip. */
export const tAt = (f: LayoutFit, mm: number) => f.tip + f.dir * (f.offset + mm * pxPerMm(f));

export type LayoutSearch = {
  /** The two walked ends: `plus` towards +t, `minus` towards −t. */
  plus: StripEnd;
  minus: StripEnd;
  /** px per mm: from the ends' distance when the length is confirmed, else from the width. */
  scale: number;
  /** px per mm from the strip's width. */
  scaleFromWidth: number;
  lengthOk: boolean;
  /** No end could be trusted: the layout is searched for anywhere along the profile. */
  free: boolean;
  padEndMm: number;
};

/** Scale searched either side of the base scale (share of it): with the strip's length confirmed, and from its width alone. */
export const SCALE_RANGE_LENGTH = 0.05;
export const SCALE_RANGE_WIDTH = 0.12;

/** Offsets tried per coarse offset step when refining around the coarse grid's best before the full grid. */
const FINE_STEPS = 6;

/**
 * The pads' spacing (mm, centre to centre) when they are evenly spaced (every step within 10 % of
 * the median), else 0: a shifted placement of unevenly spaced pads does not line up with them.
 */
export function padPitchMm(layout: Layout): number {
  const c = layout.pads.map(([a, b]) => (a + b) / 2).sort((x, y) => x - y);
  const steps = c.slice(1).map((x, i) => x - c[i]);
  if (steps.length < 2) return 0;
  const m = median(steps);
  return m > 0 && steps.every((d) => Math.abs(d - m) <= 0.1 * m) ? m : 0;
}

/** Every distinct best placement (one per anchor and direction), and the best of them. */
export function searchLayout(chart: StripChart, layout: Layout, profile: Profile, diff: PlasticDifference, s: LayoutSearch): { fits: LayoutFit[]; best: LayoutFit | null } {
  const { plus, minus, scale, scaleFromWidth, lengthOk, free } = s;
  const scaleRange = lengthOk ? SCALE_RANGE_LENGTH : SCALE_RANGE_WIDTH;
  const fits: LayoutFit[] = [];
  let best: LayoutFit | null = null;
  // Middles and half-lengths (mm) of the spans scored: 70 % of each pad, 60 % of each gap.
  const padMid = layout.pads.map(([a, b]) => (a + b) / 2), padHalf = layout.pads.map(([a, b]) => ((b - a) / 2) * 0.7);
  const gapMid = layout.gaps.map(([a, b]) => (a + b) / 2), gapHalf = layout.gaps.map(([a, b]) => Math.max(0.15, ((b - a) / 2) * 0.6));
  const minPadMm = Math.min(...layout.pads.map(([a, b]) => b - a));
  const pitchMm = padPitchMm(layout);
  // Both ends (mm) of every span scored: the pads' first, then the gaps'.
  const spanMm = Float64Array.from([...padMid.flatMap((m, j) => [m - padHalf[j], m + padHalf[j]]), ...gapMid.flatMap((m, j) => [m - gapHalf[j], m + gapHalf[j]])]);
  const prefix = diff.prefix, profileT0 = profile.t0, lastIndex = profile.n - 1;
  // Pads count only on the strip: past an end the walk saw (with a millimetre to spare) lies the
  // surface, and a dark surface differs from bare plastic more than any pad does. A strip whose
  // width reads wide (an overexposed white strip on a dark cloth) would otherwise be placed from
  // its handle a pad beyond its tip.
  const padLo = free || minus.truncated ? 0 : Math.round(minus.end - scale - profileT0);
  const padHi = free || plus.truncated ? lastIndex : Math.round(plus.end + scale - profileT0);
  for (const tipSide of [1, -1] as const) {
    const dir = -tipSide as 1 | -1; // t direction from tip to handle
    const tipEnd = tipSide === 1 ? plus : minus, handleEnd = tipSide === 1 ? minus : plus;
    // Each anchor: where it puts the tip at the base scale, and the point (mm from the tip) that
    // stays in place as the scale is searched. The tip, except for the handle's end when the
    // length is not confirmed: there the scale is searched widely (±12 % about the width's) and
    // held about the tip it would move a strip placed from its handle by the scale's error times
    // the whole strip's length (an end walked on past the tip, a width read a little narrow: the
    // pads a pitch off); held about the handle, the pads land where the pads' own pattern puts
    // them. Beside a confirmed length the scale searched is narrow and the tip stays the pivot,
    // except from the handle's end at the width's scale: there too the handle stays where it was
    // seen (a width read 4 % narrow would put the tip 3 mm short over a 76 mm strip, near half a
    // pitch, beyond the offsets searched).
    const anchors: { tip: number; baseScale: number; pivotMm: number }[] = [];
    const L = chart.strip.lengthMm;
    let offMin = -(lengthOk ? 2 : 3) * scale, offMax = -offMin, offStep = 0.5;
    if (free) {
      let v0 = -1, v1 = -1;
      for (let i = 0; i < profile.n; i++) if (profile.valid[i]) (v1 = i), v0 < 0 && (v0 = i);
      if (v0 < 0) continue;
      anchors.push({ tip: profile.t0 + (dir === 1 ? v0 : v1), baseScale: scale, pivotMm: 0 });
      (offMin = 0), (offMax = v1 - v0 - s.padEndMm * scale), (offStep = 1);
    } else {
      if (!tipEnd.truncated || handleEnd.truncated) anchors.push({ tip: tipEnd.end, baseScale: scale, pivotMm: 0 });
      if (!lengthOk && !handleEnd.truncated) anchors.push({ tip: handleEnd.end - dir * L * scale, baseScale: scale, pivotMm: L });
      // One end may run on past the strip (a grain line, a seam or a shadow in line with it): the
      // layout is also placed from the other end at the scale given by the width, held about it.
      if (lengthOk) {
        if (!handleEnd.truncated) anchors.push({ tip: handleEnd.end - dir * L * scaleFromWidth, baseScale: scaleFromWidth, pivotMm: L });
        if (!tipEnd.truncated) anchors.push({ tip: tipEnd.end, baseScale: scaleFromWidth, pivotMm: 0 });
      }
    }
    const nK = Math.round((2 * scaleRange) / 0.01) + 1;
    const nOff = Math.floor((offMax - offMin) / offStep + 1e-9) + 1;
    // Coarse grid first (every other scale, offsets a quarter of the smallest pad apart), then
    // the full grid around its best: a pad's score changes smoothly over a quarter of its size.
    const offStride = Math.max(1, Math.floor((0.25 * minPadMm * scale) / offStep));
    for (const { tip, baseScale, pivotMm } of anchors) {
      // The best so far: score, scale factor, offset, pad score, gap score (a typed array: the
      // search tries thousands of placements and keeps no object per improvement).
      const top = new Float64Array(5);
      let any = false;
      const consider = (k: number, off: number) => {
        // t of a point mm from the tip: tip + dir × (off + pivot × base × (1 − k) + mm × sc), so
        // that the pivot lies at tip + dir × (off + pivot × base) whatever the scale
        const t0 = tip + dir * (off + pivotMm * baseScale * (1 - k)), dt = dir * baseScale * k;
        // Each span's mean difference from bare plastic (diff.meanBetween, taken inline: no call
        // per span of each of the thousands of placements tried).
        let padScore = 0, gapScore = 0;
        for (let j = 0; j < spanMm.length; j += 2) {
          const ra = Math.round(t0 + dt * spanMm[j] - profileT0), rb = Math.round(t0 + dt * spanMm[j + 1] - profileT0);
          const a = Math.max(0, ra < rb ? ra : rb), b = Math.min(lastIndex, ra < rb ? rb : ra);
          if (j < 2 * padMid.length) {
            const pa = a > padLo ? a : padLo, pb = b < padHi ? b : padHi;
            padScore += pb < pa ? 0 : (prefix[pb + 1] - prefix[pa]) / (b - a + 1);
          } else gapScore += b < a ? 0 : (prefix[b + 1] - prefix[a]) / (b - a + 1);
        }
        padScore /= padMid.length;
        gapScore /= gapMid.length;
        const score = padScore - gapScore - (free ? 0 : Math.abs(off / scale) * 0.5) - Math.abs(k - 1) * 20;
        if (!any || score > top[0]) (any = true), (top[0] = score), (top[1] = k), (top[2] = off), (top[3] = padScore), (top[4] = gapScore);
      };
      const kAt = (ki: number) => 1 - scaleRange + 0.01 * ki, offAt = (oi: number) => offMin + offStep * oi;
      for (let ki = 0; ki < nK; ki += 2) for (let oi = 0; oi < nOff; oi += offStride) consider(kAt(ki), offAt(oi));
      // The full grid around it, in two steps when the coarse offsets lie far apart (a large
      // scale): every few offsets over the coarse step, then every offset over that.
      const refine = (kReach: number, oReach: number, oStep: number) => {
        const kBest = Math.round((top[1] - (1 - scaleRange)) / 0.01), oBest = Math.round((top[2] - offMin) / offStep);
        for (let ki = Math.max(0, kBest - kReach); ki <= Math.min(nK - 1, kBest + kReach); ki++)
          for (let oi = Math.max(0, oBest - oReach); oi <= Math.min(nOff - 1, oBest + oReach); oi += oStep) consider(kAt(ki), offAt(oi));
      };
      const midStride = Math.ceil(offStride / FINE_STEPS);
      if (any) refine(2, offStride, midStride);
      if (any && midStride > 1) refine(1, midStride, 1);
      const found: LayoutFit[] = [];
      const keep = (shiftOf?: LayoutFit) => found.push({ score: top[0], tip, dir, scaleFactor: top[1], offset: top[2] + pivotMm * baseScale * (1 - top[1]), baseScale, padScore: top[3], gapScore: top[4], ...(shiftOf ? { shiftOf } : {}) });
      if (any) keep();
      // Evenly spaced pads fit nearly as well one pad along, one of them off the strip: an end
      // walked a pad's pitch too far (grain or a shadow running on past the tip) leaves the true
      // placement outside the offsets searched (when the length is not confirmed the offsets
      // searched are wider, and a placement from the width alone is not moved by a whole pad on
      // the pattern's word: the end stays what places it). The placement a pitch further the way the best
      // leans from the end (either way when it does not) is searched too, near its own offset at
      // the same scale (a score or so of placements), and competes with it by colour
      // (strip-fit.ts): a pad moved onto a dark surface past the tip raises the score, not the
      // colours' match.
      if (any && pitchMm > 0 && lengthOk) {
        const k0 = top[1], off0 = top[2], reach = offStride * offStep;
        for (const m of off0 > 0 ? [1] : off0 < 0 ? [-1] : [-1, 1]) {
          any = false;
          const centre = off0 + m * pitchMm * baseScale * k0;
          for (let o = -reach; o <= reach; o += midStride * offStep) consider(k0, centre + o);
          const o1 = top[2];
          for (let o = -midStride; o <= midStride; o++) consider(k0, o1 + o * offStep);
          keep(found[0]);
        }
      }
      for (const f of found) {
        // Another anchor that lands on a placement already found adds nothing.
        if (!fits.some((g) => g.dir === f.dir && Math.abs(tAt(g, 0) - tAt(f, 0)) < 1.5 * f.baseScale && Math.abs(pxPerMm(g) - pxPerMm(f)) < 0.03 * f.baseScale)) fits.push(f);
        if (!best || f.score > best.score) best = f;
      }
    }
  }
  return { fits, best };
}

/**
 * Mean ΔE00 (each pad capped at 50) from a placement's pads to the nearest point of their swatch
 * lists (swatches and the midpoints between neighbours), white-corrected with the bare plastic in
 * the placement's own gaps (or `bare` when no gap is inside the photo).
 */
export function placementColourCost(chart: StripChart, layout: Layout, profile: Profile, bare: number[], f: LayoutFit): number {
  const stripLin = hexToRgb(chart.strip.color).map(srgbToLinear);
  let cost = 0;
  const span = (a: number, b: number) => {
    let i0 = Math.round(tAt(f, a) - profile.t0), i1 = Math.round(tAt(f, b) - profile.t0);
    if (i1 < i0) [i0, i1] = [i1, i0];
    return [Math.max(0, i0), Math.min(profile.n - 1, i1)];
  };
  const gapChannels: number[][] = [[], [], []];
  for (const [a, b] of layout.gaps) {
    const m = (a + b) / 2, h = ((b - a) / 2) * 0.6;
    const [i0, i1] = span(m - h, m + h);
    for (let i = i0; i <= i1; i++) if (profile.valid[i]) for (let ch = 0; ch < 3; ch++) gapChannels[ch].push(profile.inner[i * 3 + ch]);
  }
  const bareLin = gapChannels[0].length ? gapChannels.map((a) => srgbToLinear(median(a) / 255)) : bare.map((v) => srgbToLinear(v / 255));
  // Gaps with next to no light in them (the black fill beyond a turned photo's edge) are no plastic.
  if (!(bareLin[0] + bareLin[1] + bareLin[2] > 3e-3)) return 50;
  const wm = whiteCorrectionMatrix(bareLin, stripLin);
  chart.pads.forEach((p, pi) => {
    const [a, b] = layout.pads[pi];
    const m = (a + b) / 2, h = ((b - a) / 2) * 0.6;
    const [i0, i1] = span(m - h, m + h);
    const c = [0, 0, 0];
    let n = 0;
    for (let i = i0; i <= i1; i++) if (profile.valid[i]) for (let ch = 0; ch < 3; ch++) (c[ch] += profile.inner[i * 3 + ch]), ch === 0 && n++;
    if (!n) return void (cost += 50);
    const lin = correctLinear(wm, c.map((v) => srgbToLinear(v / n / 255)));
    const lab = linearRgbToLab(lin[0], lin[1], lin[2]);
    let best = Infinity;
    const along = deltaE2000Along(lab);
    for (let j = 0; j < p.swatches.length; j++) {
      best = Math.min(best, along(p.swatches[j].lab, p.swatches[j].lab, 0));
      if (j > 0) best = Math.min(best, along(p.swatches[j - 1].lab, p.swatches[j].lab, 0.5));
    }
    cost += Math.min(best, 50);
  });
  return cost / chart.pads.length;
}

/**
 * Trust in a placement from how far its pads' colours lie from their swatch paths: pads of a real
 * strip lie near their paths; a pattern of grout, grain or shadow placed as pads lies far off.
 */
export function colourTrust(cost: number): number {
  return cost <= 8 ? 1 : Math.max(0.1, 1 - (cost - 8) / 10);
}
