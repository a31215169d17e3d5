// Profiles along the strip's axis, one sample per working-image pixel of t: the inner band's
// colour, how much it differs from the surface beside the strip ("presence"), the contrast across
// both long edges, and the surface's brightness (for the local light).
import { bilinear } from "./bilinear";
import type { Axis } from "./geometry";
import type { RgbImage } from "./image";

/**
 * t0: the t of index 0; inner: mean colour of the inner band (3 per index, 0..255); presence:
 * smoothed max of the colour difference to the surface and the edge contrast; edge: smoothed edge
 * contrast alone; valid: all samples inside the photo; surface: brightness of the brighter side.
 */
export type Profile = { t0: number; n: number; inner: Float32Array; presence: Float32Array; edge: Float32Array; valid: Uint8Array; surface: Float32Array };

export function alongProfile(img: RgbImage, a: Axis, tMin: number, tMax: number): Profile {
  const n = Math.max(1, Math.floor(tMax - tMin) + 1);
  const inner = new Float32Array(n * 3), presence = new Float32Array(n), edges = new Float32Array(n), valid = new Uint8Array(n);
  // Brightness of the surface beside the strip (the brighter side; grout or a dark line on one side is skipped).
  const surface = new Float32Array(n);
  const vx = -a.uy, vy = a.ux;
  const w = a.width;
  // Offsets across the strip in typed arrays, looped over by index (an array's iterator cost a
  // measurable share of the profile).
  const inS = Float64Array.from([-0.3, -0.15, 0, 0.15, 0.3], (k) => k * w);
  const g1 = 0.5 * w + Math.max(2, 0.35 * w), g2 = 0.5 * w + Math.max(4, 0.7 * w);
  const outS = Float64Array.of(g1, g2);
  // A fixed, short reach (work pixels): a soft shadow edge has little contrast over it.
  const eD = Math.min(2, 0.1 * w), eIn = 0.5 * w - eD, eOut = 0.5 * w + eD;
  const px = new Float32Array(3);
  // Only the part of the axis whose centre line lies inside the photo (with a pixel to spare) can
  // hold a valid sample: the rest of the profile stays invalid without being sampled.
  let tLo = tMin, tHi = tMax;
  const clip = (c: number, u: number, size: number) => {
    if (Math.abs(u) < 1e-9) {
      if (c < -1 || c > size + 1) (tLo = Infinity), (tHi = -Infinity);
      return;
    }
    const ta = (-1 - c) / u, tb = (size + 1 - c) / u;
    tLo = Math.max(tLo, Math.min(ta, tb));
    tHi = Math.min(tHi, Math.max(ta, tb));
  };
  clip(a.cx, a.ux, img.width);
  clip(a.cy, a.uy, img.height);
  const iStart = Math.max(0, Math.floor(tLo - tMin) - 1), iEnd = Math.min(n - 1, Math.ceil(tHi - tMin) + 1);
  for (let i = iStart; i <= iEnd; i++) {
    const t = tMin + i;
    const bx = a.cx + t * a.ux, by = a.cy + t * a.uy;
    let r = 0, g = 0, b = 0, ok = true;
    for (let j = 0; j < inS.length; j++) {
      const s = inS[j];
      if (!bilinear(img, bx + s * vx, by + s * vy, px, 0)) {
        ok = false;
        break;
      }
      (r += px[0]), (g += px[1]), (b += px[2]);
    }
    if (!ok) continue;
    r /= inS.length, g /= inS.length, b /= inS.length;
    inner[i * 3] = r, (inner[i * 3 + 1] = g), (inner[i * 3 + 2] = b);
    let best = Infinity, any = false;
    for (let side = -1; side <= 1; side += 2) {
      let or = 0, og = 0, ob = 0, m = 0;
      for (let j = 0; j < 2; j++) if (bilinear(img, bx + side * outS[j] * vx, by + side * outS[j] * vy, px, 0)) (or += px[0]), (og += px[1]), (ob += px[2]), m++;
      if (!m) continue;
      any = true;
      const sl = (or + og + ob) / (3 * m);
      if (sl > surface[i]) surface[i] = sl;
      const dr = r - or / m, dg = g - og / m, db = b - ob / m;
      const d = Math.sqrt(dr * dr + dg * dg + db * db);
      if (d < best) best = d;
    }
    if (!any) continue;
    // Edge contrast just inside against just outside both long edges: the strip's edges are
    // sharp and straight, so this holds where the strip's colour is close to the surface's.
    let edge = 0, ne = 0;
    for (let side = -1; side <= 1; side += 2) {
      if (!bilinear(img, bx + side * eIn * vx, by + side * eIn * vy, px, 0)) continue;
      const ir = px[0], ig = px[1], ib = px[2];
      if (!bilinear(img, bx + side * eOut * vx, by + side * eOut * vy, px, 0)) continue;
      const er = ir - px[0], eg = ig - px[1], eb = ib - px[2];
      edge += Math.sqrt(er * er + eg * eg + eb * eb);
      ne++;
    }
    edges[i] = ne ? edge / ne : 0;
    presence[i] = Math.max(best, edges[i]);
    valid[i] = 1;
  }
  // Light smoothing: the mean of the valid samples within ±k, from running sums (linear in n).
  const k = Math.max(1, Math.round(w * 0.08));
  const count = new Int32Array(n + 1);
  for (let i = 0; i < n; i++) count[i + 1] = count[i] + valid[i];
  const smooth = (src: Float32Array) => {
    const sum = new Float64Array(n + 1);
    for (let i = 0; i < n; i++) sum[i + 1] = sum[i] + (valid[i] ? src[i] : 0);
    const sm = new Float32Array(n);
    for (let i = 0; i < n; i++) {
      const j0 = Math.max(0, i - k), j1 = Math.min(n, i + k + 1);
      const c = count[j1] - count[j0];
      sm[i] = c ? (sum[j1] - sum[j0]) / c : 0;
    }
    return sm;
  };
  return { t0: tMin, n, inner, presence: smooth(presence), edge: smooth(edges), valid, surface };
}
