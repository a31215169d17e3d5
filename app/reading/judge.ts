// The verdict on one analyte: its value from the joint match of its pads, a confidence, and
// whether a person should check it, with the reasons in plain words. A reading goes to review when
// its colours lie far from the chart's path, a pad is uneven, the colours also resemble another
// part of the chart, the photo is overexposed or glared there, or the strip's placement itself is
// in doubt (strip-fit.ts doubts).
import type { ChartPad } from "./chart";
import { labToHex, type Lab } from "./colour";
import { matchJoint } from "./joint-match";
import type { PadMeasurement } from "./measure-pads";

/** One pad of an analyte's reading: what was measured there. */
export type PadPart = {
  /** Index of the pad in the chart's pad list. */
  chartIndex: number;
  lab: Lab;
  hex: string;
  /** ΔE00 from this pad's colour to its own path at the analyte's read position. */
  deltaE: number;
  /** Pad centre in the original photo's pixels (after EXIF orientation). */
  centre: [number, number];
  crop?: Buffer;
};

/** One reading per analyte (an analyte on several pads is read jointly from all of them). */
export type PadReading = {
  analyte: string;
  label: string;
  unit: string;
  value: number;
  confidence: number;
  needsReview: boolean;
  reason?: string;
  /** Measured colour (the first pad's, for an analyte on several pads; all are in `parts`). */
  lab: Lab;
  hex: string;
  deltaE: number;
  swatchIndex: number;
  /** The pad's crop; for an analyte on several pads, their crops side by side. */
  crop?: Buffer;
  /** Pad centre in the original photo's pixels (the first pad's for an analyte on several pads). */
  centre: [number, number];
  /** Every pad this analyte was read from, in chart order (one entry for a single pad). */
  parts: PadPart[];
};
/** Readings less confident than this go to review. */
export const REVIEW_BELOW = 0.6;

/** ΔE00 (root mean square over an analyte's pads) from the chart's colour path beyond which a reading goes to review, however wide the chart's steps. */
export const FAR_FROM_PATH = 12;

/** One analyte's value, confidence and reasons from its pads' measurements. */
export function judgeAnalyte(analyte: string, chartPads: ChartPad[], ms: PadMeasurement[], indices: number[], k: number, doubts: string[]): PadReading {
  return judge(analyte, chartPads, ms, indices, k, doubts).reading;
}

/** The reason given when more than half of a strip's analytes match no colour on the chart. */
export const STRIP_FAR_FROM_CHART =
  "most of the strip's pads match no colour printed on the chart, so the strip may be wrongly placed in the photo or the light unusual";

/**
 * Every analyte of one strip. When more than half of them lie far from the chart's colours, the
 * strip's placement or the light is in doubt, and so is every reading from it: the others go to
 * review too, since a pad that happens to match a printed colour proves nothing on its own.
 */
export function judgeStrip(chartPads: ChartPad[], ms: PadMeasurement[], groups: [string, number[]][], k: number, doubts: string[]): PadReading[] {
  const verdicts = groups.map(([analyte, idx]) => judge(analyte, idx.map((i) => chartPads[i]), idx.map((i) => ms[i]), idx, k, doubts));
  const far = verdicts.filter((v) => v.far).length;
  if (far > verdicts.length / 2)
    for (const { reading, far } of verdicts) {
      if (far) continue;
      reading.confidence = Math.min(reading.confidence, REVIEW_BELOW - 0.01);
      reading.reason = reading.needsReview ? `${reading.reason!.slice(0, -1)}; ${STRIP_FAR_FROM_CHART}.` : `Please check ${reading.label}: ${STRIP_FAR_FROM_CHART}.`;
      reading.needsReview = true;
    }
  return verdicts.map((v) => v.reading);
}

function judge(analyte: string, chartPads: ChartPad[], ms: PadMeasurement[], indices: number[], k: number, doubts: string[]): { reading: PadReading; far: boolean } {
  const first = chartPads[0];
  const match = matchJoint(chartPads, ms.map((m) => m.lab));
  const reasons: string[] = [];
  const rel = match.deltaE / match.halfStep;
  let conf = Math.exp(-0.5 * rel * rel);
  // Far also in absolute terms: on a chart with few, very different colours half a step is wide,
  // and a colour halfway between two printed ones yet far from both their path is no reading.
  const perPad = match.deltaE / Math.sqrt(chartPads.length);
  const farAbsolute = perPad > FAR_FROM_PATH;
  const far = rel > 1 || farAbsolute;
  if (far) reasons.push(chartPads.length > 1 ? "its pads' colours are far from every set of colours printed on the chart" : "its colour is far from every colour printed on the chart");
  if (farAbsolute) conf = Math.min(conf, REVIEW_BELOW - 0.01);
  const relS = Math.max(...ms.map((m) => m.spread)) / match.halfStep;
  conf *= Math.exp(-0.5 * relS * relS);
  if (relS > 0.8) reasons.push("its colour is uneven (glare, shadow or a drip on the pad)");
  if (match.rivalDeltaE < match.deltaE + 1) {
    conf *= 0.5;
    reasons.push("its colour also resembles another part of the chart");
  }
  if (ms.some((m) => m.sample.clippedFraction > 0.3)) {
    conf *= 0.7;
    reasons.push("the photo is overexposed there");
  }
  if (ms.some((m) => m.sample.glareFraction > 0.25)) {
    conf *= 0.8;
    reasons.push("there is glare on the pad");
  }
  // A placement in doubt: whatever the colours say, a person checks the reading.
  if (doubts.length) {
    conf = Math.min(conf, REVIEW_BELOW - 0.01);
    reasons.push(...doubts);
  }
  conf = Math.max(0, Math.min(1, conf));
  const needsReview = conf < REVIEW_BELOW;
  const parts: PadPart[] = ms.map((m, j) => ({
    chartIndex: indices[j],
    lab: m.lab,
    hex: labToHex(m.lab),
    deltaE: match.padDeltaE[j],
    centre: [m.centre[0] * k, m.centre[1] * k],
  }));
  const reading: PadReading = {
    analyte,
    label: first.label,
    unit: first.unit,
    value: match.value,
    confidence: conf,
    needsReview,
    lab: ms[0].lab,
    hex: parts[0].hex,
    deltaE: match.deltaE,
    swatchIndex: match.swatchIndex,
    centre: parts[0].centre,
    parts,
  };
  if (needsReview) reading.reason = `Please check ${first.label}: ${reasons.length ? reasons.join("; ") : "the reading is uncertain"}.`;
  return { reading, far };
}
