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

/**
 * A scene of `width` × `height` px: the surface colour, optional horizontal lines, the strip.
 * `view`: a homography (row-major 3×3) from the flat scene's pixels to the photo's, for a camera
 * held at a tilt; each photo pixel shows the flat scene's point it comes from.
 */
export function drawScene(width: number, height: number, surface: [number, number, number], strip: SceneStrip, lines: SceneLine[] = [], view?: number[]): RgbImage {
  const data = new Uint8Array(width * height * 3);
  const a = (strip.angleDeg * Math.PI) / 180, ux = Math.cos(a), uy = Math.sin(a);
  const halfL = (strip.lengthMm * strip.pxPerMm) / 2, halfW = (strip.widthMm * strip.pxPerMm) / 2;
  const back = view ? inverse3(view) : null;
  for (let y = 0; y < height; y++)
    for (let x = 0; x < width; x++) {
      let c = surface;
      const [fx, fy] = back ? viewPoint(back, x + 0.5, y + 0.5) : [x + 0.5, y + 0.5];
      for (const l of lines) if (Math.abs(fy - l.y) <= l.thickness / 2) c = l.color;
      const dx = fx - strip.cx, dy = fy - strip.cy;
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

/** A point through a homography (row-major 3×3). */
export function viewPoint(H: number[], x: number, y: number): [number, number] {
  const w = H[6] * x + H[7] * y + H[8];
  return [(H[0] * x + H[1] * y + H[2]) / w, (H[3] * x + H[4] * y + H[5]) / w];
}

function inverse3(m: number[]): number[] {
  const [a, b, c, d, e, f, g, h, i] = m;
  const A = e * i - f * h, B = f * g - d * i, C = d * h - e * g;
  const k = 1 / (a * A + b * B + c * C);
  return [A * k, (c * h - b * i) * k, (b * f - c * e) * k, B * k, (a * i - c * g) * k, (c * d - a * f) * k, C * k, (b * g - a * h) * k, (a * e - b * d) * k];
}

/**
 * A camera tilted along x: the flat scene's right side seen (1 − `amount`) × as tall as its left
 * (further away), its left and right sides and its horizontal middle line kept in place:
 * x' = α·x/(1 + q·x), y' = (q·h/2·x + y)/(1 + q·x), a homography.
 */
export function keystoneView(width: number, height: number, amount: number): number[] {
  const q = amount / (width * (1 - amount)), alpha = 1 / (1 - amount);
  return [alpha, 0, 0, (q * height) / 2, 1, 0, q, 0, 1];
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
