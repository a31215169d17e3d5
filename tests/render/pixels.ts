// Per-pixel pieces both renderers use: a rounded rectangle lying on the surface (its
// anti-aliased coverage and the soft drop shadow it casts), and 16-bit output.

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
