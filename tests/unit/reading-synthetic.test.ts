/**
 * The reader against synthetic phone photos of test strips.
 *
 * Source of truth: the renderer's own known values (tests/render/strip-photo.ts). Each photo is
 * drawn from a chart with pad colours set at a known fractional swatch index, so the true value
 * and index are known exactly; the read value is mapped back onto the pad's swatch scale
 * piecewise linearly, as the eval scorer does (shared/eval/README.md, "How a read is scored").
 * Goals (within 0.5 step for the large majority, within 1 step for all) are the project's own.
 */
import { existsSync, readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { readStrip, parseChart, ReadingError } from "../../app/reading/index";
import { valueToIndex } from "../render/colour";
import { renderStripPhoto, type CastName, type StripPhotoOptions, type SurfaceName } from "../render/strip-photo";
import { asRenderChart, type RenderChart } from "../render/types";

function load(path: string): RenderChart | null {
  return existsSync(path) ? asRenderChart(JSON.parse(readFileSync(path, "utf8"))) : null;
}
// The practice chart from the eval set, a 6-pad test chart of another geometry, and the demo
// charts of the technician's calibration (used when present).
const charts = [
  ["practice-3pad", load("/work/shared/eval/charts/practice-3pad.json") ?? load("../shared/eval/charts/practice-3pad.json")],
  ["test-6pad", load("tests/reading/charts/test-6pad.json")],
  ["demo-3pad", load("calibration/demo-3pad.json")],
  ["demo-6pad", load("calibration/demo-6pad.json")],
].filter((c): c is [string, RenderChart] => c[1] !== null);

const SURF: SurfaceName[] = ["paper", "counter", "wood", "cloth", "tiles"];
const CAST: CastName[] = ["daylight", "warm", "cool", "fluorescent"];
const MID_TILES = ["#d9d4c8", "#b8c7cf", "#c9d6c4"];
const SIZES: [number, number][] = [[1512, 2016], [2016, 1512], [1224, 1632], [1800, 1350]];

type Case = { name: string; chart: RenderChart; opts: StripPhotoOptions; known?: string };

// Cases to run as expected failures (it.fails) while the reader is known to get them wrong, by
// case number with the reason; vitest reports an entry once the reader copes, so it can go.
const KNOWN_FAILING: Record<number, string> = {};
const cases: Case[] = [];
const N = 30;
for (let i = 0; i < N; i++) {
  const [chartName, chart] = charts[i % charts.length]!;
  const [width, height] = SIZES[i % SIZES.length]!;
  const opts: StripPhotoOptions = {
    seed: 1000 + i,
    width,
    height,
    rotationDeg: Math.round(((i * 360) / N + 7 * (i % 3)) * 10) / 10 % 360,
    surface: SURF[i % SURF.length],
    cast: CAST[Math.floor(i / 2) % CAST.length],
    glare: i % 3 === 1 ? 1 + (i % 2) : 0,
    shadow: i % 4 === 2,
    // Mid-tone tiles here; near-white tiles have their own cases below.
    ...(i % SURF.length === 4 ? { surfaceColor: MID_TILES[i % MID_TILES.length] } : {}),
  };
  cases.push({ known: KNOWN_FAILING[i], name: `${chartName} #${i} ${opts.surface} ${opts.cast} rot ${opts.rotationDeg}${opts.glare ? " glare" : ""}${opts.shadow ? " shadow" : ""} ${width}x${height}`, chart, opts });
}

type Result = { name: string; analyte: string; err: number };
const results: Result[] = [];

describe("reading synthetic strip photos", () => {
  for (const c of cases) {
    (c.known ? it.fails : it)(`reads ${c.name} within 1 step on every pad${c.known ? ` (known: ${c.known})` : ""}`, async () => {
      const photo = await renderStripPhoto(c.chart, c.opts);
      const reading = await readStrip(photo.jpeg, parseChart(c.chart));
      expect(reading.pads.map((p) => p.analyte)).toEqual(c.chart.pads.map((p) => p.analyte));
      const errs = photo.truth.map((t, k) => {
        const pad = c.chart.pads[k]!;
        const read = reading.pads.find((p) => p.analyte === t.analyte)!;
        const err = Math.abs(valueToIndex(pad, read.value) - t.index);
        results.push({ name: c.name, analyte: t.analyte, err });
        return { analyte: t.analyte, truth: t.index, read: valueToIndex(pad, read.value), err };
      });
      for (const e of errs) expect(e.err, `${e.analyte}: true index ${e.truth}, read ${e.read.toFixed(3)}`).toBeLessThanOrEqual(1);
    });
  }

  it("reads the large majority of pads within 0.5 step", () => {
    expect(results.length).toBeGreaterThan(0);
    const within = results.filter((r) => r.err <= 0.5).length / results.length;
    const worst = [...results].sort((a, b) => b.err - a.err).slice(0, 5);
    // 0.85: the project's goal for these conditions (common practice for a colour-matching reader).
    expect(within, `worst: ${worst.map((w) => `${w.name} ${w.analyte} ${w.err.toFixed(2)}`).join("; ")}`).toBeGreaterThanOrEqual(0.85);
  });
});

// A white strip on near-white glazed tiles (tile #f2f2f0 against strip #f3f2ec or #f5f4f0), with
// grey grout lines running under and beside the strip: the hardest surface of the set.
describe("white strip on near-white tiles", () => {
  const white = [
    [charts[0]!, { seed: 5002, width: 1512, height: 2016, rotationDeg: 299.6 }],
    [charts[0]!, { seed: 5011, width: 1512, height: 2016, rotationDeg: 84.3, cast: "cool" }],
    [charts[1] ?? charts[0]!, { seed: 1009, width: 2016, height: 1512, rotationDeg: 108 }],
  ] as const;
  for (const [[chartName, chart], opts] of white) {
    it(`reads ${chartName} seed ${opts.seed} on #f2f2f0 tiles within 1 step on every pad`, async () => {
      const photo = await renderStripPhoto(chart, { ...opts, surface: "tiles", surfaceColor: "#f2f2f0", glare: 0, shadow: false });
      const reading = await readStrip(photo.jpeg, parseChart(chart));
      photo.truth.forEach((t, k) => {
        const read = reading.pads.find((p) => p.analyte === t.analyte)!;
        expect(Math.abs(valueToIndex(chart.pads[k]!, read.value) - t.index)).toBeLessThanOrEqual(1);
      });
    });
  }
});

describe("reading bad synthetic photos", () => {
  const chart = charts[0]![1];
  it("refuses a photo with no strip", async () => {
    for (const surface of ["paper", "wood", "tiles"] as const) {
      const photo = await renderStripPhoto(chart, { seed: 77, surface, noStrip: true, width: 1600, height: 1200 });
      const err = await readStrip(photo.jpeg, parseChart(chart)).then(() => null, (e: unknown) => e);
      expect(err, surface).toBeInstanceOf(ReadingError);
      expect((err as ReadingError).code, surface).toBe("no_strip");
    }
  });

  it("refuses a strip with fewer pads than the chart", async () => {
    for (const [seed, drawPads] of [[78, [chart.pads[0]!.analyte]], [79, chart.pads.slice(0, -1).map((p) => p.analyte)]] as const) {
      const photo = await renderStripPhoto(chart, { seed, drawPads: [...drawPads], width: 1600, height: 1200, cast: "daylight", glare: 0, shadow: false });
      const err = await readStrip(photo.jpeg, parseChart(chart)).then(() => null, (e: unknown) => e);
      expect(err, drawPads.join(",")).toBeInstanceOf(ReadingError);
      expect((err as ReadingError).code, drawPads.join(",")).toBe("too_few_pads");
    }
  });
});
