// Calibrating a chart from reference solutions: photos of fresh strips dipped in solutions of
// known value. Each photo is read with the chart as it stands; each pad's measured colour is
// collected under the known value; per pad and value the colours are averaged (after dropping
// a photo that disagrees with the others) and become the swatch at that value, or a new swatch
// where the chart has none. The technicians' reference-solution page and the calibrate-chart
// command both call refitFromSolutions. Pure: no database, no HTTP.
import { exportChart, parseChart, type StripChart } from "./chart";
import { deltaE2000, labToHex, type Lab } from "./colour";
import { ReadingError } from "./image";
import { readStrip } from "./index";
import { analyteGroups } from "./joint-match";
import { median } from "./stats";

export type SolutionSample = { photo: Buffer; known: Record<string, number>; name?: string };
export type SwatchChange = { analyte: string; pad: number; value: number; from: string | null; to: string; deltaE: number | null; photos: number };
export type ChartDocument = {
  format: string;
  name: string;
  strip: { widthMm: number; lengthMm: number; color: string };
  pads: { analyte: string; label: string; unit: string; centerMm: number; sizeMm: number; swatches: { value: number; color: string }[] }[];
};
export type RefitResult = {
  definition: ChartDocument;
  changes: SwatchChange[];
  warnings: string[];
  /** Samples that could not be used at all, with the reason in plain words. */
  skipped: { sample: string; reason: string }[];
};

/** Refusal of the whole calibration, in plain words. */
export class RefitError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "RefitError";
  }
}

/** A photo that disagrees with the others of its value by more than this (ΔE00) is left out (common practice for a robust mean). */
const OUTLIER_FLOOR_DELTA_E = 6;

const mean = (labs: Lab[]): Lab => ({
  l: labs.reduce((s, x) => s + x.l, 0) / labs.length,
  a: labs.reduce((s, x) => s + x.a, 0) / labs.length,
  b: labs.reduce((s, x) => s + x.b, 0) / labs.length,
});

/** Robust average of the colours measured on one pad at one known value: outliers (a misplaced pad) dropped. */
export function robustMeanLab(labs: Lab[]): { lab: Lab; kept: number[] } {
  const all = labs.map((_, i) => i);
  if (labs.length < 3) return { lab: mean(labs), kept: all };
  const centre = { l: median(labs.map((x) => x.l)), a: median(labs.map((x) => x.a)), b: median(labs.map((x) => x.b)) };
  const d = labs.map((x) => deltaE2000(x, centre));
  const limit = Math.max(OUTLIER_FLOOR_DELTA_E, 2.5 * median(d));
  const kept = all.filter((i) => d[i] <= limit);
  return { lab: mean(kept.map((i) => labs[i])), kept };
}

/** Checks the samples' known values against the chart; returns the usable [analyte, value] pairs per sample. */
function usableKnown(chart: StripChart, s: SolutionSample, warnings: string[], name: string): [string, number][] {
  const out: [string, number][] = [];
  for (const [analyte, value] of Object.entries(s.known ?? {})) {
    const pad = chart.pads.find((p) => p.analyte === analyte);
    if (!pad) {
      warnings.push(`${name}: the chart has no pad for "${analyte}", so that value was not used.`);
      continue;
    }
    const values = pad.swatches.map((w) => w.value);
    const lo = values[0], hi = values[values.length - 1], span = hi - lo;
    if (typeof value !== "number" || !Number.isFinite(value) || value < 0 || value < lo - span / 2 || value > hi + span / 2) {
      warnings.push(`${name}: the known ${pad.label} ${String(value)} lies outside the chart's range (${lo} to ${hi}), so it was not used. Check the value of the solution.`);
      continue;
    }
    out.push([analyte, value]);
  }
  return out;
}

function setSwatch(doc: ChartDocument, pad: number, value: number, color: string): string | null {
  const sw = doc.pads[pad].swatches;
  const at = sw.findIndex((s) => Math.abs(s.value - value) < 1e-9);
  if (at >= 0) {
    const from = sw[at].color;
    sw[at] = { value, color };
    return from;
  }
  sw.push({ value, color });
  sw.sort((a, b) => a.value - b.value);
  return null;
}

/** Refits the chart's swatches from photos of strips dipped in solutions of known value. */
export async function refitFromSolutions(chart: StripChart, samples: SolutionSample[]): Promise<RefitResult> {
  if (!samples.length) throw new RefitError("Add at least one strip photo with the value of its reference solution.");
  const warnings: string[] = [];
  const skipped: RefitResult["skipped"] = [];
  // measured[`${padIndex}|${value}`] = colours and the samples they came from
  const measured = new Map<string, { pad: number; value: number; labs: Lab[]; from: string[] }>();
  for (const [i, s] of samples.entries()) {
    const name = s.name ?? `Photo ${i + 1}`;
    const known = usableKnown(chart, s, warnings, name);
    if (!known.length) {
      skipped.push({ sample: name, reason: Object.keys(s.known ?? {}).length ? "none of its known values can be used" : "it names no known value" });
      continue;
    }
    let read;
    try {
      read = await readStrip(s.photo, chart, { checkPads: false });
    } catch (e) {
      if (e instanceof ReadingError) {
        skipped.push({ sample: name, reason: e.message });
        continue;
      }
      throw e;
    }
    warnings.push(...read.warnings.map((w) => `${name}: ${w}`));
    for (const [analyte, value] of known) {
      const r = read.pads.find((p) => p.analyte === analyte);
      if (!r) continue;
      for (const part of r.parts) {
        const key = `${part.chartIndex}|${value}`;
        const m = measured.get(key) ?? { pad: part.chartIndex, value, labs: [], from: [] };
        m.labs.push(part.lab);
        m.from.push(name);
        measured.set(key, m);
      }
    }
  }
  if (!measured.size) {
    const why = skipped.map((k) => `${k.sample}: ${k.reason}`).join(" ");
    throw new RefitError(`None of the ${samples.length} photos could be used. ${why}`.trim());
  }
  const doc = exportChart(chart) as ChartDocument;
  const changes: SwatchChange[] = [];
  for (const m of [...measured.values()].sort((a, b) => a.pad - b.pad || a.value - b.value)) {
    const { lab, kept } = robustMeanLab(m.labs);
    const left = m.from.filter((_, i) => !kept.includes(i));
    const cp = chart.pads[m.pad];
    if (left.length)
      warnings.push(`${cp.label} pad ${m.pad + 1} at ${m.value}: ${left.join(", ")} looked unlike the other photos of that solution and ${left.length === 1 ? "was" : "were"} left out.`);
    const hex = labToHex(lab);
    const from = setSwatch(doc, m.pad, m.value, hex);
    changes.push({ analyte: cp.analyte, pad: m.pad, value: m.value, from, to: hex, deltaE: from ? deltaE2000(cp.swatches.find((s) => Math.abs(s.value - m.value) < 1e-9)!.lab, lab) : null, photos: kept.length });
  }
  // An analyte on several pads keeps the same values on each: a value measured on some of its pads only is not added.
  for (const [analyte, indices] of analyteGroups(doc.pads)) {
    const valueSets = indices.map((i) => doc.pads[i].swatches.map((s) => s.value).join(","));
    if (new Set(valueSets).size > 1) throw new RefitError(`The photos did not show every ${analyte} pad, so the chart's pads for ${analyte} would list different values. Take the photos again with the whole strip in view.`);
  }
  parseChart(doc);
  return { definition: doc, changes, warnings, skipped };
}
