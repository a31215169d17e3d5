// How much the strip's inner band differs from bare plastic at each t, after evening out the
// light along the strip with the surface beside it (a shadow across the strip is not a change of
// colour). Prefix-summed, so that a mean over any span costs two look-ups.
import type { Profile } from "./axis-profile";
import { middleValues } from "./strip-ends";
import { median } from "./stats";

export type PlasticDifference = {
  /** Bare plastic's colour (0..255 per channel, light-evened), the median over the axis span's middle. */
  bare: number[];
  /** Mean difference from bare plastic between t0 and t1 (either order; clipped to the profile). */
  meanBetween: (t0: number, t1: number) => number;
  /** The difference summed over the profile's indices below each index (n + 1 entries): the same means, taken inline by a search. */
  prefix: Float64Array;
};

/** Local light along the strip from the surface beside it: a median over about ±1 strip width. */
export function localLight(profile: Profile, widthPx: number): Float32Array {
  const light = new Float32Array(profile.n);
  const reach = Math.max(3, Math.round(widthPx)), step = Math.max(1, Math.round(reach / 4));
  const window = new Float32Array(Math.floor((2 * reach) / step) + 1);
  for (let i = 0; i < profile.n; i++) {
    // Insertion sort into a small window, then its median.
    let m = 0;
    for (let j = i - reach; j <= i + reach; j += step) {
      if (j < 0 || j >= profile.n || !profile.valid[j]) continue;
      const v = profile.surface[j];
      let k = m++;
      while (k > 0 && window[k - 1] > v) (window[k] = window[k - 1]), k--;
      window[k] = v;
    }
    light[i] = m === 0 ? 0 : m % 2 ? window[m >> 1] : (window[(m >> 1) - 1] + window[m >> 1]) / 2;
  }
  return light;
}

export function plasticDifference(profile: Profile, axisLength: number, widthPx: number): PlasticDifference {
  const light = localLight(profile, widthPx);
  const lightRef = median(middleValues(profile, light, axisLength).filter((v) => v > 0));
  const gain = (i: number) => (lightRef > 0 && light[i] > 0 ? Math.max(0.25, Math.min(4, lightRef / light[i])) : 1);
  // Bare-plastic colour: median of the inner band over the axis span's middle.
  const idx0 = Math.round(-profile.t0);
  const channels: number[][] = [[], [], []];
  for (let t = Math.round(-axisLength * 0.4); t <= Math.round(axisLength * 0.4); t++) {
    const i = idx0 + t;
    if (i >= 0 && i < profile.n && profile.valid[i]) for (let c = 0; c < 3; c++) channels[c].push(profile.inner[i * 3 + c] * gain(i));
  }
  const bare = channels.map(median);
  const prefix = new Float64Array(profile.n + 1);
  for (let i = 0; i < profile.n; i++) {
    let d = 0;
    if (profile.valid[i]) {
      const g = gain(i);
      const dr = profile.inner[i * 3] * g - bare[0], dg = profile.inner[i * 3 + 1] * g - bare[1], db = profile.inner[i * 3 + 2] * g - bare[2];
      d = Math.sqrt(dr * dr + dg * dg + db * db);
    }
    prefix[i + 1] = prefix[i] + d;
  }
  const meanBetween = (t0: number, t1: number) => {
    // Called for every span of every placement tried: no array for the swap.
    const ra = Math.round(t0 - profile.t0), rb = Math.round(t1 - profile.t0);
    const a = Math.max(0, ra < rb ? ra : rb), b = Math.min(profile.n - 1, ra < rb ? rb : ra);
    if (b < a) return 0;
    return (prefix[b + 1] - prefix[a]) / (b - a + 1);
  };
  return { bare, meanBetween, prefix };
}
