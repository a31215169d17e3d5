/**
 * Renders a phone photo of a printed colour chart card: a white card with a grid of swatch squares
 * (row = pad, column = swatch), a blank white area usable as the light reference, lying on a surface,
 * under a colour cast, mildly rotated and tilted, with noise, blur and JPEG compression.
 *
 * Layout of the grid: `rows` x `cols` equal cells between the returned outer corners; each cell holds
 * its swatch square centred, `cellFill` of the cell's side. So cell (r, c) is centred at the fraction
 * ((c + 0.5) / cols, (r + 0.5) / rows) of the grid quad. Cells past a pad's last swatch stay blank.
 */
import {
  apply,
  castGains,
  checkSize,
  defaultSize,
  finish,
  inv3,
  makeLightFn,
  renderScene,
  sceneHomography,
  type CastName,
  type LightField,
} from "./camera";
import { hexToLinear, type Rgb } from "./colour";
import { layFlatObject, patch } from "./pixels";
import { makeRng } from "./prng";
import { makeSurface, SURFACES, type SurfaceName } from "./surfaces";
import type { Point, Quad, RenderChart } from "./types";

export type ChartPhotoOptions = {
  seed?: number;
  width?: number;
  height?: number;
  orientation?: "portrait" | "landscape";
  surface?: SurfaceName;
  surfaceColor?: string;
  /** Card rotation in degrees (default within +-12). */
  rotationDeg?: number;
  perspective?: number;
  pxPerMm?: number;
  cast?: CastName;
  gains?: Rgb;
  /** Default 0.75-0.92, so the white card does not clip. */
  exposure?: number;
  /** Default very mild (a few per cent) so one white reference holds over the card. */
  light?: Partial<LightField>;
  noise?: number;
  blur?: number;
  quality?: number;
  /** The card's paper colour, which is the light reference (default #ffffff). */
  cardColor?: string;
};

export type ChartLayout = {
  /** The grid's outer corners in image px: top-left, top-right, bottom-right, bottom-left. */
  corners: Quad;
  rows: number;
  cols: number;
  /** Share of a cell's side covered by its swatch square. */
  cellFill: number;
  /** A blank white area of the card (image px, same corner order). */
  white: Quad;
  /** The whole card (image px, same corner order). */
  card: Quad;
};

export type ChartConditions = {
  seed: number;
  width: number;
  height: number;
  surface: SurfaceName;
  rotationDeg: number;
  perspective: number;
  pxPerMm: number;
  cast: CastName | "custom";
  gains: Rgb;
  exposure: number;
  light: LightField;
  noise: number;
  blur: number;
  quality: number;
  cardColor: string;
};

export type ChartPhoto = {
  jpeg: Buffer;
  layout: ChartLayout;
  /** Hex per row (pad) and column (swatch), as printed; row r has that pad's swatch count. */
  truth: string[][];
  conditions: ChartConditions;
};

const CELL_MM = 12;
const FILL = 0.75;
const MARGIN_MM = 8;
const WHITE_GAP_MM = 6;
const WHITE_MM = 24;
/** The card's soft drop shadow on the surface (mm). */
const CARD_SHADOW = { reach: 4, depth: 0.3, softness: 1.2 };

export async function renderChartPhoto(chart: RenderChart, options: ChartPhotoOptions = {}): Promise<ChartPhoto> {
  const seed = options.seed ?? 1;
  const rng = makeRng(seed + 0x51f15e);
  const dSize = defaultSize(rng, options.orientation);
  const dSurface = rng.pick(SURFACES);
  const dRotation = rng.range(-12, 12);
  const dPerspective = rng.range(0, 0.03);
  const dSpan = rng.range(0.6, 0.8);
  const dCast = rng.pick(["daylight", "warm", "cool", "fluorescent"] as const);
  const dExposure = rng.range(0.75, 0.92);
  const dLight: LightField = { gradient: rng.range(0, 0.03), gradientAngleDeg: rng.range(0, 360), vignette: rng.range(0, 0.03) };
  const dNoise = rng.range(0.3, 1);
  const dBlurPerMp = rng.range(0.25, 0.5);
  const dQuality = rng.int(82, 95);

  const width = options.width ?? dSize[0];
  const height = options.height ?? dSize[1];
  checkSize(width, height);
  const rows = chart.pads.length;
  const cols = Math.max(...chart.pads.map((p) => p.swatches.length));
  const gridW = cols * CELL_MM;
  const gridH = rows * CELL_MM;
  const cardW = MARGIN_MM + gridW + WHITE_GAP_MM + WHITE_MM + MARGIN_MM;
  const cardH = MARGIN_MM + gridH + MARGIN_MM;
  // Card coordinates (mm) with the origin at the card's centre, y down.
  const gx0 = -cardW / 2 + MARGIN_MM;
  const gy0 = -cardH / 2 + MARGIN_MM;
  const wx0 = gx0 + gridW + WHITE_GAP_MM;

  const rotationDeg = options.rotationDeg ?? Math.round(dRotation * 10) / 10;
  const t = (rotationDeg * Math.PI) / 180;
  const ac = Math.abs(Math.cos(t));
  const as = Math.abs(Math.sin(t));
  let pxPerMm = options.pxPerMm ?? 0;
  if (!pxPerMm) {
    const fit = Math.min(width / (cardW * ac + cardH * as), height / (cardW * as + cardH * ac));
    pxPerMm = Math.round(fit * dSpan * 10) / 10;
  }
  const perspective = options.perspective ?? dPerspective;
  const cast: CastName | "custom" = options.gains ? "custom" : (options.cast ?? dCast);
  const gains: Rgb = options.gains ?? castGains(cast as CastName, rng);
  const exposure = options.exposure ?? Math.round(dExposure * 1000) / 1000;
  const light: LightField = { ...dLight, ...options.light };
  const noise = options.noise ?? dNoise;
  const blur = options.blur ?? dBlurPerMp * Math.sqrt((width * height) / 3e6);
  const quality = options.quality ?? dQuality;
  const cardColor = options.cardColor ?? "#ffffff";

  const centre: Point = [width / 2, height / 2];
  const H = sceneHomography(width, height, pxPerMm, rotationDeg, centre, perspective, rng);
  const Hi = inv3(H);
  const surface = makeSurface(options.surface ?? dSurface, rng, pxPerMm, options.surfaceColor);
  const lightFn = makeLightFn(width, height, light);
  const card = hexToLinear(cardColor);
  const cells: (Rgb | null)[][] = chart.pads.map((p) =>
    Array.from({ length: cols }, (_, c) => (p.swatches[c] ? hexToLinear(p.swatches[c]!.color) : null)),
  );
  const texSeed = rng.int(1, 1 << 30);
  const dropAng = rng.range(0, 2 * Math.PI);
  const dox = Math.cos(dropAng) * 1.2;
  const doy = Math.sin(dropAng) * 1.2;

  const halfW = cardW / 2;
  const halfH = cardH / 2;
  const sq = (CELL_MM * FILL) / 2;
  const cardObject = { halfA: halfW, halfB: halfH, pxPerMm, dox, doy, shadow: CARD_SHADOW, base: card, texture: 0.01, texSeed };
  const out = renderScene({ width, height, Hi, surface: surface.fn, lightFn, exposure, gains }, (X, Y, x, y, rgb) =>
    layFlatObject(rgb, X, Y, x, y, cardObject, (face) => {
      const gc = Math.floor((X - gx0) / CELL_MM);
      const gr = Math.floor((Y - gy0) / CELL_MM);
      // Check this cell and its neighbours for anti-aliased swatch edges.
      for (let rr = gr - 1; rr <= gr + 1; rr++) {
        if (rr < 0 || rr >= rows) continue;
        for (let cc = gc - 1; cc <= gc + 1; cc++) {
          if (cc < 0 || cc >= cols) continue;
          const col = cells[rr]![cc];
          if (col) patch(face, X - (gx0 + (cc + 0.5) * CELL_MM), Y - (gy0 + (rr + 0.5) * CELL_MM), sq, pxPerMm, col);
        }
      }
    }),
  );
  const jpeg = await finish(out, width, height, { blur, noise, quality }, rng);

  const P = (X: number, Y: number): Point => {
    const [a, c] = apply(H, X, Y);
    return [Math.round(a * 100) / 100, Math.round(c * 100) / 100];
  };
  const quad = (x0: number, y0: number, x1: number, y1: number): Quad => [P(x0, y0), P(x1, y0), P(x1, y1), P(x0, y1)];
  const layout: ChartLayout = {
    corners: quad(gx0, gy0, gx0 + gridW, gy0 + gridH),
    rows,
    cols,
    cellFill: FILL,
    white: quad(wx0 + 2, gy0 + 2, wx0 + WHITE_MM - 2, gy0 + gridH - 2),
    card: quad(-halfW, -halfH, halfW, halfH),
  };
  return {
    jpeg,
    layout,
    truth: chart.pads.map((p) => p.swatches.map((s) => s.color.toLowerCase())),
    conditions: {
      seed,
      width,
      height,
      surface: surface.name,
      rotationDeg,
      perspective: Math.round(perspective * 1000) / 1000,
      pxPerMm,
      cast,
      gains: gains.map((v) => Math.round(v * 1000) / 1000) as Rgb,
      exposure,
      light,
      noise: Math.round(noise * 1000) / 1000,
      blur: Math.round(blur * 1000) / 1000,
      quality,
      cardColor,
    },
  };
}


