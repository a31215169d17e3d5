// The strip's two ends along its axis: walked outwards from the middle on a profile while it
// stays above a threshold, bridging gaps up to a pad's length (a pad as pale as the surface).
import type { Profile } from "./axis-profile";
import { median } from "./stats";

export type StripEnd = {
  /** t of the end (working-image px from the axis centre). */
  end: number;
  /** The walk reached the photo's edge: the strip may go on beyond it. */
  truncated: boolean;
};

/** Values of a per-index profile over the middle 80 % of the axis span, where the profile is valid. */
export function middleValues(profile: Profile, values: Float32Array, axisLength: number): number[] {
  const idx0 = Math.round(-profile.t0);
  const out: number[] = [];
  for (let t = Math.round(-axisLength * 0.4); t <= Math.round(axisLength * 0.4); t++) {
    const i = idx0 + t;
    if (i >= 0 && i < profile.n && profile.valid[i]) out.push(values[i]);
  }
  return out;
}

/**
 * Walks from t = 0 in direction `dir` while `values` stays above `threshold`, bridging runs
 * below it of at most `maxGap` px.
 */
export function walkEnd(profile: Profile, values: Float32Array, threshold: number, maxGap: number, dir: 1 | -1): StripEnd {
  const idx0 = Math.round(-profile.t0);
  const w = walk(profile, values, threshold, maxGap, dir, idx0);
  // Reaching the photo's edge after more than half a gap of surface: the strip ended before it.
  return { end: w.last - idx0 + dir * 0.5, truncated: w.edge && !(w.belowRun > maxGap / 2) };
}

/**
 * Walks the profile from index `i0` in direction `dir` while `values` stays above `threshold`,
 * bridging runs below it of at most `maxGap` px: the last index above it (i0 when none), the run
 * below it where the walk stopped, and whether it stopped at the photo's edge (an invalid sample).
 */
function walk(profile: Profile, values: Float32Array, threshold: number, maxGap: number, dir: 1 | -1, i0: number) {
  let last = i0, belowRun = 0;
  for (let i = i0; ; i += dir) {
    if (i < 0 || i >= profile.n || !profile.valid[i]) return { last, belowRun, edge: true };
    if (values[i] > threshold) (last = i), (belowRun = 0);
    else if (++belowRun > maxGap) return { last, belowRun, edge: false };
  }
}

/**
 * Ends from the strip's sharp long edges alone: for a strip lying in line with a dark line
 * (grout, a seam) or another object the colour difference runs on past its ends; its edges stop
 * there. Returns null unless both ends are found at the expected length (±15 %).
 * expectedLength: the chart's strip length in px at the scale given by the width.
 */
export function endsFromEdges(profile: Profile, axisLength: number, maxGap: number, expectedLength: number): [StripEnd, StripEnd] | null {
  const edgeLevel = median(middleValues(profile, profile.edge, axisLength));
  // A textured surface (weave, grain) has edges of its own: a stricter threshold next.
  for (const frac of [0.4, 0.6]) {
    if (!(edgeLevel > 4)) break;
    const threshold = Math.max(4, frac * edgeLevel);
    const plus = walkEnd(profile, profile.edge, threshold, maxGap, 1), minus = walkEnd(profile, profile.edge, threshold, maxGap, -1);
    const ratio = (plus.end - minus.end) / expectedLength;
    if (!plus.truncated && !minus.truncated && ratio >= 0.85 && ratio <= 1.18) return [plus, minus];
  }
  return null;
}

/**
 * Whether the strip's end shows where a placement puts it (`endT`): walked from `fromT` (on the
 * strip, a little inside that end: the plastic before the first pad) towards it while `values`
 * stays above `threshold` (runs below it of at most `maxGap` px bridged), the walk stops within
 * `tolerance` px of `endT`, and beyond it the values stay below the threshold over most of
 * `clear` px (surface, not a pale pad or a gap in the strip). For pads placed from their colours
 * alone (a strip whose walked ends ran on into a line across the surface): the end seen where the
 * pads say it is.
 */
export function endShowsAt(profile: Profile, values: Float32Array, threshold: number, fromT: number, endT: number, maxGap: number, tolerance: number, clear: number): boolean {
  const dir = endT >= fromT ? 1 : -1;
  const at = (t: number) => Math.round(t - profile.t0);
  const i0 = at(fromT);
  if (i0 < 0 || i0 >= profile.n || !profile.valid[i0] || !(values[i0] > threshold)) return false;
  const { last, edge } = walk(profile, values, threshold, maxGap, dir, i0);
  if (edge) return false;
  if (Math.abs(profile.t0 + last + dir * 0.5 - endT) > tolerance) return false;
  let n = 0, low = 0;
  for (let k = 1; k <= clear; k++) {
    const j = last + dir * k;
    if (j < 0 || j >= profile.n || !profile.valid[j]) break;
    n++;
    if (!(values[j] > threshold)) low++;
  }
  return n >= clear * 0.8 && low >= 0.8 * n;
}
