// Glare on a wet pad: light of the lamp's colour reflected off the water, added to the pad's own
// colour in linear light. Each pixel's "level" is its light measured in the lamp's colour (each
// channel over the lamp's, averaged): glare only ever raises it. The pad's own level is the
// densest level among the pixels (their half-sample mode), since a glare spot's light falls off
// smoothly and spreads its pixels over many levels; its noise is read from the pixels below that
// level, where no glare reaches. A pixel more than its noise above the pad's own level is glare,
// when the glare covers most of the pad (a cut against the median stops working once the glare's
// halo covers half of it). A spot so wide that hardly any of the region is free of it leaves its
// densest levels in the halo: the pad then reads paler and uneven, and goes to review as uneven.
import { select } from "./stats";

/**
 * The half-sample mode of ascending values: the middle of the shortest interval holding half of
 * them, narrowed the same way until three or fewer remain (robust to a long tail on one side).
 */
export function halfSampleMode(sorted: ArrayLike<number>): number {
  let lo = 0, n = sorted.length;
  if (n === 0) return NaN;
  while (n > 3) {
    const h = Math.ceil(n / 2);
    let best = lo, width = Infinity;
    for (let i = lo; i + h - 1 < lo + n; i++) {
      const w = sorted[i + h - 1] - sorted[i];
      if (w < width) (width = w), (best = i);
    }
    (lo = best), (n = h);
  }
  if (n === 3) {
    // The two closer of the three.
    const a = sorted[lo], b = sorted[lo + 1], c = sorted[lo + 2];
    return b - a < c - b ? (a + b) / 2 : b - a > c - b ? (b + c) / 2 : b;
  }
  return n === 2 ? (sorted[lo] + sorted[lo + 1]) / 2 : sorted[lo];
}

/** Work arrays kept from one region to the next (grown as needed). */
const kept = { level: new Float32Array(0), sorted: new Float32Array(0) };

/** Noise multiples above the pad's own level beyond which a pixel counts as glare. */
const GLARE_SIGMAS = 3;
/** …and never less than this share of the level (the pad's own texture). */
const GLARE_MIN_SHARE = 0.08;
/** The brightest 3 % of the pixels must lie this many times above the median level for glare to show. */
const EVIDENT_GLARE = 1.5;

/**
 * Marks glare among a region's pixels. `linear`: the pixels' linear RGB (3 per pixel); `usable`:
 * 1 for pixels that may be judged (clipped ones are left out: their colour no longer adds up);
 * `lamp`: the light's colour as photographed (the bare plastic's, which is near white). Sets
 * `glare[k]` to 1 for each glare pixel and returns how many there are; −1 when no glare shows
 * (nothing marked).
 */
export function markAdditiveGlare(linear: Float32Array, usable: Uint8Array, lamp: readonly number[], glare: Uint8Array): number {
  const n = usable.length;
  const lr = lamp[0] > 0 ? 1 / lamp[0] : 0, lg = lamp[1] > 0 ? 1 / lamp[1] : 0, lb = lamp[2] > 0 ? 1 / lamp[2] : 0;
  if (kept.level.length < n) kept.level = new Float32Array(Math.max(n, 2 * kept.level.length));
  const level = kept.level;
  let m = 0;
  for (let k = 0; k < n; k++) {
    level[k] = (linear[3 * k] * lr + linear[3 * k + 1] * lg + linear[3 * k + 2] * lb) / 3;
    if (usable[k]) m++;
  }
  if (m < 8) return -1;
  if (kept.sorted.length < m) kept.sorted = new Float32Array(Math.max(m, 2 * kept.sorted.length));
  const sorted = kept.sorted.subarray(0, m);
  for (let k = 0, j = 0; k < n; k++) if (usable[k]) sorted[j++] = level[k];
  // No glare shows unless a spot stands out: some pixels far brighter than the middle of the
  // region (the brightest 3 % above 1.5 × its median level). A pad's own unevenness (a reaction
  // still spreading, its paper's grain) is left to the median's rules, since its densest level
  // may lie at its darker end. Both ranks are found by selection: most pads show no glare, and
  // only then are all their levels sorted.
  const top = Math.floor(0.97 * (m - 1)), mid = (m - 1) >> 1;
  select(sorted, top);
  if (mid < top) select(sorted.subarray(0, top), mid);
  if (!(sorted[top] > EVIDENT_GLARE * sorted[mid])) return -1;
  sorted.sort();
  const own = halfSampleMode(sorted);
  // Noise from below the pad's own level: 1.4826 × the median distance under it (σ of a normal),
  // over the values strictly below it (8-bit codes tie many pixels at the level itself).
  let below = 0;
  while (below < m && sorted[below] < own) below++;
  const sigma = below ? 1.4826 * (own - sorted[below - 1 - (below >> 1)]) : 0;
  const cut = own + Math.max(GLARE_SIGMAS * sigma, GLARE_MIN_SHARE * own);
  let count = 0;
  for (let k = 0; k < n; k++) if (usable[k] && level[k] > cut) (glare[k] = 1), count++;
  return count;
}
