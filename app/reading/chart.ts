// The strip colour chart and its interchange format "strip-chart/1".
//
//   { format: "strip-chart/1", name, strip: { widthMm, lengthMm, color },
//     pads: [ { analyte, label, unit, centerMm, sizeMm, swatches: [ { value, color } ] } ] }
//
// centerMm is measured from the strip's tip (the dipped end); pads are square,
// centred across the strip; colours are sRGB hex; swatch values rise along a pad.
import { z } from "zod";
import { hexToLab, type Lab } from "./colour";

export const CHART_FORMAT = "strip-chart/1";

export class ChartError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "ChartError";
  }
}

const hexColour = z
  .string()
  .trim()
  .regex(/^#([0-9a-fA-F]{3}|[0-9a-fA-F]{6})$/, { message: "must be a colour written like #f3f2ec" });
const positive = z.number().finite().positive();

export const swatchSchema = z.object({ value: z.number().finite(), color: hexColour });
export const padSchema = z.object({
  analyte: z.string().trim().min(1, { message: "must name the analyte" }),
  label: z.string().trim().optional(),
  unit: z.string().trim().optional(),
  centerMm: z.number().finite().nonnegative(),
  sizeMm: positive,
  swatches: z.array(swatchSchema).min(2, { message: "needs at least 2 colour swatches" }),
});
export const stripChartSchema = z.object({
  format: z.literal(CHART_FORMAT, { message: `must be "${CHART_FORMAT}"` }),
  name: z.string().optional(),
  strip: z.object({ widthMm: positive, lengthMm: positive, color: hexColour }),
  pads: z.array(padSchema).min(1, { message: "needs at least one pad" }),
});

export type ChartSwatch = { value: number; color: string; lab: Lab };
export type ChartPad = {
  analyte: string;
  label: string;
  unit: string;
  centerMm: number;
  sizeMm: number;
  swatches: ChartSwatch[];
};
export type StripChart = {
  format: typeof CHART_FORMAT;
  name: string;
  strip: { widthMm: number; lengthMm: number; color: string; lab: Lab };
  /** Pads in the order the chart lists them. */
  pads: ChartPad[];
};

function describeIssue(issue: z.core.$ZodIssue, json: unknown): string {
  const path = issue.path;
  let where = "";
  if (path[0] === "pads" && typeof path[1] === "number") {
    const pad = (json as { pads?: { analyte?: unknown }[] })?.pads?.[path[1]];
    const name = typeof pad?.analyte === "string" ? ` (${pad.analyte})` : "";
    where = `pad ${path[1] + 1}${name}`;
    if (path[2] === "swatches" && typeof path[3] === "number") where += `, swatch ${path[3] + 1}`;
    const field = path.slice(2).filter((p) => typeof p === "string" && p !== "swatches");
    if (field.length) where += ` ${field.join(".")}`;
  } else {
    where = path.join(".") || "chart";
  }
  if (issue.code === "invalid_type" && (issue as { input?: unknown }).input === undefined) return `${where} is missing`;
  return `${where} ${issue.message.charAt(0).toLowerCase()}${issue.message.slice(1)}`;
}

/** Validates a strip-chart/1 document and returns the chart with Lab values attached. */
export function parseChart(json: unknown): StripChart {
  if (json === null || typeof json !== "object" || Array.isArray(json)) throw new ChartError("The chart is not a strip-chart/1 document (expected a JSON object).");
  const fmt = (json as { format?: unknown }).format;
  if (fmt !== CHART_FORMAT) {
    if (typeof fmt === "string" && fmt.startsWith("strip-chart/"))
      throw new ChartError(`This chart uses version "${fmt}", but only "${CHART_FORMAT}" can be read.`);
    throw new ChartError(`This file is not a strip colour chart: its "format" must be "${CHART_FORMAT}".`);
  }
  const parsed = stripChartSchema.safeParse(json);
  if (!parsed.success) {
    const msgs = parsed.error.issues.slice(0, 3).map((i) => describeIssue(i, json));
    throw new ChartError(`The chart is not valid: ${msgs.join("; ")}.`);
  }
  const c = parsed.data;
  // One analyte may sit on several pads (read jointly); those pads must list the same values.
  const firstOf = new Map<string, { index: number; values: number[] }>();
  const pads: ChartPad[] = c.pads.map((p, i) => {
    const name = `pad ${i + 1} (${p.analyte})`;
    const values = p.swatches.map((s) => s.value);
    const first = firstOf.get(p.analyte);
    if (!first) firstOf.set(p.analyte, { index: i, values });
    else if (first.values.length !== values.length || first.values.some((v, k) => Math.abs(v - values[k]) > 1e-9))
      throw new ChartError(
        `The chart is not valid: pads ${first.index + 1} and ${i + 1} both read "${p.analyte}", so they must list the same swatch values (${first.values.join(", ")} against ${values.join(", ")}).`,
      );
    for (let k = 1; k < p.swatches.length; k++) {
      if (!(p.swatches[k].value > p.swatches[k - 1].value))
        throw new ChartError(
          `The chart is not valid: in ${name} the swatch values must rise from one swatch to the next, but ${p.swatches[k - 1].value} is followed by ${p.swatches[k].value}.`,
        );
    }
    if (p.centerMm - p.sizeMm / 2 < -1e-9 || p.centerMm + p.sizeMm / 2 > c.strip.lengthMm + 1e-9)
      throw new ChartError(`The chart is not valid: ${name} lies partly outside the ${c.strip.lengthMm} mm strip.`);
    return {
      analyte: p.analyte,
      label: p.label || p.analyte,
      unit: p.unit ?? "",
      centerMm: p.centerMm,
      sizeMm: p.sizeMm,
      swatches: p.swatches.map((s) => ({ value: s.value, color: s.color.toLowerCase(), lab: hexToLab(s.color) })),
    };
  });
  const byPos = [...pads].sort((a, b) => a.centerMm - b.centerMm);
  for (let i = 1; i < byPos.length; i++) {
    const a = byPos[i - 1], b = byPos[i];
    if (b.centerMm - a.centerMm < (a.sizeMm + b.sizeMm) / 2 - 1e-9)
      throw new ChartError(`The chart is not valid: the pads "${a.analyte}" and "${b.analyte}" overlap on the strip.`);
  }
  return {
    format: CHART_FORMAT,
    name: c.name ?? "",
    strip: { widthMm: c.strip.widthMm, lengthMm: c.strip.lengthMm, color: c.strip.color.toLowerCase(), lab: hexToLab(c.strip.color) },
    pads,
  };
}

/** Canonical strip-chart/1 JSON for a chart (Lab values and defaults are not written). */
export function exportChart(chart: StripChart): object {
  return {
    format: CHART_FORMAT,
    name: chart.name,
    strip: { widthMm: chart.strip.widthMm, lengthMm: chart.strip.lengthMm, color: chart.strip.color.toLowerCase() },
    pads: chart.pads.map((p) => ({
      analyte: p.analyte,
      label: p.label,
      unit: p.unit,
      centerMm: p.centerMm,
      sizeMm: p.sizeMm,
      swatches: p.swatches.map((s) => ({ value: s.value, color: s.color.toLowerCase() })),
    })),
  };
}
