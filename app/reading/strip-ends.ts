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
  let last = 0, belowRun = 0, truncated = false;
  for (let t = 0; ; t += dir) {
    const i = idx0 + t;
    if (i < 0 || i >= profile.n || !profile.valid[i]) {
      truncated = true;
      break;
    }
    if (values[i] > threshold) (last = t), (belowRun = 0);
    else if (++belowRun > maxGap) break;
  }
  // Reaching the photo's edge after more than half a gap of surface: the strip ended before it.
  if (truncated && belowRun > maxGap / 2) truncated = false;
  return { end: last + dir * 0.5, truncated };
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
