/**
 * The strip chart as the renderer reads it: the `strip-chart/1` interchange format described in
 * shared/eval/README.md. Declared here (structurally equal to app/reading/chart.ts's StripChart) so
 * that the renderer stays independent of the reading engine it is used to test.
 */
export type RenderSwatch = { value: number; color: string };
export type RenderPad = {
  analyte: string;
  label: string;
  unit: string;
  centerMm: number;
  sizeMm: number;
  swatches: RenderSwatch[];
};
export type RenderChart = {
  format: "strip-chart/1";
  name: string;
  strip: { widthMm: number; lengthMm: number; color: string };
  pads: RenderPad[];
};

export type Point = [number, number];
export type Quad = [Point, Point, Point, Point];

const HEX = /^#[0-9a-f]{6}$/i;

/** Light checks on a chart handed to the renderer; throws with a plain message when it cannot draw it. */
export function asRenderChart(json: unknown): RenderChart {
  const c = json as RenderChart;
  if (!c || typeof c !== "object" || c.format !== "strip-chart/1") {
    throw new Error("not a strip-chart/1 chart");
  }
  if (!c.strip || !(c.strip.widthMm > 0) || !(c.strip.lengthMm > 0) || !HEX.test(c.strip.color)) {
    throw new Error("the chart's strip needs widthMm, lengthMm and a #rrggbb color");
  }
  if (!Array.isArray(c.pads) || c.pads.length === 0) throw new Error("the chart has no pads");
  for (const p of c.pads) {
    if (!(p.sizeMm > 0) || !(p.centerMm > 0)) throw new Error(`pad ${p.analyte}: bad geometry`);
    if (!Array.isArray(p.swatches) || p.swatches.length < 2) {
      throw new Error(`pad ${p.analyte}: needs at least two swatches`);
    }
    for (const s of p.swatches) {
      if (!HEX.test(s.color) || !Number.isFinite(s.value)) throw new Error(`pad ${p.analyte}: bad swatch`);
    }
  }
  return c;
}
