/**
 * The camera model shared by the strip and chart renderers: a plane (in millimetres) seen through a
 * homography, lit by an illuminant with a per-channel gain in linear light, uneven light, then optics
 * blur (sharp), sensor noise in linear light, sRGB encoding and JPEG (sharp).
 */
import sharp from "sharp";
import { linear16ToSrgb8Lut, type Rgb } from "./colour";
import { to16 } from "./pixels";
import type { Rng } from "./prng";
import type { Point } from "./types";

export type Mat3 = [number, number, number, number, number, number, number, number, number];

export function mul3(a: Mat3, b: Mat3): Mat3 {
  const r = new Array(9).fill(0) as Mat3;
  for (let i = 0; i < 3; i++)
    for (let j = 0; j < 3; j++) r[i * 3 + j] = a[i * 3]! * b[j]! + a[i * 3 + 1]! * b[3 + j]! + a[i * 3 + 2]! * b[6 + j]!;
  return r;
}

export function inv3(m: Mat3): Mat3 {
  const [a, b, c, d, e, f, g, h, i] = m;
  const A = e * i - f * h;
  const B = -(d * i - f * g);
  const C = d * h - e * g;
  const det = a * A + b * B + c * C;
  if (Math.abs(det) < 1e-12) throw new Error("singular homography");
  const k = 1 / det;
  return [
    A * k, -(b * i - c * h) * k, (b * f - c * e) * k,
    B * k, (a * i - c * g) * k, -(a * f - c * d) * k,
    C * k, -(a * h - b * g) * k, (a * e - b * d) * k,
  ];
}

export function apply(m: Mat3, x: number, y: number): Point {
  const w = m[6] * x + m[7] * y + m[8];
  return [(m[0] * x + m[1] * y + m[2]) / w, (m[3] * x + m[4] * y + m[5]) / w];
}

/** Homography taking the four `src` points to the four `dst` points (direct linear solve, h33 = 1). */
export function homographyFrom(src: Point[], dst: Point[]): Mat3 {
  const A: number[][] = [];
  for (let k = 0; k < 4; k++) {
    const [x, y] = src[k]!;
    const [u, v] = dst[k]!;
    A.push([x, y, 1, 0, 0, 0, -u * x, -u * y, u]);
    A.push([0, 0, 0, x, y, 1, -v * x, -v * y, v]);
  }
  // Gaussian elimination with partial pivoting on the 8x9 augmented matrix.
  for (let col = 0; col < 8; col++) {
    let piv = col;
    for (let r = col + 1; r < 8; r++) if (Math.abs(A[r]![col]!) > Math.abs(A[piv]![col]!)) piv = r;
    [A[col], A[piv]] = [A[piv]!, A[col]!];
    const p = A[col]![col]!;
    if (Math.abs(p) < 1e-12) throw new Error("degenerate points for homography");
    for (let r = 0; r < 8; r++) {
      if (r === col) continue;
      const f = A[r]![col]! / p;
      for (let c = col; c < 9; c++) A[r]![c]! -= f * A[col]![c]!;
    }
  }
  const h = A.map((row, i) => row[8]! / row[i]!);
  return [h[0]!, h[1]!, h[2]!, h[3]!, h[4]!, h[5]!, h[6]!, h[7]!, 1];
}

/**
 * Plane (mm, origin at the object's centre) to image pixels: scale by pxPerMm, rotate, move the
 * centre to `centre`, then tilt the whole frame by moving the image corners by up to
 * `perspective` x the shorter side (a mild homography, as a phone held slightly off-square).
 */
export function sceneHomography(
  width: number,
  height: number,
  pxPerMm: number,
  rotationDeg: number,
  centre: Point,
  perspective: number,
  rng: Rng,
): Mat3 {
  const t = (rotationDeg * Math.PI) / 180;
  const c = Math.cos(t) * pxPerMm;
  const s = Math.sin(t) * pxPerMm;
  const S: Mat3 = [c, -s, centre[0], s, c, centre[1], 0, 0, 1];
  if (perspective <= 0) return S;
  const m = perspective * Math.min(width, height);
  const src: Point[] = [[0, 0], [width, 0], [width, height], [0, height]];
  const dst: Point[] = src.map(([x, y]) => [x + rng.range(-m, m), y + rng.range(-m, m)] as Point);
  // Keep the object's centre where it was placed.
  const P0 = homographyFrom(src, dst);
  const moved = apply(P0, centre[0], centre[1]);
  const back: Mat3 = [1, 0, centre[0] - moved[0], 0, 1, centre[1] - moved[1], 0, 0, 1];
  return mul3(back, mul3(P0, S));
}

export type CastName = "daylight" | "warm" | "cool" | "fluorescent";

/**
 * Illuminant gains in linear light, relative to daylight and normalised to a largest channel of 1.
 * Invented approximations of common practice light sources (tungsten-like warm, overcast/shade-like
 * cool, greenish fluorescent); not measured spectra.
 */
export const CAST_GAINS: Record<CastName, Rgb> = {
  daylight: [1, 1, 1],
  warm: [1, 0.8, 0.55],
  cool: [0.8, 0.9, 1],
  fluorescent: [0.86, 1, 0.8],
};

export function castGains(cast: CastName, rng: Rng, jitter = 0.03): Rgb {
  const g = CAST_GAINS[cast].map((v) => v * (1 + rng.range(-jitter, jitter))) as Rgb;
  const m = Math.max(...g);
  return [g[0] / m, g[1] / m, g[2] / m];
}

/** Smooth light fall-off: a linear gradient and a radial vignette, both at most 1 (no extra light). */
export type LightField = { gradient: number; gradientAngleDeg: number; vignette: number };

export function makeLightFn(width: number, height: number, f: LightField): (x: number, y: number) => number {
  const a = (f.gradientAngleDeg * Math.PI) / 180;
  const dx = Math.cos(a);
  const dy = Math.sin(a);
  const cx = width / 2;
  const cy = height / 2;
  const half = (Math.abs(dx) * width + Math.abs(dy) * height) / 2 || 1;
  const r2max = cx * cx + cy * cy;
  return (x, y) => {
    const p = ((x - cx) * dx + (y - cy) * dy) / half; // -1..1
    const g = 1 - f.gradient * (0.5 - 0.5 * p);
    const r2 = ((x - cx) * (x - cx) + (y - cy) * (y - cy)) / r2max;
    return g * (1 - f.vignette * r2);
  };
}

/** Gaussian samples for sensor noise, drawn once per render from the seeded generator. */
function gaussTable(rng: Rng, n: number): Float32Array {
  const t = new Float32Array(n);
  for (let i = 0; i < n; i++) t[i] = rng.gauss();
  return t;
}

export type FinishOptions = {
  /** Gaussian blur sigma in pixels (optics / focus); below 0.3 no blur. */
  blur: number;
  /** Noise level: 0 none, 1 a typical phone in room light. */
  noise: number;
  /** JPEG quality 1..100. */
  quality: number;
};

/**
 * Blur (sharp, on 16-bit linear light), add sensor noise in linear light (read noise plus shot
 * noise growing with the square root of the signal), encode to sRGB and JPEG (sharp, 4:2:0 chroma).
 */
export async function finish(
  lin16: Uint16Array,
  width: number,
  height: number,
  opts: FinishOptions,
  rng: Rng,
): Promise<Buffer> {
  let img = lin16;
  if (opts.blur >= 0.3) {
    const out = await sharp(lin16, { raw: { width, height, channels: 3 } })
      .toColourspace("rgb16")
      .blur(opts.blur)
      .raw({ depth: "ushort" })
      .toBuffer();
    img = new Uint16Array(out.buffer, out.byteOffset, out.length / 2);
  }
  const lut = linear16ToSrgb8Lut();
  const px = new Uint8Array(width * height * 3);
  const n = img.length;
  if (opts.noise > 0) {
    const TN = 1 << 16;
    const table = gaussTable(rng, TN);
    const read = 0.0015 * opts.noise;
    const shot = 0.01 * opts.noise;
    let state = (Math.floor(rng.next() * 4294967296) | 1) >>> 0;
    for (let i = 0; i < n; i++) {
      state ^= state << 13;
      state ^= state >>> 17;
      state ^= state << 5;
      const v = img[i]! / 65535;
      let x = v + table[(state >>> 0) & (TN - 1)]! * (read + shot * Math.sqrt(v));
      x = x < 0 ? 0 : x > 1 ? 1 : x;
      px[i] = lut[Math.round(x * 65535)]!;
    }
  } else {
    for (let i = 0; i < n; i++) px[i] = lut[img[i]!]!;
  }
  return sharp(px, { raw: { width, height, channels: 3 } })
    .jpeg({ quality: Math.round(opts.quality), chromaSubsampling: "4:2:0" })
    .toBuffer();
}

export function checkSize(width: number, height: number): void {
  if (!Number.isInteger(width) || !Number.isInteger(height) || width < 64 || height < 64) {
    throw new Error(`photo size must be whole pixels, at least 64 x 64 (got ${width} x ${height})`);
  }
  if (width * height > 12_200_000) {
    throw new Error(`photo size ${width} x ${height} is over 12 megapixels`);
  }
}

/** Default phone-like frame sizes (4:3), about 2 to 3 megapixels. */
export function defaultSize(rng: Rng, orientation?: "portrait" | "landscape"): [number, number] {
  const [long, short] = rng.pick([[2016, 1512], [1920, 1440], [1800, 1350], [1632, 1224]] as const);
  const o = orientation ?? (rng.chance(0.5) ? "portrait" : "landscape");
  return o === "portrait" ? [short, long] : [long, short];
}

/** A specular glint on the surface plane (mm), its radius and peak in linear light. */
export type Spot = { X: number; Y: number; r: number; peak: number };

export type Scene = {
  width: number;
  height: number;
  /** image pixel → surface mm */
  Hi: Mat3;
  /** the albedo of the surface under the object, written into `out` (linear RGB) */
  surface: (X: number, Y: number, ix: number, iy: number, out: Float32Array) => void;
  lightFn: (x: number, y: number) => number;
  exposure: number;
  gains: Rgb;
  /** how much of the light reaches (X, Y): 1 in full light; shade is lit by a slightly bluer fill */
  shadowFn?: ((X: number, Y: number) => number) | null;
  spots?: Spot[];
};

/**
 * The camera's per-pixel pass shared by the strip and chart renderers: each pixel centre goes back
 * to the surface (X, Y in mm) through the inverse homography; the surface gives its albedo, `paint`
 * lays the object on it (linear RGB, changed in place), then light, shadow, glints and the
 * white-balance gains make the 16-bit linear pixel.
 */
export function renderScene(scene: Scene, paint: (X: number, Y: number, x: number, y: number, rgb: Float64Array) => void): Uint16Array {
  const { width, height, surface, lightFn, exposure, gains } = scene;
  const shadowFn = scene.shadowFn ?? null;
  const spots = scene.spots ?? [];
  const out = new Uint16Array(width * height * 3);
  const alb = new Float32Array(3);
  const rgb = new Float64Array(3);
  const [h0, h1, h2, h3, h4, h5, h6, h7, h8] = scene.Hi;
  for (let y = 0; y < height; y++) {
    const py = y + 0.5;
    for (let x = 0; x < width; x++) {
      const px = x + 0.5;
      const w = h6 * px + h7 * py + h8;
      const X = (h0 * px + h1 * py + h2) / w;
      const Y = (h3 * px + h4 * py + h5) / w;
      surface(X, Y, x, y, alb);
      rgb[0] = alb[0]!;
      rgb[1] = alb[1]!;
      rgb[2] = alb[2]!;
      paint(X, Y, x, y, rgb);
      const lv = lightFn(px, py) * exposure;
      const sh = shadowFn ? shadowFn(X, Y) : 1;
      // Shadowed areas are lit by skylight-like fill light: a slightly bluer shade.
      let rr = rgb[0]! * gains[0] * lv * sh;
      let gg = rgb[1]! * gains[1] * lv * sh;
      let bb = rgb[2]! * gains[2] * lv * (sh + (1 - sh) * 0.08);
      for (let s = 0; s < spots.length; s++) {
        const sp = spots[s]!;
        const dx = X - sp.X;
        const dy = Y - sp.Y;
        const d2 = dx * dx + dy * dy;
        if (d2 < 9 * sp.r * sp.r) {
          const e = sp.peak * Math.exp(-d2 / (2 * sp.r * sp.r)) * exposure;
          rr += e * gains[0];
          gg += e * gains[1];
          bb += e * gains[2];
        }
      }
      const o = (y * width + x) * 3;
      out[o] = to16(rr);
      out[o + 1] = to16(gg);
      out[o + 2] = to16(bb);
    }
  }
  return out;
}
