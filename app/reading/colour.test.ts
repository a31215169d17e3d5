import Color from "colorjs.io";
// @ts-expect-error delta-e ships no type declarations
import DeltaE from "delta-e"; // the package exports a ready DeltaE instance
import { describe, expect, it } from "vitest";
import {
  bradfordMatrix,
  correctLinear,
  deltaE2000,
  deltaE2000Along,
  hexToLab,
  lerpLab,
  hexToRgb,
  labToHex,
  linearRgbToLab,
  linearToSrgb,
  srgbToLab,
  srgbToLinear,
  whiteCorrectionMatrix,
  type Lab,
} from "./colour";
import { matchSwatches } from "./match";
import { parseChart } from "./chart";

// Source: G. Sharma, W. Wu, E. N. Dalal, "The CIEDE2000 color-difference formula: implementation
// notes, supplementary test data, and mathematical observations", Color Research & Application
// 30(1):21–30, 2005, doi:10.1002/col.20070, Table 1 (all 34 pairs; L1 a1 b1 L2 a2 b2 ΔE00).
const SHARMA_2005: number[][] = [
  [50.0, 2.6772, -79.7751, 50.0, 0.0, -82.7485, 2.0425],
  [50.0, 3.1571, -77.2803, 50.0, 0.0, -82.7485, 2.8615],
  [50.0, 2.8361, -74.02, 50.0, 0.0, -82.7485, 3.4412],
  [50.0, -1.3802, -84.2814, 50.0, 0.0, -82.7485, 1.0],
  [50.0, -1.1848, -84.8006, 50.0, 0.0, -82.7485, 1.0],
  [50.0, -0.9009, -85.5211, 50.0, 0.0, -82.7485, 1.0],
  [50.0, 0.0, 0.0, 50.0, -1.0, 2.0, 2.3669],
  [50.0, -1.0, 2.0, 50.0, 0.0, 0.0, 2.3669],
  [50.0, 2.49, -0.001, 50.0, -2.49, 0.0009, 7.1792],
  [50.0, 2.49, -0.001, 50.0, -2.49, 0.001, 7.1792],
  [50.0, 2.49, -0.001, 50.0, -2.49, 0.0011, 7.2195],
  [50.0, 2.49, -0.001, 50.0, -2.49, 0.0012, 7.2195],
  [50.0, -0.001, 2.49, 50.0, 0.0009, -2.49, 4.8045],
  [50.0, -0.001, 2.49, 50.0, 0.001, -2.49, 4.8045],
  [50.0, -0.001, 2.49, 50.0, 0.0011, -2.49, 4.7461],
  [50.0, 2.5, 0.0, 50.0, 0.0, -2.5, 4.3065],
  [50.0, 2.5, 0.0, 73.0, 25.0, -18.0, 27.1492],
  [50.0, 2.5, 0.0, 61.0, -5.0, 29.0, 22.8977],
  [50.0, 2.5, 0.0, 56.0, -27.0, -3.0, 31.903],
  [50.0, 2.5, 0.0, 58.0, 24.0, 15.0, 19.4535],
  [50.0, 2.5, 0.0, 50.0, 3.1736, 0.5854, 1.0],
  [50.0, 2.5, 0.0, 50.0, 3.2972, 0.0, 1.0],
  [50.0, 2.5, 0.0, 50.0, 1.8634, 0.5757, 1.0],
  [50.0, 2.5, 0.0, 50.0, 3.2592, 0.335, 1.0],
  [60.2574, -34.0099, 36.2677, 60.4626, -34.1751, 39.4387, 1.2644],
  [63.0109, -31.0961, -5.8663, 62.8187, -29.7946, -4.0864, 1.263],
  [61.2901, 3.7196, -5.3901, 61.4292, 2.248, -4.962, 1.8731],
  [35.0831, -44.1164, 3.7933, 35.0232, -40.0716, 1.5901, 1.8645],
  [22.7233, 20.0904, -46.694, 23.0331, 14.973, -42.5619, 2.0373],
  [36.4612, 47.858, 18.3852, 36.2715, 50.5065, 21.2231, 1.4146],
  [90.8027, -2.0831, 1.441, 91.1528, -1.6435, 0.0447, 1.4441],
  [90.9257, -0.5406, -0.9208, 88.6381, -0.8985, -0.7239, 1.5381],
  [6.7747, -0.2908, -2.4247, 5.8714, -0.0985, -2.2286, 0.6377],
  [2.0776, 0.0795, -1.135, 0.9033, -0.0636, -0.5514, 0.9082],
];

describe("CIEDE2000 (Sharma, Wu & Dalal 2005, Table 1)", () => {
  it("has all 34 pairs", () => expect(SHARMA_2005).toHaveLength(34));
  SHARMA_2005.forEach((row, i) => {
    it(`pair ${i + 1} in both orders to 1e-4`, () => {
      const x: Lab = { l: row[0], a: row[1], b: row[2] };
      const y: Lab = { l: row[3], a: row[4], b: row[5] };
      expect(Math.abs(deltaE2000(x, y) - row[6])).toBeLessThanOrEqual(1e-4);
      expect(Math.abs(deltaE2000(y, x) - row[6])).toBeLessThanOrEqual(1e-4);
    });
  });
});

// Source: CSS Color Module Level 4, sample conversion code (w3c/csswg-drafts css-color-4/conversions.js),
// values as tabulated in /work/shared/reference/colour.md §2.3 (CIELAB D65 column), rounded to 4 decimals.
const CSS_LAB_D65: [string, number, number, number][] = [
  ["#ffffff", 100, 0, 0],
  ["#808080", 53.585, 0, 0],
  ["#777777", 50.0344, 0, 0],
  ["#ff0000", 53.2371, 80.0901, 67.2033],
  ["#00ff00", 87.7355, -86.1816, 83.1866],
  ["#0000ff", 32.3009, 79.1953, -107.8555],
  ["#008000", 46.2279, -51.6978, 49.9012],
  ["#ffff00", 97.1386, -21.56, 94.4838],
  ["#00ffff", 91.1148, -48.0789, -14.129],
  ["#ff00ff", 60.3227, 98.2374, -60.8289],
  ["#aabbcc", 75.1053, -2.2904, -10.5281],
  ["#ff8000", 67.0525, 42.8204, 74.0198],
  ["#663399", 32.9028, 42.8865, -47.1491],
];

describe("CIEDE2000 along a segment", () => {
  it("gives exactly deltaE2000 to the interpolated colour, on the Sharma pairs as segment ends", () => {
    SHARMA_2005.forEach((row, i) => {
      const p: Lab = { l: row[0], a: row[1], b: row[2] }, q: Lab = { l: row[3], a: row[4], b: row[5] };
      const x: Lab = { l: SHARMA_2005[(i + 7) % 34][0], a: SHARMA_2005[(i + 7) % 34][1], b: SHARMA_2005[(i + 7) % 34][2] };
      const along = deltaE2000Along(x);
      for (const t of [0, 0.13, 0.5, 0.77, 1]) expect(along(p, q, t)).toBe(deltaE2000(x, lerpLab(p, q, t)));
    });
  });
});

describe("sRGB -> CIELAB D65 (CSS Color 4 conversion code)", () => {
  for (const [hex, l, a, b] of CSS_LAB_D65) {
    it(`${hex}`, () => {
      const lab = hexToLab(hex);
      // 4-decimal reference values: allow rounding plus culori's ~3e-8 matrix drift.
      expect(lab.l).toBeCloseTo(l, 3);
      expect(Math.abs(lab.l - l)).toBeLessThan(1.5e-4);
      expect(Math.abs(lab.a - a)).toBeLessThan(1.5e-4);
      expect(Math.abs(lab.b - b)).toBeLessThan(1.5e-4);
      const [r, g, bb] = hexToRgb(hex);
      const viaLinear = linearRgbToLab(srgbToLinear(r), srgbToLinear(g), srgbToLinear(bb));
      expect(deltaE2000(viaLinear, lab)).toBeLessThan(1e-6);
      expect(deltaE2000(srgbToLab(r, g, bb), lab)).toBeLessThan(1e-9);
    });
  }
  it("round-trips Lab -> hex", () => {
    for (const [hex] of CSS_LAB_D65) expect(labToHex(hexToLab(hex))).toBe(hex);
  });
  it("sRGB transfer function round trip and breakpoint (IEC 61966-2-1)", () => {
    for (let v = 0; v <= 1; v += 0.01) expect(linearToSrgb(srgbToLinear(v))).toBeCloseTo(v, 12);
    expect(srgbToLinear(0.04045)).toBeCloseTo(0.04045 / 12.92, 12);
  });
  it("rejects colours that are not hex", () => {
    expect(() => hexToLab("red")).toThrow();
    expect(() => hexToLab("#12345")).toThrow();
  });
});

describe("cross-check against colorjs.io (lab-d65) and delta-e (getDeltaE00)", () => {
  const hexes = ["#f3f2ec", "#e8c83c", "#e6a03b", "#7a4a8e", "#38738f", "#4c8b86", "#d6573f", "#b7c55a", "#aabbcc", "#202020"];
  it("Lab D65 conversions agree with colorjs.io lab-d65 to 1e-4", () => {
    for (const hex of hexes) {
      const ours = hexToLab(hex);
      const [l, a, b] = new Color(hex).to("lab-d65").coords as number[];
      expect(Math.abs(ours.l - l)).toBeLessThan(1e-4);
      expect(Math.abs(ours.a - a)).toBeLessThan(1e-4);
      expect(Math.abs(ours.b - b)).toBeLessThan(1e-4);
    }
  });
  it("ΔE00 between chart colours agrees with delta-e getDeltaE00 to 1e-4", () => {
    const de = DeltaE;
    for (const h1 of hexes)
      for (const h2 of hexes) {
        const x = hexToLab(h1), y = hexToLab(h2);
        const ref = de.getDeltaE00({ L: x.l, A: x.a, B: x.b }, { L: y.l, A: y.a, B: y.b });
        expect(Math.abs(deltaE2000(x, y) - ref)).toBeLessThan(1e-4);
      }
  });
  it("the same swatch is chosen as the nearest under both libraries", () => {
    const chart = parseChart({
      format: "strip-chart/1",
      name: "test",
      strip: { widthMm: 5, lengthMm: 80, color: "#f4f3ee" },
      pads: [
        {
          analyte: "ph", label: "pH", unit: "pH", centerMm: 5, sizeMm: 5,
          swatches: [
            { value: 6.4, color: "#efd25a" }, { value: 7.0, color: "#eba64c" }, { value: 7.6, color: "#de6f47" }, { value: 8.2, color: "#b9385e" },
          ],
        },
      ],
    });
    const pad = chart.pads[0];
    const de = DeltaE;
    const samples = ["#eec257", "#e58848", "#c94e55", "#f0d860", "#d0605a"];
    for (const hex of samples) {
      const x = hexToLab(hex);
      const nearestOurs = pad.swatches.map((s) => deltaE2000(x, s.lab)).reduce((bi, d, i, arr) => (d < arr[bi] ? i : bi), 0);
      const nearestRef = pad.swatches
        .map((s) => de.getDeltaE00({ L: x.l, A: x.a, B: x.b }, { L: s.lab.l, A: s.lab.a, B: s.lab.b }) as number)
        .reduce((bi, d, i, arr) => (d < arr[bi] ? i : bi), 0);
      const nearestColorjs = pad.swatches
        .map((s) => {
          const c1 = new Color("lab-d65", [x.l, x.a, x.b]);
          const c2 = new Color("lab-d65", [s.lab.l, s.lab.a, s.lab.b]);
          return c1.deltaE(c2, "2000"); // colorjs.io works in D50 Lab: an independent pipeline
        })
        .reduce((bi, d, i, arr) => (d < arr[bi] ? i : bi), 0);
      expect(nearestOurs).toBe(nearestRef);
      expect(nearestOurs).toBe(nearestColorjs);
      const m = matchSwatches(pad, x);
      expect(Math.abs(m.swatchIndex - nearestOurs)).toBeLessThanOrEqual(1);
    }
  });
});

describe("white correction (Bradford)", () => {
  it("maps the measured white onto the known white and leaves identical whites alone", () => {
    const known = [0.9, 0.88, 0.83];
    const measured = [0.6, 0.5, 0.35];
    const m = whiteCorrectionMatrix(measured, known);
    const out = correctLinear(m, measured);
    for (let i = 0; i < 3; i++) expect(out[i]).toBeCloseTo(known[i], 10);
    const id = whiteCorrectionMatrix(known, known);
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) expect(id[i][j]).toBeCloseTo(i === j ? 1 : 0, 12);
  });
  it("rebuilds the CSS Color 4 D65->D50 Bradford matrix", () => {
    // Source: CSS Color 4 conversions.js D65_to_D50 (whites from chromaticities 0.3127/0.3290, 0.3457/0.3585).
    const D65: [number, number, number] = [0.3127 / 0.329, 1, (1 - 0.3127 - 0.329) / 0.329];
    const D50: [number, number, number] = [0.3457 / 0.3585, 1, (1 - 0.3457 - 0.3585) / 0.3585];
    const m = bradfordMatrix(D65, D50);
    const css = [
      [1.0479297925449969, 0.022946870601609652, -0.05019226628920524],
      [0.02962780877005599, 0.9904344267538799, -0.017073799063418826],
      [-0.009243040646204504, 0.015055191490298152, 0.7518742814281371],
    ];
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) expect(Math.abs(m[i][j] - css[i][j])).toBeLessThan(1e-12);
  });
});
