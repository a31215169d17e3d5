import fs from "node:fs";
import zlib from "node:zlib";
import sharp from "sharp";
import { describe, expect, it } from "vitest";
import { renderStripPhoto } from "../../tests/render/strip-photo";
import { asRenderChart } from "../../tests/render/types";
import { parseChart } from "./chart";
import { ReadingError, readStrip } from "./index";

const demo3Json = JSON.parse(fs.readFileSync("calibration/demo-3pad.json", "utf8"));
const demo6Json = JSON.parse(fs.readFileSync("calibration/demo-6pad.json", "utf8"));
const demo3 = parseChart(demo3Json);
const demo6 = parseChart(demo6Json);

async function expectReadingError(p: Promise<unknown>, code: string, words: RegExp) {
  const e = await p.then(
    () => null,
    (err) => err,
  );
  expect(e).toBeInstanceOf(ReadingError);
  expect((e as ReadingError).code).toBe(code);
  expect((e as ReadingError).message).toMatch(words);
}

function pngChunk(type: string, data: Buffer) {
  const len = Buffer.alloc(4);
  len.writeUInt32BE(data.length);
  const td = Buffer.concat([Buffer.from(type, "ascii"), data]);
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(zlib.crc32(td) >>> 0);
  return Buffer.concat([len, td, crc]);
}

describe("bad photos give a clear ReadingError", () => {
  it("not an image", async () => {
    await expectReadingError(readStrip(Buffer.from("this is a shopping list, not a photo of a strip"), demo3), "not_an_image", /not a photo/);
  });
  it("a truncated JPEG", async () => {
    const jpeg = await sharp({ create: { width: 900, height: 700, channels: 3, background: "#8a8f96", noise: { type: "gaussian", mean: 128, sigma: 30 } } })
      .jpeg({ quality: 90 })
      .toBuffer();
    await expectReadingError(readStrip(jpeg.subarray(0, Math.floor(jpeg.length / 2)), demo3), "truncated", /incomplete or damaged/);
  });
  it("a 1×1 image", async () => {
    const png = await sharp({ create: { width: 1, height: 1, channels: 3, background: "#ffffff" } }).png().toBuffer();
    await expectReadingError(readStrip(png, demo3), "too_small", /too small/);
  });
  it("a decompression bomb (PNG header declaring 10000 × 10000)", async () => {
    const ihdr = Buffer.alloc(13);
    ihdr.writeUInt32BE(10000, 0);
    ihdr.writeUInt32BE(10000, 4);
    ihdr[8] = 8; // bit depth
    ihdr[9] = 2; // RGB
    const idat = zlib.deflateSync(Buffer.alloc(30001)); // far less data than declared
    const png = Buffer.concat([
      Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
      pngChunk("IHDR", ihdr),
      pngChunk("IDAT", idat),
      pngChunk("IEND", Buffer.alloc(0)),
    ]);
    expect(png.length).toBeLessThan(2000);
    await expectReadingError(readStrip(png, demo3), "too_large", /too large/);
  });
  it("a photo with no strip", async () => {
    const surface = await sharp({ create: { width: 1200, height: 900, channels: 3, background: "#7d746a", noise: { type: "gaussian", mean: 120, sigma: 12 } } })
      .blur(1.5)
      .jpeg()
      .toBuffer();
    await expectReadingError(readStrip(surface, demo3), "no_strip", /No test strip/);
    const rendered = await renderStripPhoto(asRenderChart(demo3Json), { seed: 5, noStrip: true, surface: "wood" });
    await expectReadingError(readStrip(rendered.jpeg, demo3), "no_strip", /No test strip/);
  });
  it("a strip with fewer pads than the chart", async () => {
    const photo = await renderStripPhoto(asRenderChart(demo6Json), { seed: 7, drawPads: ["total_hardness", "total_chlorine", "free_chlorine"], surface: "counter" });
    await expectReadingError(readStrip(photo.jpeg, demo6), "too_few_pads", /fewer test pads than the chart expects \(3 of 6/);
  });
  it("a chart that is not valid", async () => {
    const photo = await renderStripPhoto(asRenderChart(demo3Json), { seed: 2 });
    await expectReadingError(readStrip(photo.jpeg, { ...demo3Json, format: "strip-chart/9" }), "bad_chart", /version/);
  });
});

describe("reading a rendered strip (synthetic renderer, invented demo chart)", () => {
  it("reads each pad within half a chart step and returns crops", async () => {
    for (const seed of [11, 12]) {
      const photo = await renderStripPhoto(asRenderChart(demo6Json), { seed });
      const r = await readStrip(photo.jpeg, demo6, { crops: true });
      expect(r.pads).toHaveLength(6);
      for (const t of photo.truth) {
        const p = r.pads.find((q) => q.analyte === t.analyte)!;
        expect(Math.abs(p.swatchIndex - t.index)).toBeLessThanOrEqual(0.5);
        expect(p.confidence).toBeGreaterThanOrEqual(0);
        expect(p.confidence).toBeLessThanOrEqual(1);
        expect(p.crop!.length).toBeGreaterThan(50);
      }
      expect(r.imageSize).toEqual({ width: photo.conditions.width, height: photo.conditions.height });
    }
  });
});
