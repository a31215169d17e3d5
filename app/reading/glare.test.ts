// Glare found as the light's own colour added to a pad's: a small drawn pad with a soft glare spot
// covering most of it (colours and spot invented; the spot's light falls off as a Gaussian).
import { describe, expect, it } from "vitest";
import { deltaE2000, linearRgbToLab, linearToSrgb, srgbToLinear, type Rgb } from "./colour";
import { halfSampleMode, markAdditiveGlare } from "./glare";
import type { RgbImage } from "./image";
import { sampleQuad } from "./region-sample";

describe("halfSampleMode", () => {
  it("finds the dense cluster under a long tail on one side", () => {
    // 30 values near 1, then 70 spread thinly from 1.2 to 4.
    const v = [...Array.from({ length: 30 }, (_, i) => 1 + (i % 5) * 0.002), ...Array.from({ length: 70 }, (_, i) => 1.2 + (i * 2.8) / 69)].sort((a, b) => a - b);
    expect(halfSampleMode(v)).toBeGreaterThan(0.999);
    expect(halfSampleMode(v)).toBeLessThan(1.01);
  });
  it("gives the middle of a symmetric cluster, and the values themselves when there are few", () => {
    expect(halfSampleMode([1, 3, 3.9, 4, 4.1, 5, 7])).toBeCloseTo(4, 0);
    expect(halfSampleMode([2, 3])).toBe(2.5);
    expect(halfSampleMode([5])).toBe(5);
    expect(halfSampleMode([])).toBeNaN();
  });
});

/** A 40 × 40 pad of one colour (linear RGB) under a warm lamp, with a glare spot of the lamp's colour at its centre. */
function glaredPad(body: Rgb, lamp: Rgb, spotSigma: number, peak: number): RgbImage {
  const size = 40, data = new Uint8Array(size * size * 3);
  for (let y = 0; y < size; y++)
    for (let x = 0; x < size; x++) {
      const d2 = (x + 0.5 - 20) ** 2 + (y + 0.5 - 20) ** 2;
      const g = peak * Math.exp(-d2 / (2 * spotSigma * spotSigma));
      // A little texture so that the pad's own pixels are not all one code.
      const tex = 1 + 0.02 * Math.sin(x * 1.7) * Math.cos(y * 2.3);
      for (let c = 0; c < 3; c++) data[(y * size + x) * 3 + c] = Math.round(255 * linearToSrgb(Math.min(1, body[c] * lamp[c] * tex + g * lamp[c])));
    }
  return { width: size, height: size, data };
}

describe("markAdditiveGlare", () => {
  it("marks the spot's pixels, and finds none on a pad without glare", () => {
    const lamp: Rgb = [1, 0.8, 0.55];
    const lin = (img: RgbImage) => Float32Array.from(img.data, (v) => srgbToLinear(v / 255));
    const spotted = glaredPad([0.2, 0.08, 0.25], lamp, 7, 0.8), clean = glaredPad([0.2, 0.08, 0.25], lamp, 7, 0);
    const n = 40 * 40, usable = new Uint8Array(n).fill(1);
    const g1 = new Uint8Array(n), g0 = new Uint8Array(n);
    expect(markAdditiveGlare(lin(spotted), usable, lamp, g1)).toBeGreaterThan(0.35 * n);
    expect(markAdditiveGlare(lin(clean), usable, lamp, g0)).toBe(-1);
    expect(g0.every((v) => v === 0)).toBe(true);
    // The pad's corner lies beyond the spot's reach; its centre is under it.
    expect(g1[0]).toBe(0);
    expect(g1[20 * 40 + 20]).toBe(1);
  });
  it("tells glare from none by two selected ranks exactly as with every level sorted", () => {
    // Reference: all levels sorted first, then the brightest 3 % against 1.5 × the median.
    const evident = (linear: Float32Array, usable: Uint8Array, lamp: Rgb) => {
      const levels: number[] = [];
      for (let k = 0; k < usable.length; k++)
        if (usable[k]) levels.push(Math.fround((linear[3 * k] * (1 / lamp[0]) + linear[3 * k + 1] * (1 / lamp[1]) + linear[3 * k + 2] * (1 / lamp[2])) / 3));
      const sorted = Float32Array.from(levels).sort(), m = sorted.length;
      return sorted[Math.floor(0.97 * (m - 1))] > 1.5 * sorted[(m - 1) >> 1];
    };
    const lamp: Rgb = [1, 0.85, 0.6];
    let seed = 7;
    const rand = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
    let both = 0;
    for (let trial = 0; trial < 60; trial++) {
      const n = 20 + Math.floor(rand() * 400), share = rand() * 0.1, lift = 0.5 + rand() * 1.5;
      const linear = new Float32Array(3 * n), usable = new Uint8Array(n);
      for (let k = 0; k < n; k++) {
        const spot = rand() < share ? lift : 0;
        for (let c = 0; c < 3; c++) linear[3 * k + c] = (0.1 + 0.05 * rand() + spot) * lamp[c];
        usable[k] = rand() < 0.95 ? 1 : 0;
      }
      const marks = new Uint8Array(n);
      const shows = markAdditiveGlare(linear, usable, lamp, marks) >= 0;
      expect(shows).toBe(evident(linear, usable, lamp));
      if (shows) both++;
    }
    // Both outcomes came up.
    expect(both).toBeGreaterThan(5);
    expect(both).toBeLessThan(55);
  });
});

describe("sampleQuad with the lamp's colour", () => {
  const lamp: Rgb = [0.9, 0.72, 0.5];
  const body: Rgb = [0.2, 0.08, 0.25];
  const truth = linearRgbToLab(body[0] * lamp[0], body[1] * lamp[1], body[2] * lamp[2]);
  const quad: [number, number][] = [[0, 0], [40, 0], [40, 40], [0, 40]];

  it("reads a pad whose glare covers more than half of it as its own colour", () => {
    const img = glaredPad(body, lamp, 7, 0.8);
    const withLamp = sampleQuad(img, quad, { lamp })!;
    const without = sampleQuad(img, quad)!;
    const lab = (s: { linear: Rgb }) => linearRgbToLab(...s.linear);
    expect(withLamp.glareFraction).toBeGreaterThan(0.5);
    expect(deltaE2000(lab(withLamp), truth)).toBeLessThan(1.5);
    // By brightness against the median the halo is kept, and the pad reads far paler.
    expect(deltaE2000(lab(without), truth)).toBeGreaterThan(3);
  });

  it("reads a pad without glare as it does by the median", () => {
    const img = glaredPad(body, lamp, 7, 0);
    const a = sampleQuad(img, quad, { lamp })!, b = sampleQuad(img, quad)!;
    expect(a.glareFraction).toBe(0);
    expect(deltaE2000(linearRgbToLab(...a.linear), linearRgbToLab(...b.linear))).toBeLessThan(0.05);
  });
});
