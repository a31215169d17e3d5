// Colour maths for strip reading, on culori 4.
//
// White point: every Lab value in the reading engine is CIELAB relative to D65
// (culori mode 'lab65'). culori's plain 'lab' mode is D50 and is never used here;
// culori's difference functions convert their inputs to 'lab65', so Lab objects
// are always handed to them tagged { mode: "lab65" }.
//
// Matrices: sRGB (IEC 61966-2-1) linear RGB <-> XYZ D65 and the Bradford cone
// matrix, as in the CSS Color 4 specification's sample conversion code
// (w3c/csswg-drafts css-color-4/conversions.js).
import { converter, differenceCiede2000, formatHex, parse } from "culori";

export type Lab = { l: number; a: number; b: number };
export type Rgb = [number, number, number];
export type Mat3 = number[][];

const toLab65 = converter("lab65");
const toRgb = converter("rgb");
const ciede2000 = differenceCiede2000();

/** sRGB transfer function, encoded 0..1 -> linear 0..1 (IEC 61966-2-1). Extended to negatives by symmetry. */
export function srgbToLinear(v: number): number {
  const a = Math.abs(v);
  const r = a <= 0.04045 ? a / 12.92 : Math.pow((a + 0.055) / 1.055, 2.4);
  return v < 0 ? -r : r;
}

/** Inverse sRGB transfer function, linear 0..1 -> encoded 0..1. */
export function linearToSrgb(v: number): number {
  const a = Math.abs(v);
  const r = a <= 0.0031308 ? a * 12.92 : 1.055 * Math.pow(a, 1 / 2.4) - 0.055;
  return v < 0 ? -r : r;
}

/** Lookup table: 8-bit encoded sRGB -> linear light. */
export const SRGB8_TO_LINEAR: Float32Array = (() => {
  const t = new Float32Array(256);
  for (let i = 0; i < 256; i++) t[i] = srgbToLinear(i / 255);
  return t;
})();

// CSS Color 4 conversions.js: lin_sRGB_to_XYZ / XYZ_to_lin_sRGB (D65).
export const LINEAR_SRGB_TO_XYZ: Mat3 = [
  [506752 / 1228815, 87881 / 245763, 12673 / 70218],
  [87098 / 409605, 175762 / 245763, 12673 / 175545],
  [7918 / 409605, 87881 / 737289, 1001167 / 1053270],
];
export const XYZ_TO_LINEAR_SRGB: Mat3 = [
  [12831 / 3959, -329 / 214, -1974 / 3959],
  [-851781 / 878810, 1648619 / 878810, 36519 / 878810],
  [705 / 12673, -2585 / 12673, 705 / 667],
];
// Bradford cone-response matrix M_A (CSS Color 4 conversions.js, Lindbloom).
const BRADFORD: Mat3 = [
  [0.8951, 0.2664, -0.1614],
  [-0.7502, 1.7135, 0.0367],
  [0.0389, -0.0685, 1.0296],
];

export function mulMat(a: Mat3, b: Mat3): Mat3 {
  const r: Mat3 = [
    [0, 0, 0],
    [0, 0, 0],
    [0, 0, 0],
  ];
  for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) r[i][j] = a[i][0] * b[0][j] + a[i][1] * b[1][j] + a[i][2] * b[2][j];
  return r;
}
export function mulVec(m: Mat3, v: readonly number[]): Rgb {
  return [
    m[0][0] * v[0] + m[0][1] * v[1] + m[0][2] * v[2],
    m[1][0] * v[0] + m[1][1] * v[1] + m[1][2] * v[2],
    m[2][0] * v[0] + m[2][1] * v[1] + m[2][2] * v[2],
  ];
}
export function invertMat(m: Mat3): Mat3 {
  const [[a, b, c], [d, e, f], [g, h, i]] = m;
  const A = e * i - f * h, B = -(d * i - f * g), C = d * h - e * g;
  const det = a * A + b * B + c * C;
  if (!Number.isFinite(det) || Math.abs(det) < 1e-15) throw new Error("matrix is not invertible");
  return [
    [A / det, -(b * i - c * h) / det, (b * f - c * e) / det],
    [B / det, (a * i - c * g) / det, -(a * f - c * d) / det],
    [C / det, -(a * h - b * g) / det, (a * e - b * d) / det],
  ];
}
const BRADFORD_INV = invertMat(BRADFORD);

/**
 * Bradford chromatic adaptation matrix (in XYZ) taking colours seen under a source
 * white to the corresponding colours under a destination white:
 * M = M_A^-1 · diag(ρd/ρs, γd/γs, βd/βs) · M_A. The whites need not share the same Y:
 * a brighter destination white also corrects exposure (von Kries scaling in cone space).
 */
export function bradfordMatrix(sourceWhiteXyz: [number, number, number], destWhiteXyz: [number, number, number]): number[][] {
  const s = mulVec(BRADFORD, sourceWhiteXyz);
  const d = mulVec(BRADFORD, destWhiteXyz);
  const diag: Mat3 = [
    [d[0] / s[0], 0, 0],
    [0, d[1] / s[1], 0],
    [0, 0, d[2] / s[2]],
  ];
  return mulMat(BRADFORD_INV, mulMat(diag, BRADFORD));
}

export type WhiteCorrection = "channel" | "bradford";

/**
 * White-reference light correction in linear sRGB: returns the 3×3 matrix that maps a
 * measured linear RGB of a white (or near-white) reference to its known colour, applied
 * to every other colour measured under the same light (and exposure).
 *
 * "channel" (the default) is von Kries scaling of each linear camera channel: a colour
 * cast in a photo is the light and the camera's white balance acting on the camera's own
 * channels, so a diagonal scale there undoes it. "bradford" adapts in the Bradford cone
 * space instead (CIE chromatic adaptation of the same white), wrapped in the sRGB matrices.
 * On the project's rendered photos the channel form reads pads and chart swatches closer to
 * the truth (tests/bench/make-set.ts scored with ../shared/eval/score.mjs; calibrate.test.ts).
 */
export function whiteCorrectionMatrix(
  measuredWhiteLinear: readonly number[],
  knownWhiteLinear: readonly number[],
  method: WhiteCorrection = "channel",
): Mat3 {
  const src = mulVec(LINEAR_SRGB_TO_XYZ, measuredWhiteLinear);
  const dst = mulVec(LINEAR_SRGB_TO_XYZ, knownWhiteLinear);
  if (!(src[1] > 1e-6)) throw new Error("white reference is black");
  if (method === "channel") {
    return [0, 1, 2].map((i) => [0, 1, 2].map((j) => (i === j ? knownWhiteLinear[i] / Math.max(1e-6, measuredWhiteLinear[i]) : 0))) as Mat3;
  }
  return mulMat(XYZ_TO_LINEAR_SRGB, mulMat(bradfordMatrix(src, dst), LINEAR_SRGB_TO_XYZ));
}

/** Applies a white correction (see whiteCorrectionMatrix) to a linear RGB triple. */
export function correctLinear(m: Mat3, rgb: readonly number[]): Rgb {
  return mulVec(m, rgb);
}

function strip(c: { l: number; a: number; b: number }): Lab {
  return { l: c.l, a: c.a, b: c.b };
}

/** Parses an sRGB hex colour (#rgb or #rrggbb); throws on anything else. */
export function hexToRgb(hex: string): Rgb {
  if (typeof hex !== "string" || !/^#([0-9a-f]{3}|[0-9a-f]{6})$/i.test(hex.trim())) throw new Error(`"${hex}" is not a colour like #f3f2ec`);
  const c = parse(hex.trim());
  const rgb = c && toRgb(c);
  if (!rgb) throw new Error(`"${hex}" is not a colour like #f3f2ec`);
  return [rgb.r, rgb.g, rgb.b];
}

export function hexToLab(hex: string): Lab {
  const [r, g, b] = hexToRgb(hex);
  return srgbToLab(r, g, b);
}

/** Encoded sRGB 0..1 -> CIELAB D65. */
export function srgbToLab(r: number, g: number, b: number): Lab {
  return strip(toLab65({ mode: "rgb", r, g, b }));
}

/** Linear-light sRGB 0..1 -> CIELAB D65. */
export function linearRgbToLab(r: number, g: number, b: number): Lab {
  return strip(toLab65({ mode: "lrgb", r, g, b }));
}

/** CIELAB D65 -> linear sRGB (unclamped). */
export function labToLinearRgb(lab: Lab): Rgb {
  const c = converter("lrgb")({ mode: "lab65", l: lab.l, a: lab.a, b: lab.b });
  return [c.r, c.g, c.b];
}

/** CIELAB D65 -> sRGB hex (clamped to the sRGB gamut by channel). */
export function labToHex(lab: Lab): string {
  const c = toRgb({ mode: "lab65", l: lab.l, a: lab.a, b: lab.b });
  const cl = (v: number) => Math.min(1, Math.max(0, Number.isFinite(v) ? v : 0));
  return formatHex({ mode: "rgb", r: cl(c.r), g: cl(c.g), b: cl(c.b) });
}

/** CIEDE2000 colour difference (kL = kC = kH = 1) between two CIELAB D65 colours. */
export function deltaE2000(x: Lab, y: Lab): number {
  return ciede2000({ mode: "lab65", l: x.l, a: x.a, b: x.b }, { mode: "lab65", l: y.l, a: y.a, b: y.b });
}

/**
 * CIEDE2000 from one colour `x` to points along segments (lerpLab(p, q, t)), for searches that
 * evaluate thousands of such points: culori's objects are made once and refilled, not made anew
 * per point (the same values as deltaE2000(x, lerpLab(p, q, t))).
 */
export function deltaE2000Along(x: Lab): (p: Lab, q: Lab, t: number) => number {
  const from = { mode: "lab65" as const, l: x.l, a: x.a, b: x.b }, to = { mode: "lab65" as const, l: 0, a: 0, b: 0 };
  return (p, q, t) => {
    (to.l = p.l + (q.l - p.l) * t), (to.a = p.a + (q.a - p.a) * t), (to.b = p.b + (q.b - p.b) * t);
    return ciede2000(from, to);
  };
}

export function lerpLab(x: Lab, y: Lab, t: number): Lab {
  return { l: x.l + (y.l - x.l) * t, a: x.a + (y.a - x.a) * t, b: x.b + (y.b - x.b) * t };
}
