// Matching one analyte read from several pads (a wide-range pH strip shows one pH on four pads).
//
// The pads list the same swatch values, so a position s on the swatch scale (0 = first swatch,
// fractional between swatches) names one colour on every pad: together they form the joint colour
// path. The distance of the measured colours to the point at s is
//     D(s) = sqrt( sum over pads of ΔE00(measured_p, path_p(s))² )
// so a pad that changes a lot around s weighs more there than a pad that hardly changes. The
// position with the least D wins. With one pad this is the single-pad match of match.ts.
import type { ChartPad } from "./chart";
import { deltaE2000, deltaE2000Along, lerpLab, type Lab } from "./colour";
import { matchSwatches, type SwatchMatch } from "./match";

export type JointMatch = SwatchMatch & {
  /** ΔE00 of each pad's measured colour to its own path at the chosen position. */
  padDeltaE: number[];
};

/** The segment of a pad's path holding position s (its first swatch), and s's place on it (0..1). */
function segmentAt(pad: ChartPad, s: number): { i: number; t: number } {
  const i = Math.max(0, Math.min(pad.swatches.length - 2, Math.floor(s)));
  return { i, t: Math.max(0, Math.min(1, s - i)) };
}

function pathColour(pad: ChartPad, s: number): Lab {
  const { i, t } = segmentAt(pad, s);
  return lerpLab(pad.swatches[i].lab, pad.swatches[i + 1].lab, t);
}

/** Each pad's CIEDE2000 from its measured colour to points of its path (colour.ts deltaE2000Along). */
type PathDistances = ((p: Lab, q: Lab, t: number) => number)[];

function jointDistance(pads: readonly ChartPad[], along: PathDistances, s: number): number {
  let sum = 0;
  for (let p = 0; p < pads.length; p++) {
    const sw = pads[p].swatches, { i, t } = segmentAt(pads[p], s);
    const d = along[p](sw[i].lab, sw[i + 1].lab, t);
    sum += d * d;
  }
  return Math.sqrt(sum);
}

/** Least joint distance on the segment between swatch i and i+1: coarse scan, then golden section. */
function bestOnSegment(pads: readonly ChartPad[], along: PathDistances, i: number): { s: number; d: number } {
  const N = 16;
  let bs = i, bd = Infinity;
  for (let k = 0; k <= N; k++) {
    const d = jointDistance(pads, along, i + k / N);
    if (d < bd) (bd = d), (bs = i + k / N);
  }
  let lo = Math.max(i, bs - 1 / N), hi = Math.min(i + 1, bs + 1 / N);
  const g = (Math.sqrt(5) - 1) / 2;
  let c = hi - g * (hi - lo), e = lo + g * (hi - lo);
  let fc = jointDistance(pads, along, c), fe = jointDistance(pads, along, e);
  for (let it = 0; it < 24; it++) {
    if (fc < fe) (hi = e), (e = c), (fe = fc), (c = hi - g * (hi - lo)), (fc = jointDistance(pads, along, c));
    else (lo = c), (c = e), (fc = fe), (e = lo + g * (hi - lo)), (fe = jointDistance(pads, along, e));
  }
  const s = (lo + hi) / 2, d = jointDistance(pads, along, s);
  return d <= bd ? { s, d } : { s: bs, d: bd };
}

/** Matches the measured colours of an analyte's pads (chart order) against their joint colour path. */
export function matchJoint(pads: readonly ChartPad[], measured: readonly Lab[]): JointMatch {
  if (!pads.length || pads.length !== measured.length) throw new Error("matchJoint needs one measured colour per pad");
  if (pads.length === 1) {
    const m = matchSwatches(pads[0], measured[0]);
    return { ...m, padDeltaE: [m.deltaE] };
  }
  const values = pads[0].swatches.map((s) => s.value);
  const segs: { i: number; s: number; d: number }[] = [];
  const along = measured.map(deltaE2000Along);
  for (let i = 0; i < values.length - 1; i++) segs.push({ i, ...bestOnSegment(pads, along, i) });
  let best = segs[0];
  for (const g of segs) if (g.d < best.d - 1e-12) best = g;
  const i = best.i, t = best.s - i;
  let stepSq = 0;
  for (const p of pads) stepSq += deltaE2000(p.swatches[i].lab, p.swatches[i + 1].lab) ** 2;
  let rivalDeltaE = Infinity, rivalIndex = -1;
  for (const g of segs) if (Math.abs(g.s - best.s) > 1.5 && g.d < rivalDeltaE) (rivalDeltaE = g.d), (rivalIndex = g.s);
  return {
    swatchIndex: best.s,
    value: values[i] + t * (values[i + 1] - values[i]),
    deltaE: best.d,
    halfStep: Math.max(0.5, Math.sqrt(stepSq) / 2),
    rivalDeltaE,
    rivalIndex,
    padDeltaE: pads.map((p, k) => deltaE2000(measured[k], pathColour(p, best.s))),
  };
}

/** The chart's pads grouped by analyte, in order of first appearance: [analyte, pad indices]. */
export function analyteGroups(pads: readonly { analyte: string }[]): [string, number[]][] {
  const groups = new Map<string, number[]>();
  pads.forEach((p, i) => groups.set(p.analyte, [...(groups.get(p.analyte) ?? []), i]));
  return [...groups];
}
