// The search copy on small synthetic arrays (values worked out by hand).
import { describe, expect, it } from "vitest";
import { boxMean, makeSearchCopy, searchFactor } from "./search-copy";

function solid(width: number, height: number, rgb: [number, number, number]) {
  const data = new Uint8Array(width * height * 3);
  for (let i = 0; i < width * height; i++) data.set(rgb, i * 3);
  return { width, height, data };
}

describe("searchFactor", () => {
  it("takes the smallest whole reduction that brings the long side to 400 px or less", () => {
    expect(searchFactor(400, 300)).toBe(1);
    expect(searchFactor(401, 300)).toBe(2);
    expect(searchFactor(1000, 1334)).toBe(4); // 250 × 333
    expect(searchFactor(1024, 768)).toBe(3); // 341 × 256
    expect(searchFactor(1200, 1600)).toBe(4);
    expect(searchFactor(1600, 1200, 200)).toBe(8);
    expect(searchFactor(120, 90)).toBe(1);
  });
});

describe("makeSearchCopy", () => {
  it("reduces by a whole factor towards the target long side", () => {
    const s = makeSearchCopy(solid(1600, 1200, [128, 128, 128]), 400);
    expect(s.factor).toBe(4);
    expect([s.w, s.h]).toEqual([400, 300]);
    expect(s.whiteness.length).toBe(400 * 300);
  });
  it("white is whiter than grey, and grey whiter than a saturated colour of the same luminance", () => {
    const white = makeSearchCopy(solid(40, 40, [255, 255, 255]), 10).whiteness[0];
    const grey = makeSearchCopy(solid(40, 40, [128, 128, 128]), 10).whiteness[0];
    const orange = makeSearchCopy(solid(40, 40, [230, 110, 20]), 10).whiteness[0];
    // Linear luminance of white is 1 (IEC 61966-2-1), plus the floor 0.002.
    expect(white).toBeCloseTo(1.002, 2);
    expect(grey).toBeGreaterThan(orange * 0.9);
    expect(white).toBeGreaterThan(grey);
  });
});

describe("makeSearchCopy of 3 × 3 and 4 × 4 blocks", () => {
  it("gives each uniform block the whiteness of its colour", () => {
    const colours: [number, number, number][] = [[250, 250, 245], [30, 40, 50], [230, 110, 20], [128, 128, 128], [0, 200, 90], [90, 60, 220], [255, 0, 0], [12, 250, 251], [77, 77, 200]];
    for (const f of [3, 4]) {
      const side = 3 * f, img = solid(side, side, [0, 0, 0]);
      for (let y = 0; y < side; y++) for (let x = 0; x < side; x++) img.data.set(colours[Math.floor(y / f) * 3 + Math.floor(x / f)], (y * side + x) * 3);
      const s = makeSearchCopy(img, 3);
      expect(s.factor).toBe(f);
      colours.forEach((c, i) => expect(s.whiteness[i]).toBe(makeSearchCopy(solid(side, side, c), 3).whiteness[0]));
    }
  });
});

describe("boxMean", () => {
  it("is the plain mean of the box, clipped at the borders", () => {
    const src = Float32Array.from([1, 2, 3, 4, 5, 6, 7, 8, 9]);
    const m = boxMean(src, 3, 3, 1);
    expect(m[4]).toBeCloseTo(5, 6); // centre: all nine
    expect(m[0]).toBeCloseTo((1 + 2 + 4 + 5) / 4, 6); // corner: four
    expect(m[1]).toBeCloseTo((1 + 2 + 3 + 4 + 5 + 6) / 6, 6); // edge: six
  });
  it("gives the same means into a given array, after a larger image has been averaged", () => {
    const src = Float32Array.from([1, 2, 3, 4, 5, 6, 7, 8, 9]);
    const fresh = boxMean(src, 3, 3, 1);
    boxMean(new Float32Array(40 * 30).fill(7), 40, 30, 3); // leaves its integral image behind
    const out = new Float32Array(9);
    expect(boxMean(src, 3, 3, 1, out)).toBe(out);
    expect([...out]).toEqual([...fresh]);
    expect([...boxMean(src, 3, 3, 1)]).toEqual([...fresh]);
  });
  it("matches a box summed pixel by pixel, at every radius from none to wider than the image", () => {
    let seed = 11;
    const rand = () => (seed = (seed * 48271) % 2147483647) / 2147483647;
    for (const [w, h] of [[17, 9], [5, 23], [40, 31]])
      for (const r of [0, 1, 3, 8, 45]) {
        const src = Float32Array.from({ length: w * h }, rand);
        const m = boxMean(src, w, h, r);
        for (let y = 0; y < h; y++)
          for (let x = 0; x < w; x++) {
            let s = 0, n = 0;
            for (let yy = Math.max(0, y - r); yy <= Math.min(h - 1, y + r); yy++)
              for (let xx = Math.max(0, x - r); xx <= Math.min(w - 1, x + r); xx++) (s += src[yy * w + xx]), n++;
            expect(m[y * w + x]).toBeCloseTo(s / n, 5);
          }
      }
  });
});
