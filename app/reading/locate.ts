// Finding the strip in a photo and placing its pads: candidates on the search copy (bright
// components at a wide background scale, then a narrow one, then pairs of long parallel edges),
// each fitted in the working image (strip-fit.ts); the most convincing placement wins.
import type { StripChart } from "./chart";
import { brightCandidates } from "./bright-components";
import { edgePairCandidates } from "./edge-pairs";
import { traceLine, type Axis, type StripCandidate, type StripGeometry, type Trace } from "./geometry";
import { ReadingError, type RgbImage } from "./image";
import { chartLayout } from "./layout-fit";
import { padRowCandidates } from "./pad-row";
import { makeSearchCopy, type SearchCopy } from "./search-copy";
import { fitAnyLength, refitWholeStrip } from "./strip-fit";

export type { StripGeometry, PadPlacement, Interval } from "./geometry";

const NO_STRIP =
  "No test strip was found in this photo. Lay the strip flat on a plain surface, keep the whole strip in the picture, and take the photo again.";

/**
 * The photo must show the strip at a readable size: a placement whose whole strip would span
 * less than this share of the photo's long side is a pattern in the surface, not the strip
 * (the capture screen asks for the strip to fill most of the frame).
 */
export const MIN_STRIP_SHARE = 0.2;

/**
 * Nor may it be larger than the photo can hold: a strip whose whole length would exceed this
 * share of the photo's diagonal leaves no room for its pads and an end in view; a candidate at
 * such a scale is a patch of the surface (a tile, a fold of cloth), not the strip.
 */
export const MAX_STRIP_SHARE = 1.25;

/** The scales (working px per mm) at which this chart's strip can be read in a photo of this size. */
export function scaleBounds(width: number, height: number, chart: StripChart): { min: number; max: number } {
  return { min: (MIN_STRIP_SHARE * Math.max(width, height)) / chart.strip.lengthMm, max: (MAX_STRIP_SHARE * Math.hypot(width, height)) / chart.strip.lengthMm };
}

/** The wide background scale (the box mean's radius is the search copy's long side over this), tried first. */
export const WIDE_DIV = 16;

/** Candidates tried per background scale. */
const CANDIDATES_PER_SCALE = 5;
/** The wide scale's candidates tried before the edge pairs (the rest after them). */
const WIDE_BEFORE_EDGES = 2;

/**
 * How far a candidate's outline is from the chart's strip: |ln| of the ratio between the scales
 * its length and its width give (0 for a band of the strip's proportions). A strip running out of
 * the photo or merged with something pale beside it is off too, so this only orders the search.
 */
export function shapeOff(c: Pick<StripCandidate, "length" | "width">, chart: StripChart): number {
  return Math.abs(Math.log(c.length / chart.strip.lengthMm / (c.width / chart.strip.widthMm)));
}
/** Beyond this shapeOff (scales more than 1.6 times apart) a candidate does not have the strip's proportions. */
const SHAPE_OFF = Math.log(1.6);
/** Whether none of the wide scale's best few candidates has the strip's proportions (the edge pairs are then wanted first). */
export function wideLooksOff(wide: StripCandidate[], chart: StripChart): boolean {
  return wide.slice(0, WIDE_BEFORE_EDGES).every((c) => shapeOff(c, chart) > SHAPE_OFF);
}

/** A placement whose pads stand out from the bare plastic beats one whose gaps look as coloured as its pads, whatever their scores. */
function better(g: StripGeometry, best: StripGeometry | null): boolean {
  if (!best) return true;
  if (g.convincing !== best.convincing) return g.convincing;
  return g.rank > best.rank;
}

/** A candidate's axis in working-image pixels. */
function axisOf(c: StripCandidate, s: SearchCopy): Axis {
  const f = s.factor;
  return { cx: (c.cx + 0.5) * f, cy: (c.cy + 0.5) * f, ux: Math.cos(c.angle), uy: Math.sin(c.angle), width: c.width * f, length: c.length * f };
}

/**
 * No need to look further: a clear pad pattern on a strip of the chart's length, or one whose
 * pads' colours lie close to the chart's swatches (a strip running out of the photo).
 */
const settled = (g: StripGeometry | null) => !!g && g.convincing && g.rank > 15 && (g.lengthOk || g.colourCost <= SETTLED_COLOUR_COST);
/** Mean ΔE00 from the placed pads to their swatch paths below which a placement settles the search. */
const SETTLED_COLOUR_COST = 5;
/** Mean ΔE00 beyond which a placement's colours are no longer trusted in full (layout-fit.ts colourTrust). */
const FAR_COLOUR_COST = 8;

/** Search work done before the working image was decoded (search-decode.ts earlySearch): the search copy, its wide-scale candidates and maybe its edge-pair candidates. */
export type EarlySearch = { search: SearchCopy; wide?: StripCandidate[]; edges?: StripCandidate[] };

export function locateStrip(img: RgbImage, chart: StripChart, trace?: Trace, early?: EarlySearch): StripGeometry {
  const { min: minPxPerMm, max: maxPxPerMm } = scaleBounds(img.width, img.height, chart);
  const layout = chartLayout(chart);
  const padEndMm = Math.max(...layout.pads.map((p) => p[1]));
  const fit = (axis0: Axis) => {
    // The fitted scale lies within about ±25 % of the one the width gives, and the refined width
    // within half to twice the candidate's: a candidate far too narrow or far too wide for a
    // readable strip is not fitted at all.
    const fromWidth = axis0.width / chart.strip.widthMm;
    if (fromWidth * 1.5 < minPxPerMm || fromWidth / 2.5 > maxPxPerMm) return null;
    const g = fitAnyLength(img, chart, layout, padEndMm, axis0, trace, minPxPerMm, maxPxPerMm);
    if (g && (g.pxPerMm < minPxPerMm || g.pxPerMm > maxPxPerMm)) {
      if (trace) traceLine(trace, g.pxPerMm < minPxPerMm ? "too small" : "too large", { c: g.centre.map(Math.round), s: +g.pxPerMm.toFixed(2) });
      return null;
    }
    return g;
  };
  const search = early?.search ?? makeSearchCopy(img);
  let best = null as StripGeometry | null;
  const tried: StripCandidate[] = [];
  // Each background scale's candidates, best first, and how far through them the search has come.
  const scales = new Map<number, { list: StripCandidate[]; next: number; n: number }>();
  const scale = (div: number) => {
    let at = scales.get(div);
    if (!at) scales.set(div, (at = { list: div === WIDE_DIV && early?.wide ? early.wide : brightCandidates(search, chart, div), next: 0, n: 0 }));
    return at;
  };
  const tryBright = (div: number, upTo = CANDIDATES_PER_SCALE) => {
    const at = scale(div);
    for (; at.next < at.list.length && at.n < upTo; at.next++) {
      const c = at.list[at.next];
      if (tried.some((o) => Math.hypot(o.cx - c.cx, o.cy - c.cy) < o.width * 2 && Math.abs(Math.sin(o.angle - c.angle)) < 0.1)) continue;
      tried.push(c);
      at.n++;
      const g = fit(axisOf(c, search));
      if (g && better(g, best)) best = g;
      if (settled(best)) return true;
    }
    return false;
  };
  // Strips the bright components missed (merged with a pale surface or a line beside them):
  // pairs of long parallel edges. Also when the best placement's colours lie far from every
  // swatch: a pad-like pattern along some other bright edge (a sheet of paper's border).
  let edgesTried = false;
  let edges = early?.edges;
  const edgeList = () => (edges ??= edgePairCandidates(search, chart));
  const needEdges = () => !edgesTried && (!best || !best.lengthOk || !best.convincing || best.colourCost > FAR_COLOUR_COST);
  const tryEdges = () => {
    edgesTried = true;
    for (const c of edgeList()) {
      if (trace) traceLine(trace, "edge pair", { cx: c.cx, cy: c.cy, a: c.angle, l: c.length, w: c.width, s: c.score });
      const g = fit(axisOf(c, search));
      if (g && better(g, best)) best = g;
      if (settled(best)) return true;
    }
    return false;
  };
  // A pale strip lost on a pale, lined surface: its pads, a row of coloured blobs.
  const tryPadRows = () => {
    for (const c of padRowCandidates(img, search.factor, chart)) {
      if (trace) traceLine(trace, "pad row", { cx: +c.cx.toFixed(1), cy: +c.cy.toFixed(1), a: +c.angle.toFixed(2), l: +c.length.toFixed(1), w: +c.width.toFixed(1), n: c.n });
      const g = fit(axisOf(c, search));
      if (g && better(g, best)) best = g;
      if (settled(best)) return true;
    }
    return false;
  };
  // The wide background scale's best few first, then the edge pairs (a strip the bright
  // components missed is found there before the rest of the wide scale's lesser blobs are each
  // profiled), then the rest of the wide scale, then the narrow scale (and the edge pairs after
  // it if they were not needed before), then the pad rows: each only while nothing has settled
  // the search.
  // When none of the wide scale's best few has the strip's proportions and the edge pairs' best
  // has, the edge pairs come first: those blobs are mostly a pale surface or a strip merged with
  // one, each fitted in vain.
  const edgesFirst = () => {
    if (!wideLooksOff(scale(WIDE_DIV).list, chart)) return false;
    const first = edgeList()[0];
    return !!first && shapeOff(first, chart) <= SHAPE_OFF;
  };
  if (
    (edgesFirst() && tryEdges()) ||
    tryBright(WIDE_DIV, WIDE_BEFORE_EDGES) ||
    (needEdges() && tryEdges()) ||
    tryBright(WIDE_DIV) ||
    tryBright(40) ||
    (needEdges() && tryEdges()) ||
    tryPadRows()
  )
    return refitWholeStrip(img, chart, layout, padEndMm, best!, trace);
  if (best && trace) traceLine(trace, "chosen", { c: best.centre.map(Math.round), w: +best.widthPx.toFixed(1), s: +best.pxPerMm.toFixed(2), fit: +best.fitScore.toFixed(1), cost: +best.colourCost.toFixed(1), lengthOk: best.lengthOk, convincing: best.convincing });
  // No candidate shows the chart's pads standing out from bare plastic between them.
  if (!best || !best.convincing) throw new ReadingError("no_strip", NO_STRIP);
  return refitWholeStrip(img, chart, layout, padEndMm, best, trace);
}
