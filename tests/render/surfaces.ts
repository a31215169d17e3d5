/**
 * Surfaces a strip or a chart card lies on, as linear-light albedo over the plane (millimetres).
 * Colours are invented; textures are procedural (value noise), seeded per render.
 */
import { hexToLinear, type Rgb } from "./colour";
import { fbm, pixelHash, valueNoise, type Rng } from "./prng";

export type SurfaceName = "paper" | "counter" | "wood" | "cloth" | "tiles";
export const SURFACES: readonly SurfaceName[] = ["paper", "counter", "wood", "cloth", "tiles"];

/** Writes the albedo at plane point (X, Y) mm, seen at pixel (ix, iy), into out[0..2]. */
export type SurfaceFn = (X: number, Y: number, ix: number, iy: number, out: Float32Array) => void;

export type SurfaceInfo = { name: SurfaceName; base: string; fn: SurfaceFn };

/** `color` (#rrggbb) replaces the surface's randomly picked main colour. */
export function makeSurface(name: SurfaceName, rng: Rng, pxPerMm: number, color?: string): SurfaceInfo {
  const pick = (items: string[]) => {
    const c = rng.pick(items);
    return color ?? c;
  };
  const seed = rng.int(1, 1 << 30);
  const ang = rng.range(0, Math.PI);
  const ca = Math.cos(ang);
  const sa = Math.sin(ang);
  const ox = rng.range(-500, 500);
  const oy = rng.range(-500, 500);
  // Texture coordinates: rotated and shifted plane coordinates.
  const tx = (X: number, Y: number) => ca * X - sa * Y + ox;
  const ty = (X: number, Y: number) => sa * X + ca * Y + oy;
  const set = (out: Float32Array, c: Rgb, k: number) => {
    out[0] = c[0] * k;
    out[1] = c[1] * k;
    out[2] = c[2] * k;
  };

  switch (name) {
    case "paper": {
      const base = pick(["#ebe9e4", "#e6e4dc", "#f0eee9", "#e3e3df"]);
      const c = hexToLinear(base);
      return {
        name, base, fn: (X, Y, ix, iy, out) => {
          const u = tx(X, Y), v = ty(X, Y);
          const k = 1 + 0.035 * fbm(u / 6, v / 6, seed, 2) + 0.02 * (pixelHash(ix, iy, seed) - 0.5);
          set(out, c, k);
        },
      };
    }
    case "counter": {
      const base = pick(["#8c8f93", "#9a9894", "#7d8084", "#a5a5a0", "#6f7173"]);
      const c = hexToLinear(base);
      return {
        name, base, fn: (X, Y, ix, iy, out) => {
          const u = tx(X, Y), v = ty(X, Y);
          let k = 1 + 0.06 * fbm(u / 25, v / 25, seed, 3);
          const sp = valueNoise(u * 1.7, v * 1.7, seed + 7);
          if (sp > 0.93) k *= 0.75;
          else if (sp < 0.05) k *= 1.18;
          k += 0.03 * (pixelHash(ix, iy, seed) - 0.5);
          set(out, c, k);
        },
      };
    }
    case "wood": {
      const base = pick(["#b98454", "#a8703f", "#c89a6a", "#8a5a36", "#d2a878"]);
      const c = hexToLinear(base);
      const dark: Rgb = [c[0] * 0.62, c[1] * 0.55, c[2] * 0.5];
      const period = rng.range(2.5, 6);
      return {
        name, base, fn: (X, Y, ix, iy, out) => {
          const u = tx(X, Y), v = ty(X, Y);
          const warp = 6 * fbm(u / 80, v / 20, seed, 3);
          const ring = 0.5 + 0.5 * Math.sin(((v + warp * 3) / period) * 2 * Math.PI);
          const streak = fbm(u / 12, v * 1.5, seed + 3, 2);
          const t = Math.min(1, Math.max(0, Math.pow(ring, 3) * 0.7 + 0.25 * streak + 0.1));
          const k = 1 + 0.02 * (pixelHash(ix, iy, seed) - 0.5);
          out[0] = (c[0] + t * (dark[0] - c[0])) * k;
          out[1] = (c[1] + t * (dark[1] - c[1])) * k;
          out[2] = (c[2] + t * (dark[2] - c[2])) * k;
        },
      };
    }
    case "cloth": {
      const base = pick(["#2b3550", "#323230", "#263a2e", "#3a2a2e", "#2a2d38"]);
      const c = hexToLinear(base);
      // Keep the weave at least ~4 px per thread pair so it does not alias into moire.
      const thread = Math.max(0.9, 4 / pxPerMm);
      return {
        name, base, fn: (X, Y, ix, iy, out) => {
          const u = tx(X, Y), v = ty(X, Y);
          const weave = Math.sin((u / thread) * 2 * Math.PI) * Math.sin((v / thread) * 2 * Math.PI);
          const folds = fbm(u / 40, v / 40, seed, 3);
          const k = 1 + 0.12 * weave + 0.3 * folds + 0.12 * (pixelHash(ix, iy, seed) - 0.5);
          set(out, c, Math.max(0.2, k));
        },
      };
    }
    case "tiles": {
      const base = pick(["#e8e6e0", "#d9d4c8", "#b8c7cf", "#f2f2f0", "#c9d6c4"]);
      const c = hexToLinear(base);
      const grout = hexToLinear(rng.pick(["#9a968e", "#7f7b74", "#b3afa6", "#5e5b57"]));
      const size = rng.range(50, 150);
      const gw = rng.range(1.5, 4);
      const half = 0.5 / pxPerMm; // half a pixel in mm, for anti-aliased grout edges
      return {
        name, base, fn: (X, Y, ix, iy, out) => {
          const u = tx(X, Y), v = ty(X, Y);
          const iu = Math.floor(u / size), iv = Math.floor(v / size);
          const fu = u - iu * size, fv = v - iv * size;
          const d = Math.min(fu, size - fu, fv, size - fv) - gw / 2; // mm from grout edge
          const g = d <= -half ? 1 : d >= half ? 0 : (half - d) / (2 * half);
          const tile = 1 + 0.06 * (valueNoise(iu + 0.5, iv + 0.5, seed) - 0.5) + 0.03 * fbm(u / 30, v / 30, seed + 5, 2);
          const k = 1 + 0.015 * (pixelHash(ix, iy, seed) - 0.5);
          const gk = 1 + 0.2 * (valueNoise(u * 2, v * 2, seed + 9) - 0.5);
          out[0] = (c[0] * tile * (1 - g) + grout[0] * gk * g) * k;
          out[1] = (c[1] * tile * (1 - g) + grout[1] * gk * g) * k;
          out[2] = (c[2] * tile * (1 - g) + grout[2] * gk * g) * k;
        },
      };
    }
  }
}
