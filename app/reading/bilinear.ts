// Sampling the working image between pixel centres.
import type { RgbImage } from "./image";

/**
 * The image's colour at (x, y) (pixel centres at integer + 0.5), bilinearly interpolated into
 * out[o..o+2]; false outside the image.
 */
export function bilinear(img: RgbImage, x: number, y: number, out: Float32Array, o: number): boolean {
  const W = img.width, H = img.height, data = img.data;
  x -= 0.5;
  y -= 0.5;
  if (x < 0 || y < 0 || x > W - 1.001 || y > H - 1.001) return false;
  const x0 = Math.floor(x), y0 = Math.floor(y);
  const fx = x - x0, fy = y - y0;
  const i00 = (y0 * W + x0) * 3, i01 = i00 + 3, i10 = i00 + W * 3, i11 = i10 + 3;
  const w00 = (1 - fx) * (1 - fy), w01 = fx * (1 - fy), w10 = (1 - fx) * fy, w11 = fx * fy;
  for (let c = 0; c < 3; c++) out[o + c] = data[i00 + c] * w00 + data[i01 + c] * w01 + data[i10 + c] * w10 + data[i11 + c] * w11;
  return true;
}

const tmp = new Float32Array(3);
/** Whiteness (luma minus 0.6 × chroma, 0..1) at (x, y); NaN outside the image. */
export function whitenessAt(img: RgbImage, x: number, y: number): number {
  if (!bilinear(img, x, y, tmp, 0)) return NaN;
  const r = tmp[0], g = tmp[1], b = tmp[2];
  const mx = Math.max(r, g, b), mn = Math.min(r, g, b);
  return (0.2126 * r + 0.7152 * g + 0.0722 * b - 0.6 * (mx - mn)) / 255;
}
