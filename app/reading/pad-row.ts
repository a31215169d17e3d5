// Candidate strips from their pads: a row of coloured blobs of one size on a straight line. For a
// strip whose plastic barely differs from the surface (a pale strip on pale wood or tiles) and
// whose edges are lost among the surface's own lines, the pads still differ in colour from it.
import type { StripChart } from "./chart";
import { components } from "./bright-components";
import type { StripCandidate } from "./geometry";
import type { RgbImage } from "./image";
import { boxMean } from "./search-copy";

/** Chromaticity distances from the local background above which a pixel counts as coloured. */
const COLOURED_LEVELS = [0.035, 0.055, 0.08];

/**
 * Per pixel of a reduced copy (`factor` working pixels a side): how far its chromaticity
 * (r, g, b over their sum, a light-independent colour) lies from the surface around it.
 */
function colourContrast(img: RgbImage, factor: number): { w: number; h: number; d: Float32Array } {
  const f = factor, w = Math.floor(img.width / f), h = Math.floor(img.height / f);
  const step = f >= 4 ? 2 : 1;
  const ch = [new Float32Array(w * h), new Float32Array(w * h), new Float32Array(w * h)];
  const data = img.data, W = img.width;
  for (let y = 0; y < h; y++)
    for (let x = 0; x < w; x++) {
      let r = 0, g = 0, b = 0;
      for (let dy = 0; dy < f; dy += step)
        for (let dx = 0, o = ((y * f + dy) * W + x * f) * 3; dx < f; dx += step, o += 3 * step) (r += data[o]), (g += data[o + 1]), (b += data[o + 2]);
      const s = r + g + b + 1;
      const i = y * w + x;
      (ch[0][i] = r / s), (ch[1][i] = g / s), (ch[2][i] = b / s);
    }
  const radius = Math.max(4, Math.round(Math.max(w, h) / 25));
  const bg = ch.map((c) => boxMean(c, w, h, radius));
  const d = new Float32Array(w * h);
  for (let i = 0; i < d.length; i++) d[i] = Math.hypot(ch[0][i] - bg[0][i], ch[1][i] - bg[1][i], ch[2][i] - bg[2][i]);
  return { w, h, d };
}

/**
 * Candidate axes through rows of coloured blobs: a blob as long as several pads (pads that
 * nearly touch merge), or at least three pad-sized blobs of like size on one line within the
 * chart's pad span. In search-copy pixels (`factor` working pixels a side), best first.
 */
export function padRowCandidates(img: RgbImage, factor: number, chart: StripChart, maxOut = 3): StripCandidate[] {
  const { w, h, d } = colourContrast(img, factor);
  const maxArea = 0.02 * w * h;
  // A ladder of levels: at a low one, pads close together merge with the halo the box mean
  // leaves around them; at a high one, pale pads vanish. Rows from every level compete.
  const out: StripCandidate[] = [];
  for (const level of COLOURED_LEVELS) out.push(...padRows(components(d, level, w, h, 3).filter((c) => c.n <= maxArea), chart));
  // The best of each group of near-identical lines.
  const kept: StripCandidate[] = [];
  for (const c of out.sort((a, b) => b.score - a.score)) {
    if (kept.length >= maxOut) break;
    if (!kept.some((o) => Math.hypot(o.cx - c.cx, o.cy - c.cy) < o.width && Math.abs(Math.sin(o.angle - c.angle)) < 0.15)) kept.push(c);
  }
  return handlesOf(kept, chart);
}

/** How far a pair's spacing may lie from the chart's (share of it). */
const PAIR_SPACING_TOLERANCE = 0.15;

/** Rows of pads among the coloured blobs of one level: merged pads, or three or more in a line. */
export function padRows(blobs: StripCandidate[], chart: StripChart): StripCandidate[] {
  const sizes = chart.pads.map((p) => Math.min(p.sizeMm, chart.strip.widthMm));
  const padMm = Math.max(...sizes);
  const starts = chart.pads.map((p) => p.centerMm - p.sizeMm / 2), ends = chart.pads.map((p) => p.centerMm + p.sizeMm / 2);
  const spanMm = Math.max(...ends) - Math.min(...starts);
  const need = Math.min(3, chart.pads.length);
  // Two blobs alone make a row only at a spacing two of the chart's pads have (centre to centre,
  // in pad sizes): a strip whose other pads are as pale as its plastic.
  const centres = chart.pads.map((p) => p.centerMm);
  const spacings = centres.flatMap((a, i) => centres.slice(i + 1).map((b) => Math.abs(b - a) / padMm));
  const pairSpacing = (r: number) => spacings.some((q) => Math.abs(r / q - 1) <= PAIR_SPACING_TOLERANCE);
  const out: StripCandidate[] = [];
  const widthFor = (pad: number) => (pad / padMm) * chart.strip.widthMm;
  // Merged pads: one blob about as wide as a pad and several pads long.
  for (const b of blobs)
    if (chart.pads.length > 1 && b.length >= 2.2 * b.width && b.width >= 2 && b.length <= (spanMm / padMm) * b.width * 1.5)
      out.push({ ...b, width: widthFor(b.width), score: b.n });
  // Separate pads: compact blobs, the largest first.
  const pads = blobs.filter((b) => b.length < 2.2 * b.width && b.width >= 1.5).sort((a, b) => b.n - a.n).slice(0, 40);
  for (let i = 0; i < pads.length; i++)
    for (let j = i + 1; j < pads.length; j++) {
      const a = pads[i], b = pads[j];
      const size = Math.sqrt((a.length * a.width + b.length * b.width) / 2);
      const dist = Math.hypot(b.cx - a.cx, b.cy - a.cy);
      if (dist < size || dist > (spanMm / padMm) * size * 1.3) continue;
      const ux = (b.cx - a.cx) / dist, uy = (b.cy - a.cy) / dist;
      const along: number[] = [], xs: number[] = [], ys: number[] = [];
      for (const c of pads) {
        const like = (c.length * c.width) / (size * size);
        if (like < 0.3 || like > 3) continue;
        const px = c.cx - a.cx, py = c.cy - a.cy;
        if (Math.abs(-uy * px + ux * py) > 0.5 * size) continue;
        const s = ux * px + uy * py;
        if (Math.abs(s - dist / 2) <= (spanMm / padMm) * size * 0.75) along.push(s), xs.push(c.cx), ys.push(c.cy);
      }
      if (along.length < need && !(along.length === 2 && pairSpacing(dist / size))) continue;
      // The line through the blobs' centres (least squares), not through the first two alone.
      const mx = xs.reduce((p, q) => p + q, 0) / xs.length, my = ys.reduce((p, q) => p + q, 0) / ys.length;
      let sxx = 0, syy = 0, sxy = 0;
      for (let k = 0; k < xs.length; k++) (sxx += (xs[k] - mx) ** 2), (syy += (ys[k] - my) ** 2), (sxy += (xs[k] - mx) * (ys[k] - my));
      const angle = 0.5 * Math.atan2(2 * sxy, sxx - syy);
      const vx = Math.cos(angle), vy = Math.sin(angle);
      const proj = xs.map((x, k) => (x - mx) * vx + (ys[k] - my) * vy);
      const s0 = Math.min(...proj), s1 = Math.max(...proj), sm = (s0 + s1) / 2;
      const cand: StripCandidate = { cx: mx + sm * vx, cy: my + sm * vy, angle, length: s1 - s0 + size, width: widthFor(size), score: along.length * size * size, n: along.length };
      out.push(cand);
    }
  return out;
}

/** Each row as the handle it would have on either side of it, at the scale its blobs give. */
function handlesOf(kept: StripCandidate[], chart: StripChart): StripCandidate[] {
  const starts = chart.pads.map((p) => p.centerMm - p.sizeMm / 2), ends = chart.pads.map((p) => p.centerMm + p.sizeMm / 2);
  // The fit takes the bare plastic's colour from the middle of a candidate, as for a bright
  // handle: each row becomes the handle it would have on either side of it, at the scale its
  // blobs give.
  const padMidMm = (Math.min(...starts) + Math.max(...ends)) / 2, padEndMm = Math.max(...ends);
  const handleMm = chart.strip.lengthMm - padEndMm;
  if (handleMm < chart.strip.widthMm) return kept;
  const handles: StripCandidate[] = [];
  for (const c of kept) {
    const scale = (c.width / chart.strip.widthMm) as number;
    const off = ((padEndMm + chart.strip.lengthMm) / 2 - padMidMm) * scale;
    for (const side of [1, -1]) {
      const ux = side * Math.cos(c.angle), uy = side * Math.sin(c.angle);
      handles.push({ ...c, cx: c.cx + off * ux, cy: c.cy + off * uy, length: 0.9 * handleMm * scale });
    }
  }
  return handles;
}
