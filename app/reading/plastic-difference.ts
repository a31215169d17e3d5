// How much the strip's inner band differs from bare plastic at each t, after evening out the
// light along the strip with the surface beside it (a shadow across the strip is not a change of
// colour). Light multiplies linear light, not encoded sRGB: the surface's darkening is measured,
// and undone on the strip, in linear light (on a dark surface the encoded values' ratio is far
// from the light's: sRGB's curve is not a power law near black). Prefix-summed, so that a mean
// over any span costs two look-ups.
import type { Profile } from "./axis-profile";
import { SRGB8_TO_LINEAR, linearToSrgb } from "./colour";
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

/** Encoded 0..255 (fractional) → linear light, between the 8-bit table's entries. */
function toLinear(v: number): number {
  const i = v <= 0 ? 0 : v >= 254 ? 254 : v | 0;
  const f = Math.min(1, Math.max(0, v - i));
  return SRGB8_TO_LINEAR[i] * (1 - f) + SRGB8_TO_LINEAR[i + 1] * f;
}

/** Encoded values (0..255) at evenly spaced square roots of linear light 0..1: the table toEncoded reads. */
const ENCODE_STEPS = 1024;
const ENCODED_AT_ROOT = (() => {
  const t = new Float32Array(ENCODE_STEPS + 2);
  for (let i = 0; i <= ENCODE_STEPS + 1; i++) t[i] = 255 * linearToSrgb(Math.min(1, (i / ENCODE_STEPS) ** 2));
  return t;
})();

/** Linear light → encoded 0..255 (a table over its square root; beyond full light, the formula). */
function toEncoded(x: number): number {
  if (x >= 1) return 255 * linearToSrgb(x);
  const r = Math.sqrt(Math.max(0, x)) * ENCODE_STEPS, i = r | 0, f = r - i;
  return ENCODED_AT_ROOT[i] * (1 - f) + ENCODED_AT_ROOT[i + 1] * f;
}

/** The light's gain in linear light is kept within these (a quarter to four times in encoded values). */
const MIN_GAIN = Math.pow(0.25, 2.2), MAX_GAIN = Math.pow(4, 2.2);

export function plasticDifference(profile: Profile, axisLength: number, widthPx: number): PlasticDifference {
  const light = localLight(profile, widthPx);
  const lightRef = median(middleValues(profile, light, axisLength).filter((v) => v > 0));
  const lightRefLin = toLinear(lightRef);
  // The inner band's colour as if lit like the reference: each channel in linear light times the
  // local light's gain, encoded again (0..255). Where the light is the reference's, as it is.
  const evened = new Float32Array(profile.n * 3);
  for (let i = 0; i < profile.n; i++) {
    if (!profile.valid[i]) continue;
    const l = light[i];
    const gain = lightRef > 0 && l > 0 && l !== lightRef ? Math.max(MIN_GAIN, Math.min(MAX_GAIN, lightRefLin / toLinear(l))) : 1;
    for (let c = 0; c < 3; c++) {
      const v = profile.inner[i * 3 + c];
      evened[i * 3 + c] = gain === 1 ? v : toEncoded(gain * toLinear(v));
    }
  }
  // Bare-plastic colour: median of the inner band over the axis span's middle.
  const idx0 = Math.round(-profile.t0);
  const channels: number[][] = [[], [], []];
  for (let t = Math.round(-axisLength * 0.4); t <= Math.round(axisLength * 0.4); t++) {
    const i = idx0 + t;
    if (i >= 0 && i < profile.n && profile.valid[i]) for (let c = 0; c < 3; c++) channels[c].push(evened[i * 3 + c]);
  }
  const bare = channels.map(median);
  const prefix = new Float64Array(profile.n + 1);
  for (let i = 0; i < profile.n; i++) {
    let d = 0;
    if (profile.valid[i]) {
      const dr = evened[i * 3] - bare[0], dg = evened[i * 3 + 1] - bare[1], db = evened[i * 3 + 2] - bare[2];
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
