// The strip as a rigid plane seen in perspective: a homography from the chart's millimetres (x
// along the strip from the tip, y across it) to working-image pixels. Along the axis it is a
// one-dimensional projective map fitted by consensus over the pads' boundaries: each pad's leading
// and trailing edge is a step of colour in the inner band (against bare plastic, or against the
// next pad where pads touch), so no pad needs to stand apart as a blob of its own. Across the axis
// the strip's width shrinks with distance as the map's denominator says. Kept only when it follows
// the boundaries clearly better than the layout fit does; projective only when perspective
// explains them clearly better than one scale and offset refitted to them.
import type { Profile } from "./axis-profile";
import type { StripChart } from "./chart";
import type { Axis, Trace } from "./geometry";
import { pxPerMm, tAt, type Layout, type LayoutFit } from "./layout-fit";
import { applyMap, consensusMap, fitMap, invertMap, mapSlope, type Candidates, type Map1D } from "./projective-1d";
import { median } from "./stats";

/** A step of colour along the profile: where (t, px) and how large (RGB distance, 0..441). */
export type ColourStep = { t: number; strength: number };

/**
 * Steps of the inner band's colour: local maxima of |colour(t + h) − colour(t − h)| standing
 * clearly above the profile's usual change (texture, noise), to a tenth of a pixel; two within
 * 2h + 1 px of each other count as one.
 */
export function colourSteps(profile: Profile, h: number, from = 0, to = profile.n - 1): ColourStep[] {
  const { inner, valid } = profile;
  const i0 = Math.max(h, from), i1 = Math.min(profile.n - 1 - h, to);
  if (i1 - i0 < 3) return [];
  const d = new Float32Array(i1 - i0 + 1);
  for (let i = i0; i <= i1; i++) {
    if (!valid[i - h] || !valid[i + h]) continue;
    const a = (i - h) * 3, b = (i + h) * 3;
    d[i - i0] = Math.hypot(inner[b] - inner[a], inner[b + 1] - inner[a + 1], inner[b + 2] - inner[a + 2]);
  }
  const floor = Math.max(8, 3 * median(Array.from(d)));
  const out: ColourStep[] = [];
  for (let j = 1; j < d.length - 1; j++) {
    const v = d[j];
    if (v < floor) continue;
    let peak = true;
    for (let k = Math.max(0, j - h); k <= Math.min(d.length - 1, j + h) && peak; k++) if (d[k] > v || (d[k] === v && k < j)) peak = false;
    if (!peak) continue;
    const den = d[j - 1] - 2 * v + d[j + 1];
    const off = den < -1e-6 ? Math.max(-0.5, Math.min(0.5, (0.5 * (d[j - 1] - d[j + 1])) / den)) : 0;
    const t = profile.t0 + i0 + j + off, last = out[out.length - 1];
    // Two steps closer than the difference's reach are one boundary seen twice: two pads that
    // nearly touch, with a sliver of plastic between them (the strength-weighted middle).
    if (last && t - last.t <= 2 * h + 1) {
      (last.t = (last.t * last.strength + t * v) / (last.strength + v)), (last.strength = Math.max(last.strength, v));
    } else out.push({ t, strength: v });
  }
  return out;
}

/**
 * The chart's landmarks along the strip (mm): the tip, and each pad's edges (one where pads touch,
 * less than 0.4 mm apart). Two landmarks closer than `resolveMm` whose steps would be seen as one
 * (the tip just before a pad's edge) are both left out: which of them a step is cannot be told.
 */
export function chartBoundaries(layout: Layout, resolveMm = 0.4): number[] {
  const edges = layout.pads.flatMap(([a, b]) => [a, b]).sort((x, y) => x - y);
  const out: number[] = [0];
  for (const e of edges) {
    const last = out[out.length - 1];
    if (e - last < 0.4) out[out.length - 1] = (last + e) / 2;
    else out.push(e);
  }
  return out.filter((m, i) => !(i > 0 && m - out[i - 1] < resolveMm) && !(i < out.length - 1 && out[i + 1] - m < resolveMm));
}

export type StripPlane = {
  /** t (px along the axis from its centre) of a point x mm from the tip. */
  map: Map1D;
  /** The map is projective (else one scale and offset refitted to the boundaries). */
  perspective: boolean;
  /** Chart mm (x from the tip along the strip, y across from its middle) to working px, row-major 3×3. */
  H: number[];
  inliers: number;
  landmarks: number;
  /** RMS distance (px) of the matched boundaries from the model, and from the uniform fit. */
  rms: number;
  rmsUniform: number;
};

export const planePoint = (H: number[], x: number, y: number): [number, number] => {
  const w = H[6] * x + H[7] * y + H[8];
  return [(H[0] * x + H[1] * y + H[2]) / w, (H[3] * x + H[4] * y + H[5]) / w];
};

/**
 * The plane's homography from the axis, the map along it and the strip's width (measured around
 * the axis centre): a point (x, y) lies at centre + u·t(x) + v·y·k/(c·x + d), linear in
 * homogeneous coordinates.
 */
export function planeHomography(axis: Axis, map: Map1D, widthMm: number): number[] {
  const { a, b, c, d } = map;
  const xMid = applyMap(invertMap(map), 0);
  const k = (axis.width / widthMm) * (c * xMid + d);
  const vx = -axis.uy, vy = axis.ux;
  return [axis.cx * c + axis.ux * a, vx * k, axis.cx * d + axis.ux * b, axis.cy * c + axis.uy * a, vy * k, axis.cy * d + axis.uy * b, c, 0, d];
}

/**
 * The perspective model for a placement, or null when the uniform fit is to be kept: too few pad
 * boundaries found where the uniform fit puts them, a residual not small, not clearly better than
 * the uniform fit's, or a map that would stretch the pads implausibly.
 */
export function fitStripPlane(chart: StripChart, layout: Layout, profile: Profile, axis: Axis, fit: LayoutFit, trace?: Trace): StripPlane | null {
  const s = pxPerMm(fit);
  const h = Math.max(1, Math.round(0.25 * s));
  const marks = chartBoundaries(layout, (2 * h + 1) / s);
  const padEnd = Math.max(...layout.pads.map((p) => p[1]));
  // Steps only over the pads' stretch of the profile (and a little beyond), a few px apart.
  const tA = tAt(fit, -2), tB = tAt(fit, padEnd + 2);
  const steps = colourSteps(profile, h, Math.floor(Math.min(tA, tB) - profile.t0), Math.ceil(Math.max(tA, tB) - profile.t0));
  const win = Math.max(3, 1.5 * s), tol = Math.max(1.5, 0.2 * s);
  // Each landmark's candidates: the four strongest steps within the window.
  const near = (at: (mm: number) => number): Candidates[] =>
    marks.map((mm) => ({ mm, ts: steps.filter((st) => Math.abs(st.t - at(mm)) <= win).sort((x, y) => y.strength - x.strength).slice(0, 4).map((st) => st.t) }));
  const range: [number, number] = [0, chart.strip.lengthMm];
  let found = consensusMap(near((mm) => tAt(fit, mm)), tol, { range });
  if (!found) return null;
  // Around the first model's own positions once more: the far boundaries may lie beyond the
  // window around the uniform fit's.
  const first = found.map;
  if (found.inliers.length < marks.length) {
    const again = consensusMap(near((mm) => applyMap(first, mm)), tol, { range });
    if (again && again.inliers.length > found.inliers.length) found = again;
  }
  const { inliers } = found;
  const rmsOf = (p: Map1D | null) => (p ? Math.sqrt(inliers.reduce((acc, x) => acc + (applyMap(p, x.mm) - x.t) ** 2, 0) / inliers.length) : Infinity);
  const rmsUniform = Math.sqrt(inliers.reduce((acc, x) => acc + (tAt(fit, x.mm) - x.t) ** 2, 0) / inliers.length);
  // The same boundaries under one scale fitted to them: perspective is kept only where it explains
  // them clearly better (its third parameter earns its place); else that uniform scale.
  const aff = fitMap(inliers.map((x) => x.mm), inliers.map((x) => x.t), true);
  const rmsAffine = rmsOf(aff);
  const span = inliers.length ? inliers[inliers.length - 1].mm - inliers[0].mm : 0;
  const plausible = (map: Map1D, rms: number, perspective: boolean) => {
    const slope0 = mapSlope(map, 0), slope1 = mapSlope(map, padEnd), slopeMid = mapSlope(map, padEnd / 2);
    return (
      inliers.length >= Math.max(5, Math.ceil((perspective ? 0.75 : 0.6) * marks.length)) &&
      span >= 0.6 * padEnd &&
      rms <= 0.5 * tol &&
      // The layout fit's pads lie measurably off the boundaries found.
      rmsUniform > rms + Math.max(1, 0.1 * s) &&
      // A phone's tilt changes the scale over the pads' stretch by a fifth at most.
      slope0 / slope1 > 1 / 1.2 && slope0 / slope1 < 1.2 &&
      Math.abs(Math.abs(slopeMid) / s - 1) < 0.25
    );
  };
  const options: { map: Map1D; rms: number; perspective: boolean }[] = [];
  if (rmsAffine > 1.25 * found.rms + 0.2) options.push({ map: found.map, rms: found.rms, perspective: true });
  if (aff) options.push({ map: aff, rms: rmsAffine, perspective: false });
  const chosen = options.find((o) => plausible(o.map, o.rms, o.perspective));
  const sl = (m: Map1D) => `${mapSlope(m, 0).toFixed(2)}…${mapSlope(m, padEnd).toFixed(2)}`;
  trace?.(`plane: ${inliers.length}/${marks.length} boundaries, rms: layout fit ${rmsUniform.toFixed(2)} px, perspective ${found.rms.toFixed(2)} (scale ${sl(found.map)} px/mm), one scale ${rmsAffine.toFixed(2)}; ${chosen ? (chosen.perspective ? "perspective" : "one scale") : "not used"}`);
  if (!chosen) return null;
  const { map, rms, perspective } = chosen;
  return { map, perspective, H: planeHomography(axis, map, chart.strip.widthMm), inliers: inliers.length, landmarks: marks.length, rms, rmsUniform };
}
