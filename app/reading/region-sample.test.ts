// A region's robust sample on small synthetic images: which pixels a quad holds, and the values
// taken from them.
import { describe, expect, it } from "vitest";
import { SRGB8_TO_LINEAR } from "./colour";
import { sampleQuad } from "./region-sample";

function image(w: number, h: number, at: (x: number, y: number) => [number, number, number]) {
  const data = new Uint8Array(w * h * 3);
  for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) data.set(at(x, y), (y * w + x) * 3);
  return { width: w, height: h, data };
}

/** Pixels whose centres lie inside all four sides' half-planes, one by one (the definition). */
function bruteCount(w: number, h: number, q: [number, number][]): number {
  let area = 0;
  for (let i = 0; i < 4; i++) area += q[i][0] * q[(i + 1) % 4][1] - q[(i + 1) % 4][0] * q[i][1];
  const sgn = area >= 0 ? 1 : -1;
  let n = 0;
  for (let y = 0; y < h; y++)
    for (let x = 0; x < w; x++) {
      let inside = true;
      for (let i = 0; i < 4; i++) {
        const [ax, ay] = q[i], [bx, by] = q[(i + 1) % 4];
        if (sgn * ((bx - ax) * (y + 0.5 - ay) - (by - ay) * (x + 0.5 - ax)) < 0) inside = false;
      }
      if (inside) n++;
    }
  return n;
}

describe("sampleQuad", () => {
  it("takes exactly the pixels whose centres lie inside the quad, turned at any angle and partly outside the image", () => {
    const w = 60, h = 40, img = image(w, h, () => [120, 130, 140]);
    let seed = 3;
    const rnd = () => (seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31;
    for (let t = 0; t < 200; t++) {
      const cx = rnd() * 70 - 5, cy = rnd() * 50 - 5, a = rnd() * Math.PI, hw = 1 + rnd() * 15, hh = 1 + rnd() * 15;
      const ux = Math.cos(a), uy = Math.sin(a);
      const q = [[-1, -1], [1, -1], [1, 1], [-1, 1]].map(([p, r]) => [cx + p * hw * ux - r * hh * uy, cy + p * hw * uy + r * hh * ux] as [number, number]);
      const n = bruteCount(w, h, q);
      const s = sampleQuad(img, q);
      expect(s ? s.pixels : 0).toBe(n);
    }
  });
  it("gives a uniform region's own colour in linear light (IEC 61966-2-1 transfer), with no spread", () => {
    const img = image(20, 20, () => [200, 100, 50]);
    const s = sampleQuad(img, [[2, 2], [18, 2], [18, 18], [2, 18]])!;
    expect(s.pixels).toBe(256);
    expect(s.linear[0]).toBeCloseTo(SRGB8_TO_LINEAR[200], 6);
    expect(s.linear[1]).toBeCloseTo(SRGB8_TO_LINEAR[100], 6);
    expect(s.linear[2]).toBeCloseTo(SRGB8_TO_LINEAR[50], 6);
    expect(s.spreadDeltaE).toBeCloseTo(0, 6);
  });
  it("sets clipped pixels aside, but keeps them for a white reference", () => {
    // Left half a clipped white, right half a pale grey.
    const img = image(20, 10, (x) => (x < 10 ? [255, 255, 255] : [200, 200, 200]));
    const quad: [number, number][] = [[0, 0], [20, 0], [20, 10], [0, 10]];
    const pad = sampleQuad(img, quad)!;
    expect(pad.clippedFraction).toBeCloseTo(0.5, 6);
    expect(pad.linear[0]).toBeCloseTo(SRGB8_TO_LINEAR[200], 6);
    const white = sampleQuad(img, quad, { whiteReference: true })!;
    expect(white.kept).toBe(200);
  });
});
