// The one-dimensional projective map of a line seen through a camera, fitted exactly, by least
// squares and by consensus over candidate positions with wrong ones among them.
// Source: the map of a line under a plane homography is a 1-D projective transformation
// t = (a·m + b)/(c·m + d), and fits are normalised to zero mean and unit spread first
// ("Multiple View Geometry in Computer Vision", 2nd ed., projective transformations of the line
// and normalisation of the DLT; sections from memory). The expected positions below come from a
// plane homography of a tilted camera, read off along its centre line.
import { describe, expect, it } from "vitest";
import { applyMap, consensusMap, fitMap, invertMap, mapSlope, matchLandmarks, through3, type Candidates, type Map1D } from "./projective-1d";

/** Image x of the point (m, 0) under a homography H (row-major 3×3) of a tilted camera. */
const H = [3.2, 0.4, 180, -0.3, 3.1, 240, 0.0021, -0.0004, 1];
const lineX = (m: number) => (H[0] * m + H[2]) / (H[6] * m + H[8]);

describe("fitMap", () => {
  it("recovers a homography's map along a line from three points, and from many by least squares", () => {
    const exact = fitMap([0, 40, 95], [lineX(0), lineX(40), lineX(95)])!;
    for (const m of [5, 20, 60, 90]) expect(applyMap(exact, m)).toBeCloseTo(lineX(m), 6);
    const direct = through3([0, 40, 95], [lineX(0), lineX(40), lineX(95)])!;
    for (const m of [5, 20, 60, 90]) expect(applyMap(direct, m)).toBeCloseTo(lineX(m), 6);
    const ms = [0, 4, 9, 14, 21, 33, 47, 60, 88];
    const many = fitMap(ms, ms.map(lineX))!;
    for (const m of [2, 50, 94]) expect(applyMap(many, m)).toBeCloseTo(lineX(m), 6);
    // The local scale shrinks towards the far end (c > 0): the far pads lie closer together.
    expect(mapSlope(many, 90)).toBeLessThan(mapSlope(many, 0));
  });
  it("fits a uniform scale and offset when asked, and inverts", () => {
    const aff = fitMap([0, 10, 20], [100, 135, 170], true)!;
    expect(aff.c).toBe(0);
    expect(applyMap(aff, 30)).toBeCloseTo(205, 9);
    const p: Map1D = { a: 3, b: 50, c: 0.002, d: 1 };
    expect(applyMap(invertMap(p), applyMap(p, 37))).toBeCloseTo(37, 9);
  });
  it("refuses too few points", () => {
    expect(fitMap([1, 2], [3, 4])).toBeNull();
    expect(fitMap([1], [3], true)).toBeNull();
  });
});

describe("consensusMap", () => {
  // Pad boundaries of a six-pad strip (mm), as common practice for strips: 5 mm pads 2 mm apart.
  const marks = [1.5, 6.5, 8.5, 13.5, 15.5, 20.5, 22.5, 27.5, 29.5, 34.5, 36.5, 41.5];
  it("finds the map among wrong candidates and missing landmarks", () => {
    // Each landmark: its true position plus a stray one 5 to 13 px away (texture, a glare spot's
    // rim); two landmarks not seen (a pale pad on pale plastic) and one only as a stray position.
    const cands: Candidates[] = marks.map((mm, i) => ({
      mm,
      ts: i === 3 || i === 8 ? [] : i === 5 ? [lineX(mm) + 9] : [lineX(mm) + 0.2 * Math.sin(i * 1.7), lineX(mm) + (i % 2 ? -1 : 1) * (5 + ((i * 7) % 9))],
    }));
    const fit = consensusMap(cands, 2.5, { range: [0, 95] })!;
    expect(fit).not.toBeNull();
    expect(fit.inliers.length).toBe(9);
    expect(fit.rms).toBeLessThan(0.3);
    for (const m of [4, 18, 39]) expect(Math.abs(applyMap(fit.map, m) - lineX(m))).toBeLessThan(0.3);
    // A uniform scale cannot follow the perspective as closely.
    const aff = consensusMap(cands, 2.5, { range: [0, 95], affine: true })!;
    const inl = matchLandmarks(aff.map, cands, 2.5);
    expect(aff.rms > fit.rms || inl.length < fit.inliers.length).toBe(true);
  });
  it("gives nothing when too few landmarks are seen", () => {
    expect(consensusMap([{ mm: 1, ts: [10] }, { mm: 2, ts: [13] }, { mm: 3, ts: [] }], 2, { range: [0, 10] })).toBeNull();
  });
});
