/**
 * Renders a phone photo of a wet reagent test strip lying on a surface, with known pad values, for
 * testing the reader. Pixel work is done in linear light on typed arrays; sharp blurs and encodes.
 *
 * Geometry follows the chart (strip-chart/1): a `strip.widthMm` x `strip.lengthMm` strip in
 * `strip.color`, square pads of `sizeMm` centred across the width, `centerMm` from the tip.
 * A pad's colour for a value is the chart's two neighbouring swatches mixed (CIELAB by default) at
 * the value's fractional swatch index; the truth gives that value and index.
 */
import {
  castGains,
  checkSize,
  defaultSize,
  finish,
  makeLightFn,
  renderScene,
  sceneHomography,
  apply,
  inv3,
  type CastName,
  type LightField,
} from "./camera";
import { hexToLinear, indexToValue, padColourAt, valueToIndex, type PadMix, type Rgb } from "./colour";
import { layFlatObject, patch } from "./pixels";
import { fbm, makeRng } from "./prng";
import { makeSurface, SURFACES, type SurfaceName } from "./surfaces";
import type { Point, RenderChart } from "./types";

export type { SurfaceName } from "./surfaces";
export type { CastName } from "./camera";

export type StripPhotoOptions = {
  /** Seed of every random choice not given below (default 1). Same seed and options, same photo. */
  seed?: number;
  /** Frame size in pixels (up to 12 MP); default a 2-3 MP 4:3 phone frame. */
  width?: number;
  height?: number;
  /** Used only when width/height are not given. */
  orientation?: "portrait" | "landscape";
  surface?: SurfaceName;
  /** The surface's main colour (#rrggbb); default one picked at random for the surface kind. */
  surfaceColor?: string;
  /** Strip direction, degrees clockwise from "tip to the left" (any angle). */
  rotationDeg?: number;
  /** Homography strength: image corners moved by up to this share of the shorter side (0..0.1). */
  perspective?: number;
  /** Scale on the strip's plane. Default: the strip spans about 35-60 % of the long side. */
  pxPerMm?: number;
  /** Strip centre in pixels; default random, strip fully in frame. */
  centre?: Point;
  cast?: CastName;
  /** Per-channel illuminant gains in linear light; overrides `cast`. */
  gains?: Rgb;
  /** Overall exposure multiplier in linear light (1 = the chart's colours at full light). */
  exposure?: number;
  /** Uneven light: gradient depth 0..1, its direction, vignette depth 0..1. */
  light?: Partial<LightField>;
  /** A soft shadow across part of the strip (either the pad end or the handle end in shadow). */
  shadow?: boolean;
  /** Number of small specular glare spots on wet pads. */
  glare?: number;
  /** Sensor noise level (0 none, 1 typical). */
  noise?: number;
  /** Gaussian blur sigma in pixels (0 none). */
  blur?: number;
  /** JPEG quality. */
  quality?: number;
  /** Pad values by analyte; pads not named get random values. */
  values?: Record<string, number>;
  /** Pad fractional swatch indices by analyte (used where `values` does not name the pad). */
  indices?: Record<string, number>;
  /** How a value between two swatches is coloured: mixed in CIELAB (default) or linear RGB. */
  padMix?: PadMix;
  /** Analytes whose pads are drawn (default all); the others are left bare strip. */
  drawPads?: string[];
  /** Photo of the surface alone, with no strip. */
  noStrip?: boolean;
  /** Faint mottling of the wet pads (default true). */
  padTexture?: boolean;
};

/** The strip's soft drop shadow on the surface (mm). */
const STRIP_SHADOW = { reach: 3, depth: 0.32, softness: 0.7 };

export type StripTruth = { analyte: string; value: number; index: number };

export type StripConditions = {
  seed: number;
  width: number;
  height: number;
  surface: SurfaceName;
  surfaceColor: string;
  rotationDeg: number;
  perspective: number;
  pxPerMm: number;
  centre: Point;
  cast: CastName | "custom";
  gains: Rgb;
  exposure: number;
  light: LightField;
  shadow: null | { onPads: boolean; depth: number; edgeMm: number; softMm: number };
  glare: { analyte: string; x: number; y: number; radiusPx: number }[];
  noise: number;
  blur: number;
  quality: number;
  padMix: PadMix;
  noStrip: boolean;
  drawnPads: string[];
  /** Strip corners in image px: tip side (two), then handle end (two). */
  stripCornersPx: [Point, Point, Point, Point] | null;
  padCentersPx: { analyte: string; x: number; y: number }[];
};

export type StripPhoto = { jpeg: Buffer; truth: StripTruth[]; conditions: StripConditions };

const CASTS: readonly CastName[] = ["daylight", "daylight", "warm", "cool", "fluorescent"];

export async function renderStripPhoto(chart: RenderChart, options: StripPhotoOptions = {}): Promise<StripPhoto> {
  const seed = options.seed ?? 1;
  const rng = makeRng(seed);

  // Every random choice is drawn in the same order whatever is given, so that fixing one option
  // leaves the others as they were for that seed.
  const dSize = defaultSize(rng, options.orientation);
  const dSurface = rng.pick(SURFACES);
  const dRotation = rng.range(0, 360);
  const dPerspective = rng.range(0, 0.04);
  const dSpan = rng.range(0.35, 0.6);
  const dCentreU = rng.next();
  const dCentreV = rng.next();
  const dCast = rng.pick(CASTS);
  const dExposure = rng.range(0.8, 1.08);
  const dLight: LightField = { gradient: rng.range(0, 0.3), gradientAngleDeg: rng.range(0, 360), vignette: rng.range(0, 0.3) };
  const dShadow = rng.chance(0.25);
  const dGlare = rng.chance(0.3) ? rng.int(1, 2) : 0;
  const dNoise = rng.range(0.3, 1.2);
  const dBlurPerMp = rng.range(0.25, 0.55);
  const dQuality = rng.int(78, 93);
  const dIndices = chart.pads.map((p) => {
    const n = p.swatches.length - 1;
    return rng.chance(0.3) ? rng.int(0, n) : Math.round(rng.range(0, n) * 1000) / 1000;
  });
  // Pads that read one analyte together (a wide-range strip's four pH pads) show one value: the
  // index drawn for the analyte's first pad.
  const firstPadOf = new Map<string, number>();
  chart.pads.forEach((p, i) => firstPadOf.has(p.analyte) || firstPadOf.set(p.analyte, i));

  const width = options.width ?? dSize[0];
  const height = options.height ?? dSize[1];
  checkSize(width, height);
  const L = chart.strip.lengthMm;
  const Wd = chart.strip.widthMm;
  const rotationDeg = options.rotationDeg ?? Math.round(dRotation * 10) / 10;
  const perspective = options.perspective ?? dPerspective;
  const t = (rotationDeg * Math.PI) / 180;
  const ac = Math.abs(Math.cos(t));
  const as = Math.abs(Math.sin(t));
  let pxPerMm = options.pxPerMm ?? (dSpan * Math.max(width, height)) / L;
  if (options.pxPerMm === undefined) {
    // Fit the rotated strip inside 85 % of the frame.
    const fit = Math.min((0.85 * width) / (L * ac + Wd * as), (0.85 * height) / (L * as + Wd * ac));
    pxPerMm = Math.round(Math.min(pxPerMm, fit) * 10) / 10;
  }
  const bw = (L * ac + Wd * as) * pxPerMm;
  const bh = (L * as + Wd * ac) * pxPerMm;
  const mx = Math.max(0, width - bw) * 0.9;
  const my = Math.max(0, height - bh) * 0.9;
  const centre: Point = options.centre ?? [
    Math.round(width / 2 + (dCentreU - 0.5) * mx),
    Math.round(height / 2 + (dCentreV - 0.5) * my),
  ];

  const cast: CastName | "custom" = options.gains ? "custom" : (options.cast ?? dCast);
  const gains: Rgb = options.gains ?? castGains(cast as CastName, rng);
  const exposure = options.exposure ?? Math.round(dExposure * 1000) / 1000;
  const light: LightField = { ...dLight, ...options.light };
  const noise = options.noise ?? dNoise;
  const blur = options.blur ?? dBlurPerMp * Math.sqrt((width * height) / 3e6);
  const quality = options.quality ?? dQuality;
  const padMix = options.padMix ?? "lab";
  const noStrip = options.noStrip ?? false;
  const drawSet = new Set(options.drawPads ?? chart.pads.map((p) => p.analyte));
  const padTexture = options.padTexture ?? true;

  const H = sceneHomography(width, height, pxPerMm, rotationDeg, centre, perspective, rng);
  const Hi = inv3(H);
  const surface = makeSurface(options.surface ?? dSurface, rng, pxPerMm, options.surfaceColor);
  const lightFn = makeLightFn(width, height, light);

  // Pads: truth and colours.
  const truth: StripTruth[] = [];
  const pads: { u: number; half: number; col: Rgb; analyte: string }[] = [];
  chart.pads.forEach((p, i) => {
    if (noStrip || !drawSet.has(p.analyte)) return;
    let index: number;
    let value: number;
    if (options.values && options.values[p.analyte] !== undefined) {
      value = options.values[p.analyte]!;
      index = valueToIndex(p, value);
    } else {
      index = options.indices?.[p.analyte] ?? dIndices[firstPadOf.get(p.analyte)!]!;
      index = Math.max(0, Math.min(p.swatches.length - 1, index));
      value = indexToValue(p, index);
    }
    truth.push({ analyte: p.analyte, value, index });
    pads.push({ u: p.centerMm, half: p.sizeMm / 2, col: padColourAt(p, index, padMix), analyte: p.analyte });
  });
  const padEnd = chart.pads.reduce((m, p) => Math.max(m, p.centerMm + p.sizeMm / 2), 0);

  // Soft shadow: a half-plane whose soft edge crosses the strip beyond the last pad.
  const shadowOn = options.shadow ?? dShadow;
  let shadow: StripConditions["shadow"] = null;
  let shadowFn: ((X: number, Y: number) => number) | null = null;
  {
    const onPads = rng.chance(0.5);
    const depth = rng.range(0.3, 0.55);
    const soft = rng.range(3, 10);
    const phi = rng.range(-0.7, 0.7);
    const lo = padEnd + soft / 2 + 2;
    const hi = L - 6;
    const edge = hi > lo ? rng.range(lo, hi) : Math.max(padEnd + 1, L * 0.8);
    if (shadowOn && !noStrip) {
      shadow = { onPads, depth, edgeMm: edge, softMm: soft };
      const nx = Math.cos(phi);
      const ny = Math.sin(phi);
      const X0 = edge - L / 2;
      shadowFn = (X, Y) => {
        let s = ((X - X0) * nx + Y * ny) / soft; // in edge widths, + towards the handle
        if (onPads) s = -s;
        const sm = s <= -0.5 ? 0 : s >= 0.5 ? 1 : smooth(s + 0.5);
        return 1 - depth * sm;
      };
    }
  }

  // Glare spots on wet pads.
  const glareCount = noStrip || pads.length === 0 ? 0 : (options.glare ?? dGlare);
  const spots: { X: number; Y: number; r: number; peak: number; analyte: string }[] = [];
  for (let g = 0; g < glareCount; g++) {
    const p = pads[rng.int(0, pads.length - 1)]!;
    spots.push({
      X: p.u - L / 2 + rng.range(-0.3, 0.3) * 2 * p.half,
      Y: rng.range(-0.3, 0.3) * 2 * p.half,
      r: rng.range(0.12, 0.3) * p.half,
      peak: rng.range(0.6, 1.4),
      analyte: p.analyte,
    });
  }

  // Drop shadow of the strip on the surface (light from one side).
  const dropAng = rng.range(0, 2 * Math.PI);
  const dropOff = rng.range(0.3, 0.8);
  const dox = Math.cos(dropAng) * dropOff;
  const doy = Math.sin(dropAng) * dropOff;
  const stripCol = hexToLinear(chart.strip.color);
  const texSeed = rng.int(1, 1 << 30);

  const halfL = L / 2;
  const halfW = Wd / 2;
  const ppm = pxPerMm;
  const stripObject = { halfA: halfL, halfB: halfW, pxPerMm: ppm, dox, doy, shadow: STRIP_SHADOW, base: stripCol, texture: 0.012, texSeed };
  const out = renderScene({ width, height, Hi, surface: surface.fn, lightFn, exposure, gains, shadowFn, spots }, (X, Y, x, y, rgb) => {
    if (noStrip) return;
    layFlatObject(rgb, X, Y, x, y, stripObject, (face) => {
      const u = X + halfL;
      for (let k = 0; k < pads.length; k++) {
        const p = pads[k]!;
        patch(face, u - p.u, Y, p.half, ppm, p.col, padTexture ? () => 1 + 0.03 * fbm(u * 1.5, Y * 1.5, texSeed + k, 2) : undefined);
      }
    });
  });

  const jpeg = await finish(out, width, height, { blur, noise, quality }, rng);

  const toPx = (X: number, Y: number): Point => {
    const [a, c] = apply(H, X, Y);
    return [Math.round(a * 10) / 10, Math.round(c * 10) / 10];
  };
  const conditions: StripConditions = {
    seed,
    width,
    height,
    surface: surface.name,
    surfaceColor: surface.base,
    rotationDeg,
    perspective: Math.round(perspective * 1000) / 1000,
    pxPerMm,
    centre,
    cast,
    gains: gains.map((g) => Math.round(g * 1000) / 1000) as Rgb,
    exposure,
    light: {
      gradient: Math.round(light.gradient * 1000) / 1000,
      gradientAngleDeg: Math.round(light.gradientAngleDeg),
      vignette: Math.round(light.vignette * 1000) / 1000,
    },
    shadow,
    glare: spots.map((s) => {
      const [x, y] = toPx(s.X, s.Y);
      return { analyte: s.analyte, x, y, radiusPx: Math.round(s.r * pxPerMm * 10) / 10 };
    }),
    noise: Math.round(noise * 1000) / 1000,
    blur: Math.round(blur * 1000) / 1000,
    quality,
    padMix,
    noStrip,
    drawnPads: pads.map((p) => p.analyte),
    stripCornersPx: noStrip
      ? null
      : [toPx(-halfL, -halfW), toPx(-halfL, halfW), toPx(halfL, halfW), toPx(halfL, -halfW)],
    padCentersPx: pads.map((p) => {
      const [x, y] = toPx(p.u - halfL, 0);
      return { analyte: p.analyte, x, y };
    }),
  };
  return { jpeg, truth, conditions };
}


function smooth(t: number): number {
  return t * t * (3 - 2 * t);
}

