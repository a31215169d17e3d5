// One candidate axis → a placed strip: the axis refined on both long edges, the profile along it,
// the strip's ends, the pad layout fitted, the tip told from the handle, and the pads placed.
import { alongProfile, type Profile } from "./axis-profile";
import type { StripChart } from "./chart";
import { traceLine, type Axis, type Interval, type PadPlacement, type StripGeometry, type Trace } from "./geometry";
import type { RgbImage } from "./image";
import { SCALE_RANGE_LENGTH, SCALE_RANGE_WIDTH, colourTrust, placementColourCost, pxPerMm, searchLayout, tAt, type Layout, type LayoutFit } from "./layout-fit";
import { plasticDifference, type PlasticDifference } from "./plastic-difference";
import { applyMap } from "./projective-1d";
import { median } from "./stats";
import { CLOSE, refineAxis } from "./strip-axis";
import { endShowsAt, endsFromEdges, middleValues, walkEnd } from "./strip-ends";
import { axisFromPads } from "./pad-width";
import { fitStripPlane, planePoint } from "./strip-plane";

/** One candidate axis, refined, with its profile: what both ways of finding the ends share. */
export type PreparedAxis = {
  axis: Axis;
  axis0: Axis;
  profile: Profile;
  diff: PlasticDifference;
  /** px per mm from the strip's width. */
  scaleFromWidth: number;
  /** The chart's strip length in px at that scale. */
  expectedLength: number;
  /** Presence threshold for walking the ends, and the longest run below it bridged (px). */
  threshold: number;
  maxGap: number;
};

/** Mean ΔE00 to the chart within which a far lower-scoring pitch partner may replace the best placement. */
const PARTNER_COST_MAX = 8;

/** The walked length confirms the chart's length within this share of the length the width gives. */
const LENGTH_RATIO_MIN = 0.85, LENGTH_RATIO_MAX = 1.18;

/**
 * The largest px per mm a fit can reach over the width's: the confirmed length's scale at most
 * LENGTH_RATIO_MAX times the width's, then searched a little either side (layout-fit.ts).
 */
export const MAX_SCALE_OVER_WIDTH = Math.max(LENGTH_RATIO_MAX * (1 + SCALE_RANGE_LENGTH), 1 + SCALE_RANGE_WIDTH);
/** The smallest px per mm a fit can reach under the width's (the same bounds the other way). */
export const MIN_SCALE_UNDER_WIDTH = Math.min(LENGTH_RATIO_MIN * (1 - SCALE_RANGE_LENGTH), 1 - SCALE_RANGE_WIDTH);

/**
 * Refines a candidate axis on both long edges and profiles along it; null when nothing strip-like
 * is there, or when the strip's width is too narrow for any fit to reach `minPxPerMm`, or so wide
 * that every fit's scale would exceed `maxPxPerMm`.
 */
export function prepareAxis(img: RgbImage, chart: StripChart, axis0: Axis, minPxPerMm = 0, maxPxPerMm = Infinity, refined?: Axis): PreparedAxis | null {
  const axis = refined ?? refinedAxis(img, axis0);
  const widthPx = axis.width;
  if (!(widthPx > 5)) return null;
  const scaleFromWidth = widthPx / chart.strip.widthMm;
  // Nothing fitted along this axis could be large enough: no profile is taken.
  if (scaleFromWidth * MAX_SCALE_OVER_WIDTH * 1.01 < minPxPerMm || scaleFromWidth * MIN_SCALE_UNDER_WIDTH * 0.99 > maxPxPerMm) return null;
  const expectedLength = chart.strip.lengthMm * scaleFromWidth;
  const reach = axis.length / 2 + expectedLength * 1.3;
  const profile = alongProfile(img, axis, -reach, reach);
  // Presence over the handle-like middle of the candidate.
  const handlePresence = median(middleValues(profile, profile.presence, axis.length));
  if (!(handlePresence > 4)) return null;
  const threshold = Math.max(6, Math.min(0.4 * handlePresence, 30));
  const maxPadMm = Math.max(...chart.pads.map((p) => p.sizeMm));
  const maxGap = maxPadMm * scaleFromWidth * 1.3 + 2;
  const diff = plasticDifference(profile, axis.length, widthPx);
  return { axis, axis0, profile, diff, scaleFromWidth, expectedLength, threshold, maxGap };
}

/** A candidate's axis refined on both long edges: roughly from the candidate, then closely. */
export const refinedAxis = (img: RgbImage, axis0: Axis): Axis => refineAxis(img, refineAxis(img, axis0), CLOSE);

/**
 * Fits the chart's layout along a prepared axis. `edgeWalk`: when the colour difference does
 * not give the strip's length, its ends are taken from its long edges alone, and failing that the
 * layout is searched for anywhere along the axis at the scale given by the width.
 */
export function fitStrip(prepared: PreparedAxis, chart: StripChart, layout: Layout, padEndMm: number, edgeWalk: boolean, trace: Trace): StripGeometry | null {
  const { axis, axis0, profile, diff, scaleFromWidth, expectedLength, threshold, maxGap } = prepared;
  const warnings: string[] = [];
  const doubts: string[] = [];
  const widthPx = axis.width;
  let plus = walkEnd(profile, profile.presence, threshold, maxGap, 1);
  let minus = walkEnd(profile, profile.presence, threshold, maxGap, -1);
  // Neither the colour nor the edges show the strip's ends (a pale strip on a pale surface): the
  // chart's pads are searched for anywhere along the axis, at the scale given by the width.
  let free = false;
  if (edgeWalk) {
    const ratio = (plus.end - minus.end) / expectedLength;
    if (!(plus.truncated || minus.truncated || ratio > LENGTH_RATIO_MAX)) return null;
    const ends = endsFromEdges(profile, axis.length, maxGap, expectedLength);
    if (ends) [plus, minus] = ends;
    else free = true;
  }
  if (trace) traceLine(trace, "walk", { c: [Math.round(axis.cx), Math.round(axis.cy)], a: +Math.atan2(axis.uy, axis.ux).toFixed(2), w0: +axis0.width.toFixed(1), l0: Math.round(axis0.length) }, plus, minus, "pxPerMm(width)", scaleFromWidth, "length/chart", (plus.end - minus.end) / chart.strip.lengthMm);
  let scale = (plus.end - minus.end) / chart.strip.lengthMm;
  const ratio = scale / scaleFromWidth;
  let lengthOk = true;
  if (free || plus.truncated || minus.truncated || ratio < LENGTH_RATIO_MIN || ratio > LENGTH_RATIO_MAX) {
    lengthOk = false;
    scale = scaleFromWidth;
  }
  const { fits, best: fitted } = searchLayout(chart, layout, profile, diff, { plus, minus, scale, scaleFromWidth, lengthOk, free, padEndMm });
  if (!fitted) return null;
  let best: LayoutFit = fitted;
  if (trace) traceLine(trace, "fit", fits.map((f) => ({ s: +f.score.toFixed(1), pads: +f.padScore.toFixed(1), gaps: +f.gapScore.toFixed(1), d: f.dir, t: Math.round(tAt(f, 0)), k: +pxPerMm(f).toFixed(2) })), "lengthOk", lengthOk, "w", widthPx.toFixed(1));
  // The pad pattern fits both ways round (or from either end): the placement whose colours lie
  // closer to the chart's swatches (after a white correction from the bare plastic) wins.
  // So does the placement a pad's pitch along from the best (or the best's origin) unless it scores
  // far lower: which of the two is right is for the colours to say.
  const nearBest = (f: LayoutFit) => fitted.score - f.score < Math.max(2, 0.15 * fitted.score);
  const pitchPartner = (f: LayoutFit) => (f.shiftOf === fitted || fitted.shiftOf === f) && f.score >= 0.5 * fitted.score;
  const rivals = fits.filter((f) => nearBest(f) || pitchPartner(f));
  let chosenCost: number;
  if (rivals.length >= 2) {
    const costs = rivals.map((f) => placementColourCost(chart, layout, profile, diff.bare, f));
    if (trace) traceLine(trace, "placement by colour", costs.map((c) => c.toFixed(1)).join(" "));
    const order = costs.map((_, i) => i).sort((a, b) => costs[a] - costs[b]);
    const [i0, i1] = order;
    // A pitch partner that scores far lower wins only when its own colours lie near the chart:
    // between two placements that both miss it, the pattern's score stands.
    if (costs[i1] - costs[i0] > 3 && (nearBest(rivals[i0]) || costs[i0] <= PARTNER_COST_MAX)) best = rivals[i0];
    else if (rivals[i0].dir !== rivals[i1].dir) {
      warnings.push("The tip and the handle of the strip could not be told apart with certainty.");
      doubts.push("the tip and the handle of the strip could not be told apart, so the pads may be read in the wrong order");
    }
    chosenCost = costs[rivals.indexOf(best)] ?? placementColourCost(chart, layout, profile, diff.bare, best);
  } else chosenCost = placementColourCost(chart, layout, profile, diff.bare, best);
  if (!lengthOk) warnings.push("The strip in the photo is not the length the chart describes; the pads were placed from its width.");
  const s = pxPerMm(best);
  // Pads placed from their colours alone whose tip's end shows just where they put it (the walk
  // ran on past it into a line across the surface): that end is seen.
  const firstPadMm = Math.min(...layout.pads.map((p) => p[0]));
  const tipSeen = free && endShowsAt(profile, profile.presence, threshold, tAt(best, firstPadMm / 2), tAt(best, 0), Math.max(2, 0.3 * s), Math.max(3, s), 2 * s);
  if (free && !tipSeen) doubts.push("neither end of the strip could be seen clearly, so the pads were placed from their colours alone");
  const widthMm = chart.strip.widthMm;
  // Searched for anywhere along the axis, the best of many placements must stand out further.
  const convincing = free ? best.score >= Math.max(10, 2 * best.gapScore) : best.score >= Math.max(4, best.gapScore);
  // The strip's plane in perspective (for a placement that may be chosen), when its pads' edges
  // follow one clearly better.
  const plane = convincing ? fitStripPlane(chart, layout, profile, axis, best, trace) : null;
  const tOf = (mm: number) => (plane ? applyMap(plane.map, mm) : tAt(best, mm));
  const pads: PadPlacement[] = chart.pads.map((p) => {
    const t = tOf(p.centerMm);
    const along = p.sizeMm / 2, across = Math.min(p.sizeMm, widthMm) / 2;
    if (plane) {
      const at = (x: number, y: number) => planePoint(plane.H, p.centerMm + x, y);
      const [a, b, c] = [at(-along, 0), at(along, 0), at(0, across)];
      const centre = at(0, 0);
      return {
        t,
        centre,
        halfAlong: Math.hypot(b[0] - a[0], b[1] - a[1]) / 2,
        halfAcross: Math.hypot(c[0] - centre[0], c[1] - centre[1]),
        inner: [at(-0.6 * along, -0.6 * across), at(0.6 * along, -0.6 * across), at(0.6 * along, 0.6 * across), at(-0.6 * along, 0.6 * across)],
      };
    }
    return { t, centre: [axis.cx + t * axis.ux, axis.cy + t * axis.uy], halfAlong: along * s, halfAcross: across * (widthPx / widthMm) };
  });
  const bare: Interval[] = layout.gaps.map(([a, b]) => {
    const t0 = tOf(a), t1 = tOf(b);
    return t0 < t1 ? [t0, t1] : [t1, t0];
  });
  bare.sort((x, y) => x[0] - y[0]);
  return {
    centre: [axis.cx, axis.cy],
    u: [axis.ux, axis.uy],
    v: [-axis.uy, axis.ux],
    dir: best.dir,
    tipT: tOf(0),
    handleT: tAt(best, chart.strip.lengthMm),
    widthPx,
    pxPerMm: s,
    pads,
    bare,
    fitScore: best.score,
    ...(plane ? { plane: plane.H } : {}),
    rank: best.score * (lengthOk ? 1 : 0.6) * colourTrust(chosenCost),
    colourCost: chosenCost,
    axisSpan: axis.length,
    lengthOk,
    endSeen: tipSeen || (!free && !(plus.truncated && minus.truncated)),
    convincing,
    warnings,
    doubts,
  };
}

/**
 * Fits the chart's layout along a candidate axis. When the strip's length is not confirmed, the
 * fit is tried again with the ends taken from the strip's sharp long edges alone (a strip lying in
 * line with a grout line or a seam: colour differences run on past its ends, its edges do not).
 */
export function fitAnyLength(img: RgbImage, chart: StripChart, layout: Layout, padEndMm: number, axis0: Axis, trace: Trace, minPxPerMm = 0, maxPxPerMm = Infinity, refined?: Axis, fromPads = false): StripGeometry | null {
  const prepared = prepareAxis(img, chart, axis0, minPxPerMm, maxPxPerMm, refined);
  if (!prepared) return null;
  const g = fitStrip(prepared, chart, layout, padEndMm, false, trace);
  if (g && g.lengthOk && g.convincing) return g;
  let out = g;
  const e = fitStrip(prepared, chart, layout, padEndMm, true, trace);
  // Pads searched for anywhere along the axis that land where the one end seen put them confirm
  // that end: the placement from it stands, with no doubt about the ends.
  if (e && edgesWin(g, e) && !(g && g.convincing && g.endSeen && samePlacement(g, e, Math.min(...chart.pads.map((p) => p.sizeMm))))) out = e;
  if (fromPads || (out && out.lengthOk && out.convincing)) return out;
  // The width read from the long edges may take in a line beside the strip (grout along it): the
  // pads' sides tell the strip's width and where it lies, and the fit is tried again there.
  const pads = axisFromPads(img, chart, prepared.axis, prepared.profile, prepared.diff);
  if (!pads) return out;
  if (trace) traceLine(trace, "width from the pads", { w: +prepared.axis.width.toFixed(1), pads: +pads.width.toFixed(1), off: +((pads.cx - prepared.axis.cx) * -prepared.axis.uy + (pads.cy - prepared.axis.cy) * prepared.axis.ux).toFixed(1) });
  const p = fitAnyLength(img, chart, layout, padEndMm, axis0, trace, minPxPerMm, maxPxPerMm, pads, true);
  return p && padsWin(out, p) ? p : out;
}

/**
 * Whether the placement on the axis the pads give (`p`) replaces the one on the edges' axis
 * (`g`): only one that sees an end of the strip (pads searched for anywhere along the new axis
 * prove nothing the first did not); then a convincing one wins over none, a confirmed length over
 * none, else the higher rank.
 */
export function padsWin(g: Pick<StripGeometry, "convincing" | "lengthOk" | "rank"> | null, p: Pick<StripGeometry, "convincing" | "lengthOk" | "rank" | "endSeen">): boolean {
  if (!p.convincing || !p.endSeen) return false;
  if (!g || !g.convincing) return true;
  if (p.lengthOk !== g.lengthOk) return p.lengthOk;
  return p.rank > g.rank;
}

/**
 * Whether the placement from the strip's edges (`e`) replaces the one from its colour (`g`): a
 * convincing one wins over none; else only with pads fitting at least as well and colours not
 * clearly further from the chart (WHOLE_STRIP_COST_SLACK). A confirmed length alone does not win,
 * nor does a pattern scoring a little higher the other way round (a strip running out of the photo
 * at its tip fits both ways nearly alike, and its colours tell which is right).
 */
export function edgesWin(g: Pick<StripGeometry, "convincing" | "fitScore" | "colourCost"> | null, e: Pick<StripGeometry, "convincing" | "fitScore" | "colourCost">): boolean {
  if (!e.convincing) return false;
  if (!g || !g.convincing) return true;
  return e.fitScore >= g.fitScore && e.colourCost <= g.colourCost + WHOLE_STRIP_COST_SLACK;
}

/** Two placements along one axis put the tip within a third of the smallest pad and the scale within 6 %, the same way round. */
export function samePlacement(a: Pick<StripGeometry, "dir" | "tipT" | "pxPerMm">, b: Pick<StripGeometry, "dir" | "tipT" | "pxPerMm">, minPadMm: number): boolean {
  return a.dir === b.dir && Math.abs(a.tipT - b.tipT) < (minPadMm / 3) * a.pxPerMm && Math.abs(a.pxPerMm / b.pxPerMm - 1) < 0.06;
}

/** Mean ΔE00 by which the whole strip's placement may lie further from the chart than the first. */
const WHOLE_STRIP_COST_SLACK = 3;

/**
 * The axis was fitted over the candidate's blob, often the handle alone; a small error of its
 * angle moves the pads at the far end off the strip. Fitted again over the whole strip as placed.
 */
export function refitWholeStrip(img: RgbImage, chart: StripChart, layout: Layout, padEndMm: number, g: StripGeometry, trace: Trace): StripGeometry {
  const tm = (g.tipT + g.handleT) / 2, len = Math.abs(g.handleT - g.tipT);
  if (g.axisSpan >= 0.75 * len) return g;
  const axis0: Axis = { cx: g.centre[0] + tm * g.u[0], cy: g.centre[1] + tm * g.u[1], ux: g.u[0], uy: g.u[1], width: g.widthPx, length: len * 0.95 };
  // The whole strip's edges run where the candidate's did: its profile and fit would be the same.
  // Looked for close to the placed edges first, then from the whole strip's outline.
  const close = refineAxis(img, axis0, CLOSE);
  const refined = sameEdges(g, close) ? close : refinedAxis(img, axis0);
  if (sameEdges(g, refined)) {
    traceLine(trace, "whole strip", "edges as placed");
    return g;
  }
  const again = fitAnyLength(img, chart, layout, padEndMm, axis0, trace, 0, Infinity, refined);
  if (again && trace) traceLine(trace, "whole strip", { fit: +again.fitScore.toFixed(1), was: +g.fitScore.toFixed(1), cost: +again.colourCost.toFixed(1), wasCost: +g.colourCost.toFixed(1), convincing: again.convincing });
  // Nor may the whole strip's placement move the pads to colours clearly further from the chart
  // (one pad along, onto the surface past the tip).
  return again && again.convincing && again.fitScore >= 0.9 * g.fitScore && again.colourCost <= g.colourCost + WHOLE_STRIP_COST_SLACK ? again : g;
}

/** How far (px) the whole strip's edges may lie from the placed axis's at either end and still count as the same. */
export const SAME_EDGES_PX = 0.5;

/**
 * Whether an axis refined over the whole strip runs along the placed one: at both of the strip's
 * ends (tip and handle) its centre line lies within SAME_EDGES_PX of the placed axis, and its
 * width within SAME_EDGES_PX of the placed width.
 */
export function sameEdges(g: Pick<StripGeometry, "centre" | "u" | "tipT" | "handleT" | "widthPx">, a: Axis): boolean {
  if (Math.abs(a.width - g.widthPx) > SAME_EDGES_PX) return false;
  const vx = -a.uy, vy = a.ux;
  return [g.tipT, g.handleT].every((t) => Math.abs((g.centre[0] + t * g.u[0] - a.cx) * vx + (g.centre[1] + t * g.u[1] - a.cy) * vy) <= SAME_EDGES_PX);
}
