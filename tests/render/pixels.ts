// Per-pixel pieces both renderers use: a rounded rectangle lying on the surface (its
// anti-aliased coverage and the soft drop shadow it casts), the square patches printed on it,
// and 16-bit output.
import type { Rgb } from "./colour";
import { pixelHash } from "./prng";

export function clamp01(v: number): number {
  return v < 0 ? 0 : v > 1 ? 1 : v;
}

/** Linear light 0..1 → 16-bit sample. */
export function to16(v: number): number {
  return v <= 0 ? 0 : v >= 1 ? 65535 : Math.round(v * 65535);
}

/** Coverage (0..1, anti-aliased over one pixel) of the rectangle |X| ≤ halfA, |Y| ≤ halfB, in mm. */
export function rectCoverage(X: number, Y: number, halfA: number, halfB: number, pxPerMm: number): number {
  return clamp01(0.5 - Math.max(Math.abs(X) - halfA, Math.abs(Y) - halfB) * pxPerMm);
}

/**
 * Light left on the surface beside a rectangle whose shadow is offset by (dox, doy) mm:
 * 1 - depth·exp(-distance/softness) within `reach` mm of the shadow's edge, 1 beyond it.
 */
export function dropShadow(
  X: number, Y: number, dox: number, doy: number, halfA: number, halfB: number,
  shape: { reach: number; depth: number; softness: number },
): number {
  const so = Math.max(Math.abs(X - dox) - halfA, Math.abs(Y - doy) - halfB);
  return so < shape.reach ? 1 - shape.depth * Math.exp(-Math.max(0, so) / shape.softness) : 1;
}

export type FlatObject = {
  halfA: number;
  halfB: number;
  pxPerMm: number;
  /** where its drop shadow falls, in mm */
  dox: number;
  doy: number;
  shadow: { reach: number; depth: number; softness: number };
  /** its colour in linear RGB, and how much the per-pixel paper or plastic texture varies it */
  base: Rgb;
  texture: number;
  texSeed: number;
};

const face = new Float64Array(3);

/**
 * Lays a flat object (a strip or a card, centred on the origin) on the surface colour in `rgb`:
 * its drop shadow beside it; inside, its textured colour with `mark` printing its pads or
 * swatches on it (`patch`), blended in by the object's anti-aliased coverage.
 */
export function layFlatObject(rgb: Float64Array, X: number, Y: number, x: number, y: number, o: FlatObject, mark: (face: Float64Array) => void) {
  let r = rgb[0]!;
  let g = rgb[1]!;
  let b = rgb[2]!;
  const cov = rectCoverage(X, Y, o.halfA, o.halfB, o.pxPerMm);
  if (cov < 1) {
    const k = dropShadow(X, Y, o.dox, o.doy, o.halfA, o.halfB, o.shadow);
    r *= k;
    g *= k;
    b *= k;
  }
  if (cov > 0) {
    const tex = 1 + o.texture * (pixelHash(x, y, o.texSeed) - 0.5);
    face[0] = o.base[0] * tex;
    face[1] = o.base[1] * tex;
    face[2] = o.base[2] * tex;
    mark(face);
    r += cov * (face[0]! - r);
    g += cov * (face[1]! - g);
    b += cov * (face[2]! - b);
  }
  rgb[0] = r;
  rgb[1] = g;
  rgb[2] = b;
}

/**
 * Prints a square patch (half side `half` mm, its centre `dx`, `dy` mm away) of `colour` on
 * `face`, anti-aliased over one pixel; `shade` (asked only where the patch shows) varies it.
 */
export function patch(face: Float64Array, dx: number, dy: number, half: number, pxPerMm: number, colour: Rgb, shade?: () => number) {
  const pc = clamp01(0.5 - Math.max(Math.abs(dx) - half, Math.abs(dy) - half) * pxPerMm);
  if (pc > 0) {
    const m = shade ? shade() : 1;
    face[0] += pc * (colour[0] * m - face[0]!);
    face[1] += pc * (colour[1] * m - face[1]!);
    face[2] += pc * (colour[2] * m - face[2]!);
  }
}
