import { describe, expect, it } from "vitest";
import { parseChart } from "./chart";
import { deltaE2000, hexToRgb, linearToSrgb, srgbToLinear } from "./colour";
import type { StripGeometry } from "./geometry";
import type { RgbImage } from "./image";
import { sampleQuad } from "./region-sample";
import { consistentBare, measurePads, quadAt } from "./measure-pads";

// A small synthetic strip (invented colours): horizontal, 20 px wide, one pad at x 90–110, the
// whole scene under a warm light given as per-channel gains in linear light. Under such a
// diagonal light the von Kries white correction from the bare plastic recovers the printed pad
// colour exactly, up to 8-bit rounding (Finlayson, Drew & Funt 1994, JOSA A 11(11):3011, cited
// in shared/reference/colour.md §7.1).
const chart = parseChart({
  format: "strip-chart/1",
  name: "test",
  strip: { widthMm: 5, lengthMm: 20, color: "#f4f3ef" },
  pads: [{ analyte: "ph", label: "pH", unit: "pH", centerMm: 10, sizeMm: 2, swatches: [{ value: 7, color: "#d87a3c" }, { value: 8, color: "#b8405a" }] }],
});
const gains = [1.0, 0.82, 0.55];
const paint = (hex: string) => hexToRgb(hex).map((c, k) => Math.round(linearToSrgb(srgbToLinear(c) * gains[k]) * 255));

function scene(padHex: string): RgbImage {
  const width = 200, height = 60, data = new Uint8Array(width * height * 3);
  const plastic = paint("#f4f3ef"), pad = paint(padHex), surface = paint("#8a8a80");
  for (let y = 0; y < height; y++)
    for (let x = 0; x < width; x++) {
      const c = y < 20 || y >= 40 ? surface : x >= 90 && x < 110 ? pad : plastic;
      data.set(c, (y * width + x) * 3);
    }
  return { width, height, data };
}

// 10 px per mm, tip at x 0, axis along +x through y 30.
const geometry: StripGeometry = {
  centre: [0, 30], u: [1, 0], v: [0, 1], dir: 1, tipT: 0, handleT: 200, widthPx: 20, pxPerMm: 10,
  pads: [{ t: 100, centre: [100, 30], halfAlong: 10, halfAcross: 10 }],
  bare: [[20, 85], [115, 180]],
  fitScore: 10, colourCost: 0, axisSpan: 200, rank: 10, lengthOk: true, endSeen: true, convincing: true, warnings: [], doubts: [],
};

describe("measuring pads with the white reference from the bare plastic", () => {
  it("recovers the printed pad colour under a warm light within 1 ΔE00", () => {
    const m = measurePads(scene("#d87a3c"), chart, geometry);
    expect(m.pads).toHaveLength(1);
    expect(deltaE2000(m.pads[0].lab, chart.pads[0].swatches[0].lab)).toBeLessThan(1);
    expect(m.pads[0].missing).toBe(false);
    expect(m.pads[0].spread).toBeLessThan(0.5);
  });
  it("tells a pad that looks like bare plastic (no pad there)", () => {
    const m = measurePads(scene("#f4f3ef"), chart, geometry);
    expect(m.pads[0].plasticLike).toBe(true);
    expect(m.pads[0].missing).toBe(true);
  });
});

describe("a pad mostly under glare", () => {
  // The same scene with a glare spot of the light's own colour (a Gaussian of 3 px, invented) at
  // the pad's middle: it covers the pad's inner 60 % nearly whole, and leaves its edges alone.
  function glared(padHex: string, sigma = 3): RgbImage {
    const img = scene(padHex);
    for (let y = 20; y < 40; y++)
      for (let x = 90; x < 110; x++) {
        const g = 0.8 * Math.exp(-((x + 0.5 - 100) ** 2 + (y + 0.5 - 30) ** 2) / (2 * sigma * sigma));
        for (let k = 0; k < 3; k++) {
          const o = (y * img.width + x) * 3 + k;
          img.data[o] = Math.round(255 * linearToSrgb(Math.min(1, srgbToLinear(img.data[o] / 255) + g * gains[k])));
        }
      }
    return img;
  }
  it("is sampled again over more of its area and reads its own colour within 1.5 ΔE00", () => {
    const img = glared("#d87a3c");
    // The inner 60 % alone holds next to nothing of the pad's own colour: it reads far paler.
    const white = sampleQuad(img, quadAt(geometry, 50, 20, 6), { whiteReference: true })!.linear;
    const inner = sampleQuad(img, quadAt(geometry, 100, 6, 6), { lamp: white })!;
    expect(inner.glareFraction).toBeGreaterThan(0);
    const m = measurePads(img, chart, geometry);
    expect(m.pads[0].sample.pixels).toBeGreaterThan(inner.pixels);
    expect(deltaE2000(m.pads[0].lab, chart.pads[0].swatches[0].lab)).toBeLessThan(1.5);
    expect(m.pads[0].spread).toBeLessThan(1);
  });
});

describe("consistentBare", () => {
  const sample = (r: number, g: number, b: number) => ({ s: { linear: [r, g, b] } });
  it("takes the plastic's chromaticity from the brightest samples, dropping gaps that took in the pads' colours", () => {
    // Two white gaps (one in a light shadow), and three narrow gaps between pads: yellow, green, dark.
    const white = sample(0.72, 0.64, 0.61), shaded = sample(0.36, 0.32, 0.305);
    const kept = consistentBare([white, sample(0.74, 0.59, 0.23), sample(0.16, 0.23, 0.1), sample(0.14, 0.17, 0.15), shaded]);
    expect(kept).toEqual([white, shaded]);
  });
});
