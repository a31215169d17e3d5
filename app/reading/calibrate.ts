// Chart calibration from a photo of the printed colour chart card.
//
// The technician lays a grid over the photo (rows = pads, columns = swatch values,
// four outer corners) and marks a blank white area of the card. Here:
//   grid corners -> projective map of the unit square -> one quad per cell (its inner part)
//   -> robust sampling of each cell in linear light (image.ts sampleQuad)
//   -> white-reference correction (the reader's, colour.ts whiteCorrectionMatrix) mapping the
//      card's blank paper to its known colour
//   -> CIELAB D65 and sRGB hex per cell.
// Pure: no database, no HTTP. Coordinates are in the original photo's pixels.
import { deltaE2000, hexToRgb, labToHex, linearRgbToLab, srgbToLinear, whiteCorrectionMatrix, correctLinear, type Lab, type Rgb, type WhiteCorrection } from "./colour";
import { decodePhoto, type RgbImage } from "./image";
import { sampleQuad } from "./region-sample";
import type { StripChart } from "./chart";

export type Point = [number, number];
/** Corner order: top-left, top-right, bottom-right, bottom-left. */
export type Quad = [Point, Point, Point, Point];

export type ChartGrid = {
  corners: Quad;
  rows: number;
  cols: number;
  /** Share of each cell's side that is sampled, centred (default 0.45). */
  sampleFill?: number;
};

export type CalibrationErrorCode = "bad_grid" | "grid_off_photo" | "no_white" | "bad_white";

export class CalibrationError extends Error {
  code: CalibrationErrorCode;
  constructor(code: CalibrationErrorCode, message: string) {
    super(message);
    this.name = "CalibrationError";
    this.code = code;
  }
}

export type SampledCell = { row: number; col: number; hex: string; lab: Lab; spreadDeltaE: number; quad: Quad };

export type ChartPhotoSample = {
  cells: SampledCell[][];
  white: { linear: Rgb; hex: string };
  warnings: string[];
};

// ---------------------------------------------------------------- geometry

/** Projective map (homography) taking the unit square's corners (0,0),(1,0),(1,1),(0,1) to the quad. */
export function unitSquareToQuad(q: Quad): (u: number, v: number) => Point {
  const [[x0, y0], [x1, y1], [x2, y2], [x3, y3]] = q;
  // Closed form for the square-to-quad mapping after Heckbert 1989, "Fundamentals of Texture Mapping and
  // Image Warping" (cited from memory); checked in calibrate.test.ts by mapping the corners back.
  const sx = x0 - x1 + x2 - x3, sy = y0 - y1 + y2 - y3;
  let a: number, b: number, c: number, d: number, e: number, f: number, g: number, h: number;
  if (Math.abs(sx) < 1e-9 && Math.abs(sy) < 1e-9) {
    (a = x1 - x0), (b = x2 - x1), (c = x0), (d = y1 - y0), (e = y2 - y1), (f = y0), (g = 0), (h = 0);
  } else {
    const dx1 = x1 - x2, dx2 = x3 - x2, dy1 = y1 - y2, dy2 = y3 - y2;
    const den = dx1 * dy2 - dx2 * dy1;
    g = (sx * dy2 - dx2 * sy) / den;
    h = (dx1 * sy - sx * dy1) / den;
    a = x1 - x0 + g * x1;
    b = x3 - x0 + h * x3;
    c = x0;
    d = y1 - y0 + g * y1;
    e = y3 - y0 + h * y3;
    f = y0;
  }
  return (u, v) => {
    const w = g * u + h * v + 1;
    return [(a * u + b * v + c) / w, (d * u + e * v + f) / w];
  };
}

function signedArea(q: readonly Point[]) {
  let s = 0;
  for (let i = 0; i < q.length; i++) {
    const [ax, ay] = q[i], [bx, by] = q[(i + 1) % q.length];
    s += ax * by - bx * ay;
  }
  return s / 2;
}

function isConvex(q: readonly Point[]) {
  let sign = 0;
  for (let i = 0; i < 4; i++) {
    const [ax, ay] = q[i], [bx, by] = q[(i + 1) % 4], [cx, cy] = q[(i + 2) % 4];
    const z = (bx - ax) * (cy - by) - (by - ay) * (cx - bx);
    if (Math.abs(z) < 1e-9) return false;
    if (sign === 0) sign = Math.sign(z);
    else if (Math.sign(z) !== sign) return false;
  }
  return true;
}

function checkQuad(q: unknown, what: string, width: number, height: number, code: CalibrationErrorCode): Quad {
  if (!Array.isArray(q) || q.length !== 4 || !q.every((p) => Array.isArray(p) && p.length === 2 && p.every((v) => typeof v === "number" && Number.isFinite(v))))
    throw new CalibrationError(code === "grid_off_photo" ? "bad_grid" : code, `The ${what} needs four corners.`);
  const quad = q as Quad;
  const off = quad.some(([x, y]) => x < 0 || y < 0 || x > width || y > height);
  if (off) throw new CalibrationError(code, `The ${what} lies partly outside the photo. Drag its corners back onto the photo.`);
  if (!isConvex(quad) || Math.abs(signedArea(quad)) < 16)
    throw new CalibrationError(code === "grid_off_photo" ? "bad_grid" : code, `The ${what} is folded over or too small. Drag its corners so they enclose the area in order: top-left, top-right, bottom-right, bottom-left.`);
  return quad;
}

/** Checks a grid against the photo's size (original pixels); throws CalibrationError with plain words. */
export function validateGrid(grid: ChartGrid, width: number, height: number): ChartGrid {
  if (!Number.isInteger(grid.rows) || grid.rows < 1 || grid.rows > 20) throw new CalibrationError("bad_grid", "The grid needs between 1 and 20 rows (one per pad).");
  if (!Number.isInteger(grid.cols) || grid.cols < 2 || grid.cols > 20) throw new CalibrationError("bad_grid", "The grid needs between 2 and 20 columns (one per swatch value).");
  checkQuad(grid.corners, "grid", width, height, "grid_off_photo");
  return grid;
}

/** The sampled (inner) quad of every cell: cells[row][col], in the grid's coordinates. */
export function cellQuads(grid: ChartGrid): Quad[][] {
  const map = unitSquareToQuad(grid.corners);
  const fill = Math.min(0.95, Math.max(0.05, grid.sampleFill ?? 0.45));
  const out: Quad[][] = [];
  for (let r = 0; r < grid.rows; r++) {
    const row: Quad[] = [];
    for (let c = 0; c < grid.cols; c++) {
      const u = (c + 0.5) / grid.cols, v = (r + 0.5) / grid.rows;
      const du = fill / grid.cols / 2, dv = fill / grid.rows / 2;
      row.push([map(u - du, v - dv), map(u + du, v - dv), map(u + du, v + dv), map(u - du, v + dv)]);
    }
    out.push(row);
  }
  return out;
}

// ---------------------------------------------------------------- sampling

const lumY = (c: readonly number[]) => 0.2126 * c[0] + 0.7152 * c[1] + 0.0722 * c[2];
const scaleQuad = (q: Quad, k: number): Quad => q.map(([x, y]) => [x * k, y * k]) as Quad;

/**
 * Samples every grid cell of a decoded photo and corrects it with the white reference.
 * `scale` converts the grid's coordinates to the image's pixels (working / original).
 */
export function sampleChartImage(
  img: RgbImage,
  grid: ChartGrid,
  white: Quad,
  opts: { paperColor?: string; scale?: number; original?: { width: number; height: number }; adaptation?: WhiteCorrection } = {},
): ChartPhotoSample {
  const k = opts.scale ?? 1;
  const W = opts.original?.width ?? img.width / k, H = opts.original?.height ?? img.height / k;
  validateGrid(grid, W, H);
  checkQuad(white, "white area", W, H, "no_white");
  const warnings: string[] = [];
  const ws = sampleQuad(img, scaleQuad(white, k), { whiteReference: true });
  if (!ws || ws.kept < 16) throw new CalibrationError("no_white", "The white area is too small to judge the light. Mark a larger blank white part of the card.");
  const wY = lumY(ws.linear);
  const [wr, wg, wb] = ws.linear;
  if (ws.clippedFraction > 0.5)
    throw new CalibrationError("bad_white", "The white area is overexposed (pure white in the photo), so the light cannot be judged. Take the photo again in softer light, without flash.");
  if (wY < 0.08)
    throw new CalibrationError("bad_white", "The area marked as white is too dark to be blank paper. Mark a blank white part of the card, or take the photo in better light.");
  if (Math.max(wr, wg, wb) / Math.max(1e-6, Math.min(wr, wg, wb)) > 3)
    throw new CalibrationError("bad_white", "The area marked as white is strongly coloured, so it is not blank paper. Mark a blank white part of the card.");
  if (ws.spreadDeltaE > 6)
    throw new CalibrationError("bad_white", "The area marked as white is not even (it holds print, a shadow or an edge). Mark a blank white part of the card.");
  const known = hexToRgb(opts.paperColor ?? "#ffffff").map(srgbToLinear);
  // The strip reader's light correction (colour.ts whiteCorrectionMatrix): von Kries scaling per
  // linear channel, the card's paper -> its known colour. On rendered casts this keeps the worst
  // swatch under 1 ΔE00 where Bradford (cone space) leaves up to 2.9 (calibrate.test.ts).
  const m = whiteCorrectionMatrix(ws.linear, known, opts.adaptation === "bradford" ? "bradford" : "channel");
  const quads = cellQuads(grid);
  let brighter = 0;
  const cells = quads.map((row, r) =>
    row.map((q, c) => {
      const s = sampleQuad(img, scaleQuad(q, k));
      if (!s) throw new CalibrationError("grid_off_photo", "The grid lies partly outside the photo. Drag its corners back onto the photo.");
      if (lumY(s.linear) > wY * 1.08) brighter++;
      const lin = correctLinear(m, s.linear).map((v) => Math.max(0, v)) as Rgb;
      const lab = linearRgbToLab(lin[0], lin[1], lin[2]);
      return { row: r, col: c, hex: labToHex(lab), lab, spreadDeltaE: s.spreadDeltaE, quad: q };
    }),
  );
  if (brighter > 0)
    throw new CalibrationError(
      "bad_white",
      `The area marked as white is darker than ${brighter === 1 ? "one cell" : `${brighter} cells`} of the grid, so it cannot be the blank card. Mark a blank white part of the card in the same light as the swatches.`,
    );
  const uneven = cells.flat().filter((c) => c.spreadDeltaE > 4);
  if (uneven.length)
    warnings.push(
      `${uneven.length === 1 ? "One cell looks" : `${uneven.length} cells look`} uneven (the grid may sit on a swatch edge): ${uneven
        .slice(0, 4)
        .map((c) => `row ${c.row + 1}, column ${c.col + 1}`)
        .join("; ")}.`,
    );
  return { cells, white: { linear: ws.linear, hex: labToHex(linearRgbToLab(wr, wg, wb)) }, warnings };
}

/** Decodes a chart photo and samples it; grid and white area are in the original photo's pixels. */
export async function sampleChartPhoto(photo: Buffer, grid: ChartGrid, white: Quad, opts: { paperColor?: string; adaptation?: WhiteCorrection } = {}) {
  const { image, original } = await decodePhoto(photo);
  const scale = image.width / original.width;
  return { ...sampleChartImage(image, grid, white, { ...opts, scale, original }), imageSize: original };
}

// ---------------------------------------------------------------- proposal

export type SwatchChange = { analyte: string; value: number; from: string; to: string; deltaE: number };

/**
 * Puts the sampled colours into a copy of the chart: row r is the chart's pad r, column c its
 * swatch c (cells past a pad's last swatch are ignored). Returns the new chart definition
 * (strip-chart/1, without Lab) and the changes.
 */
export function proposeFromSample(chart: StripChart, sample: Pick<ChartPhotoSample, "cells">) {
  if (sample.cells.length !== chart.pads.length)
    throw new CalibrationError("bad_grid", `The grid has ${sample.cells.length} rows but the chart has ${chart.pads.length} pads. Set one row per pad.`);
  const changes: SwatchChange[] = [];
  const pads = chart.pads.map((p, r) => {
    const row = sample.cells[r];
    if (row.length < p.swatches.length)
      throw new CalibrationError("bad_grid", `The grid has ${row.length} columns but ${p.label} has ${p.swatches.length} swatches. Set one column per swatch value.`);
    return {
      analyte: p.analyte,
      label: p.label,
      unit: p.unit,
      centerMm: p.centerMm,
      sizeMm: p.sizeMm,
      swatches: p.swatches.map((s, c) => {
        const to = row[c].hex;
        changes.push({ analyte: p.analyte, value: s.value, from: s.color, to, deltaE: deltaE2000(s.lab, row[c].lab) });
        return { value: s.value, color: to };
      }),
    };
  });
  return {
    definition: { format: chart.format, name: chart.name, strip: { widthMm: chart.strip.widthMm, lengthMm: chart.strip.lengthMm, color: chart.strip.color }, pads },
    changes,
  };
}
