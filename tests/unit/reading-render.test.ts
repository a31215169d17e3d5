/**
 * Checks of the synthetic-photo renderer (tests/render) that the reader's synthetic tests rely on.
 * Oracles: colorjs.io (a general-purpose colour library, not the renderer's culori) for CIELAB D65,
 * mixing and CIEDE2000; the chart JSON for the printed colours; sharp for decoding the JPEG.
 */
import { readFileSync } from "node:fs";
import Color from "colorjs.io";
import sharp from "sharp";
import { describe, expect, it } from "vitest";
import { renderChartPhoto } from "../render/chart-photo";
import { homographyFrom, apply } from "../render/camera";
import { indexToValue, valueToIndex, srgbToLinear, linearToSrgb } from "../render/colour";
import { renderStripPhoto, type StripPhotoOptions } from "../render/strip-photo";
import { asRenderChart, type Point } from "../render/types";

const practice = asRenderChart(JSON.parse(readFileSync("/work/shared/eval/charts/practice-3pad.json", "utf8")));

/** A clean render: daylight without jitter, even light, no noise, blur, glare or shadow. */
const clean: StripPhotoOptions = {
  width: 1200,
  height: 900,
  gains: [1, 1, 1],
  exposure: 1,
  light: { gradient: 0, vignette: 0 },
  perspective: 0,
  shadow: false,
  glare: 0,
  noise: 0,
  blur: 0,
  quality: 98,
  padTexture: false,
};

async function decode(jpeg: Buffer) {
  const { data, info } = await sharp(jpeg).raw().toBuffer({ resolveWithObject: true });
  return { data, width: info.width, height: info.height, channels: info.channels };
}

/** Mean sRGB (0..255) over a (2r+1)^2 patch. */
function patch(img: Awaited<ReturnType<typeof decode>>, x: number, y: number, r: number): [number, number, number] {
  const s = [0, 0, 0];
  let n = 0;
  for (let j = Math.round(y) - r; j <= Math.round(y) + r; j++)
    for (let i = Math.round(x) - r; i <= Math.round(x) + r; i++) {
      const o = (j * img.width + i) * img.channels;
      s[0] += img.data[o]!;
      s[1] += img.data[o + 1]!;
      s[2] += img.data[o + 2]!;
      n++;
    }
  return [s[0]! / n, s[1]! / n, s[2]! / n];
}

const srgbColor = (c: [number, number, number]) => new Color("srgb", c.map((v) => v / 255) as [number, number, number]);

describe("strip photo renderer", () => {
  it("is deterministic per seed and differs between seeds", async () => {
    const a = await renderStripPhoto(practice, { seed: 11, width: 640, height: 480 });
    const b = await renderStripPhoto(practice, { seed: 11, width: 640, height: 480 });
    const c = await renderStripPhoto(practice, { seed: 12, width: 640, height: 480 });
    expect(a.jpeg.equals(b.jpeg)).toBe(true);
    expect(a.truth).toEqual(b.truth);
    expect(a.jpeg.equals(c.jpeg)).toBe(false);
  });

  it("gives truth whose index maps back to its value on the chart's piecewise-linear scale", async () => {
    // Source: the eval README's scoring rule (value mapped piecewise linearly onto the swatch list).
    for (const seed of [1, 2, 3, 4, 5]) {
      const r = await renderStripPhoto(practice, { seed, width: 320, height: 240 });
      expect(r.truth.map((t) => t.analyte)).toEqual(practice.pads.map((p) => p.analyte));
      r.truth.forEach((t, i) => {
        const pad = practice.pads[i]!;
        expect(t.index).toBeGreaterThanOrEqual(0);
        expect(t.index).toBeLessThanOrEqual(pad.swatches.length - 1);
        expect(indexToValue(pad, t.index)).toBeCloseTo(t.value, 9);
        expect(valueToIndex(pad, t.value)).toBeCloseTo(t.index, 9);
      });
    }
    // Worked example from the chart: pH swatches 7.2 (index 2) and 7.6 (index 3), so 7.4 is index 2.5.
    const r = await renderStripPhoto(practice, { ...clean, values: { ph: 7.4 } });
    expect(r.truth.find((t) => t.analyte === "ph")!.index).toBeCloseTo(2.5, 9);
  });

  it("keeps the IEC 61966-2-1 sRGB transfer function invertible", () => {
    // Source: IEC 61966-2-1 breakpoints (0.04045 encoded, 0.0031308 linear).
    // The standard's two pieces meet only to about 3e-8 at the breakpoint, hence 6 digits.
    for (const v of [0, 0.002, 0.04045, 0.2, 0.5, 0.9, 1]) expect(linearToSrgb(srgbToLinear(v))).toBeCloseTo(v, 6);
    expect(srgbToLinear(0.5)).toBeCloseTo(0.214041, 5); // ((0.5+0.055)/1.055)^2.4, computed
  });

  it("paints a pad at a whole swatch index in that swatch's printed colour (clean render)", async () => {
    for (const rotationDeg of [0, 37, 90, 211]) {
      const r = await renderStripPhoto(practice, { ...clean, seed: 7, rotationDeg, indices: { free_chlorine: 3, ph: 1, total_alkalinity: 5 } });
      const img = await decode(r.jpeg);
      for (const c of r.conditions.padCentersPx) {
        const pad = practice.pads.find((p) => p.analyte === c.analyte)!;
        const t = r.truth.find((x) => x.analyte === c.analyte)!;
        const want = new Color(pad.swatches[t.index]!.color);
        const got = srgbColor(patch(img, c.x, c.y, 4));
        // CIEDE2000 via colorjs.io; the only losses are 8-bit rounding and JPEG at quality 98.
        expect(got.deltaE(want, "2000")).toBeLessThan(1);
      }
    }
  });

  it("mixes a pad between swatches at its fractional index in CIELAB", async () => {
    const r = await renderStripPhoto(practice, { ...clean, seed: 8, rotationDeg: 0, indices: { free_chlorine: 2.5, ph: 1.25, total_alkalinity: 4.75 } });
    const img = await decode(r.jpeg);
    for (const c of r.conditions.padCentersPx) {
      const pad = practice.pads.find((p) => p.analyte === c.analyte)!;
      const idx = r.truth.find((x) => x.analyte === c.analyte)!.index;
      const k = Math.floor(idx);
      // Oracle: colorjs.io's mix in Lab D65 of the two neighbouring printed swatches.
      const want = new Color(pad.swatches[k]!.color).mix(pad.swatches[k + 1]!.color, idx - k, { space: "lab-d65" });
      const got = srgbColor(patch(img, c.x, c.y, 4));
      expect(got.deltaE(want, "2000")).toBeLessThan(1);
    }
  });

  it("lights the pads by the illuminant gain in linear light", async () => {
    const gains: [number, number, number] = [1, 0.8, 0.55];
    const r = await renderStripPhoto(practice, { ...clean, seed: 9, gains, exposure: 0.9, indices: { free_chlorine: 0, ph: 0, total_alkalinity: 0 } });
    const img = await decode(r.jpeg);
    for (const c of r.conditions.padCentersPx) {
      const pad = practice.pads.find((p) => p.analyte === c.analyte)!;
      const hex = pad.swatches[0]!.color;
      const lin = [1, 3, 5].map((o, ch) => srgbToLinear(parseInt(hex.slice(o, o + 2), 16) / 255) * gains[ch]! * 0.9);
      const want = new Color("srgb-linear", lin as [number, number, number]);
      expect(srgbColor(patch(img, c.x, c.y, 4)).deltaE(want, "2000")).toBeLessThan(1);
    }
  });

  it("draws only the pads asked for, leaving bare strip where the others would be", async () => {
    const r = await renderStripPhoto(practice, { ...clean, seed: 10, drawPads: ["free_chlorine", "total_alkalinity"] });
    expect(r.truth.map((t) => t.analyte)).toEqual(["free_chlorine", "total_alkalinity"]);
    const img = await decode(r.jpeg);
    // Where the pH pad would be (12 mm from the tip), the strip's own colour shows.
    const [a, b] = r.conditions.stripCornersPx!;
    const [c2, d] = [r.conditions.stripCornersPx![3], r.conditions.stripCornersPx![2]];
    const f = 12 / practice.strip.lengthMm;
    const at = (p: Point, q: Point): Point => [p[0] + f * (q[0] - p[0]), p[1] + f * (q[1] - p[1])];
    const e1 = at(a, c2);
    const e2 = at(b, d);
    const mid: Point = [(e1[0] + e2[0]) / 2, (e1[1] + e2[1]) / 2];
    const got = srgbColor(patch(img, mid[0], mid[1], 3));
    expect(got.deltaE(new Color(practice.strip.color), "2000")).toBeLessThan(1);
  });

  it("renders a photo without a strip", async () => {
    const r = await renderStripPhoto(practice, { seed: 3, noStrip: true, width: 800, height: 600 });
    expect(r.truth).toEqual([]);
    expect(r.conditions.stripCornersPx).toBeNull();
    expect((await sharp(r.jpeg).metadata()).width).toBe(800);
  });

  it("refuses frames over 12 megapixels", async () => {
    await expect(renderStripPhoto(practice, { width: 5000, height: 4000 })).rejects.toThrow(/12 megapixels/);
  });
});

describe("chart card photo renderer", () => {
  it("puts the grid where its layout says, so a white-referenced sample under a cast is within 2 dE00", async () => {
    for (const [seed, cast] of [[1, "warm"], [2, "cool"], [3, "fluorescent"]] as const) {
      const r = await renderChartPhoto(practice, { seed, cast });
      const img = await decode(r.jpeg);
      expect(r.truth.length).toBe(r.layout.rows);
      const unit: Point[] = [[0, 0], [1, 0], [1, 1], [0, 1]];
      const G = homographyFrom(unit, r.layout.corners);
      const W = homographyFrom(unit, r.layout.white);
      const [wx, wy] = apply(W, 0.5, 0.5);
      const white = patch(img, wx, wy, 10).map((v) => srgbToLinear(v / 255));
      const half = Math.max(2, Math.floor(((r.layout.corners[1][0] - r.layout.corners[0][0]) / r.layout.cols) * 0.2));
      r.truth.forEach((row, i) => {
        row.forEach((hex, j) => {
          const [x, y] = apply(G, (j + 0.5) / r.layout.cols, (i + 0.5) / r.layout.rows);
          // Von Kries-style scaling by the card's white (#ffffff): the simplest calibration.
          const lin = patch(img, x, y, half).map((v, ch) => srgbToLinear(v / 255) / white[ch]!);
          const got = new Color("srgb-linear", lin as [number, number, number]);
          expect(got.deltaE(new Color(hex), "2000"), `${cast} row ${i} col ${j}`).toBeLessThan(2);
        });
      });
    }
  });
});
