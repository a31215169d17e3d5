/**
 * Small synthetic scenes for the locator's unit tests: a strip drawn as a rotated rectangle on a
 * plain surface, its pads as squares at the chart's positions, in 8-bit sRGB. No light, noise or
 * blur: each step is tested on a scene whose true geometry is known exactly. Colours invented.
 */
import type { RgbImage } from "../../app/reading/image";

export type SceneStrip = {
  /** Strip centre (px). */
  cx: number;
  cy: number;
  /** Direction from the tip to the handle, degrees (x right, y down). */
  angleDeg: number;
  pxPerMm: number;
  widthMm: number;
  lengthMm: number;
  color: [number, number, number];
  /** Pads: distance of the centre from the tip and side, in mm. */
  pads: { centerMm: number; sizeMm: number; color: [number, number, number] }[];
};

/** A plain 80 mm strip with three pads (orange, blue, pink) near its tip; place and size it with `at`. */
export function threePadStrip(at: Pick<SceneStrip, "cx" | "cy" | "angleDeg" | "pxPerMm">): SceneStrip {
  return {
    ...at, widthMm: 5, lengthMm: 80, color: [244, 243, 239],
    pads: [
      { centerMm: 4, sizeMm: 5, color: [220, 150, 90] },
      { centerMm: 11, sizeMm: 5, color: [150, 170, 210] },
      { centerMm: 18, sizeMm: 5, color: [200, 120, 160] },
    ],
  };
}

/** A horizontal line across the surface (grout, a seam), drawn under the strip. */
export type SceneLine = { y: number; thickness: number; color: [number, number, number] };

/** A scene of `width` × `height` px: the surface colour, optional horizontal lines, the strip. */
export function drawScene(width: number, height: number, surface: [number, number, number], strip: SceneStrip, lines: SceneLine[] = []): RgbImage {
  const data = new Uint8Array(width * height * 3);
  const a = (strip.angleDeg * Math.PI) / 180, ux = Math.cos(a), uy = Math.sin(a);
  const halfL = (strip.lengthMm * strip.pxPerMm) / 2, halfW = (strip.widthMm * strip.pxPerMm) / 2;
  for (let y = 0; y < height; y++)
    for (let x = 0; x < width; x++) {
      let c = surface;
      for (const l of lines) if (Math.abs(y + 0.5 - l.y) <= l.thickness / 2) c = l.color;
      const dx = x + 0.5 - strip.cx, dy = y + 0.5 - strip.cy;
      const t = dx * ux + dy * uy, s = -dx * uy + dy * ux; // t from the centre towards the handle
      if (Math.abs(t) <= halfL && Math.abs(s) <= halfW) {
        c = strip.color;
        const mm = (t + halfL) / strip.pxPerMm; // from the tip
        for (const p of strip.pads) if (Math.abs(mm - p.centerMm) <= p.sizeMm / 2 && Math.abs(s) <= (p.sizeMm / 2) * strip.pxPerMm) c = p.color;
      }
      data.set(c, (y * width + x) * 3);
    }
  return { width, height, data };
}

/** Where the scene puts a point `mm` from the tip on the strip's axis. */
export function scenePoint(strip: SceneStrip, mm: number): [number, number] {
  const a = (strip.angleDeg * Math.PI) / 180;
  const t = mm * strip.pxPerMm - (strip.lengthMm * strip.pxPerMm) / 2;
  return [strip.cx + t * Math.cos(a), strip.cy + t * Math.sin(a)];
}

/** A chart (strip-chart/1) describing a scene's strip, with swatches around the drawn colours. */
export function sceneChart(strip: SceneStrip) {
  const hex = (c: number[]) => "#" + c.map((v) => Math.max(0, Math.min(255, Math.round(v))).toString(16).padStart(2, "0")).join("");
  return {
    format: "strip-chart/1",
    name: "scene",
    strip: { widthMm: strip.widthMm, lengthMm: strip.lengthMm, color: hex(strip.color) },
    pads: strip.pads.map((p, i) => ({
      analyte: `analyte_${i + 1}`,
      label: `Pad ${i + 1}`,
      unit: "mg/L",
      centerMm: p.centerMm,
      sizeMm: p.sizeMm,
      swatches: [0, 1, 2].map((k) => ({ value: k, color: hex(p.color.map((v) => v + (k - 1) * 18)) })),
    })),
  };
}
