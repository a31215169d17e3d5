/**
 * Colour helpers of the renderer. sRGB transfer function from IEC 61966-2-1; CIELAB (D65) conversions
 * from culori, a general-purpose colour library, so the renderer's colours do not come from the
 * reading engine's own code.
 */
import { converter, formatHex } from "culori";
import { clamp01 } from "./pixels";
import type { RenderPad } from "./types";

export type Rgb = [number, number, number];

const toLab = converter("lab65");
const toLrgb = converter("lrgb");

/** sRGB-encoded component (0..1) to linear light (IEC 61966-2-1). */
export function srgbToLinear(c: number): number {
  return c <= 0.04045 ? c / 12.92 : Math.pow((c + 0.055) / 1.055, 2.4);
}

/** Linear light (0..1) to sRGB-encoded component (IEC 61966-2-1). */
export function linearToSrgb(c: number): number {
  if (c <= 0) return 0;
  if (c >= 1) return 1;
  return c <= 0.0031308 ? 12.92 * c : 1.055 * Math.pow(c, 1 / 2.4) - 0.055;
}

export function hexToSrgb(hex: string): Rgb {
  const n = parseInt(hex.slice(1), 16);
  return [((n >> 16) & 255) / 255, ((n >> 8) & 255) / 255, (n & 255) / 255];
}

export function hexToLinear(hex: string): Rgb {
  const s = hexToSrgb(hex);
  return [srgbToLinear(s[0]), srgbToLinear(s[1]), srgbToLinear(s[2])];
}

export function linearToHex(rgb: Rgb): string {
  const c = rgb.map((v) => Math.round(linearToSrgb(v) * 255));
  return "#" + c.map((v) => v.toString(16).padStart(2, "0")).join("");
}

/**
 * A lookup table from 16-bit linear light to 8-bit sRGB, so encoding a 12 MP frame costs one array
 * read per channel.
 */
let lut16: Uint8Array | null = null;
export function linear16ToSrgb8Lut(): Uint8Array {
  if (!lut16) {
    lut16 = new Uint8Array(65536);
    for (let i = 0; i < 65536; i++) lut16[i] = Math.round(linearToSrgb(i / 65535) * 255);
  }
  return lut16;
}

/** Piecewise-linear map from a fractional swatch index to the pad's value (the eval scorer's scale). */
export function indexToValue(pad: RenderPad, index: number): number {
  const s = pad.swatches;
  const i = Math.max(0, Math.min(s.length - 1, index));
  const k = Math.min(Math.floor(i), s.length - 2);
  const t = i - k;
  return s[k]!.value + t * (s[k + 1]!.value - s[k]!.value);
}

/** Inverse of indexToValue: a value's fractional position on the pad's swatch list (clamped). */
export function valueToIndex(pad: RenderPad, value: number): number {
  const s = pad.swatches;
  if (value <= s[0]!.value) return 0;
  for (let k = 0; k < s.length - 1; k++) {
    const lo = s[k]!.value;
    const hi = s[k + 1]!.value;
    if (value <= hi) return hi === lo ? k : k + (value - lo) / (hi - lo);
  }
  return s.length - 1;
}

export type PadMix = "lab" | "linear";

/**
 * The pad's colour at a fractional swatch index, as linear RGB: the two neighbouring swatches mixed
 * in CIELAB (default) or in linear RGB.
 */
export function padColourAt(pad: RenderPad, index: number, mix: PadMix = "lab"): Rgb {
  const s = pad.swatches;
  const i = Math.max(0, Math.min(s.length - 1, index));
  const k = Math.min(Math.floor(i), s.length - 2);
  const t = i - k;
  const a = s[k]!.color;
  const b = s[k + 1]!.color;
  if (mix === "linear") {
    const la = hexToLinear(a);
    const lb = hexToLinear(b);
    return [la[0] + t * (lb[0] - la[0]), la[1] + t * (lb[1] - la[1]), la[2] + t * (lb[2] - la[2])];
  }
  const A = toLab(a)!;
  const B = toLab(b)!;
  const lab = { mode: "lab65" as const, l: A.l + t * (B.l - A.l), a: A.a + t * (B.a - A.a), b: A.b + t * (B.b - A.b) };
  const rgb = toLrgb(lab);
  return [clamp01(rgb.r), clamp01(rgb.g), clamp01(rgb.b)];
}

/** Hex of a pad's colour at a fractional index (for reports). */
export function padHexAt(pad: RenderPad, index: number, mix: PadMix = "lab"): string {
  const [r, g, b] = padColourAt(pad, index, mix);
  return formatHex({ mode: "lrgb", r, g, b }) ?? linearToHex([r, g, b]);
}

