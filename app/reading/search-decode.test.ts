// The search copy decoded small by sharp, beside the working copy.
import sharp from "sharp";
import { describe, expect, it } from "vitest";
import { startDecode } from "./image";
import { parseChart } from "./chart";
import { decodeSearchCopy, earlySearch, searchDecodePays } from "./search-decode";
import { makeSearchCopy } from "./search-copy";

const grey = (width: number, height: number, v = 128) =>
  sharp({ create: { width, height, channels: 3, background: { r: v, g: v, b: v } } }).jpeg({ quality: 95 }).toBuffer();

describe("startDecode", () => {
  it("predicts the working copy's size that the decode then gives", async () => {
    for (const [w, h] of [[4032, 3024], [2999, 1999], [1000, 1334], [640, 480]]) {
      const started = await startDecode(await grey(w, h));
      const { image } = await started.decoded;
      expect([image.width, image.height]).toEqual([started.working.width, started.working.height]);
    }
  });
  it("tells a photo with an embedded colour profile from one without", async () => {
    const plain = await grey(640, 480);
    const profiled = await sharp(plain).withIccProfile("srgb").jpeg().toBuffer();
    expect((await startDecode(plain)).hasProfile).toBe(false);
    expect((await startDecode(profiled)).hasProfile).toBe(true);
  });
});

describe("decodeSearchCopy", () => {
  it("reduces by the same whole factor as the search copy made from the working copy", async () => {
    const photo = await grey(1600, 1200);
    const started = await startDecode(photo);
    const s = await decodeSearchCopy(photo, started.working);
    const fromWorking = makeSearchCopy((await started.decoded).image);
    expect(s).not.toBeNull();
    expect([s!.w, s!.h, s!.factor]).toEqual([fromWorking.w, fromWorking.h, fromWorking.factor]);
    // sRGB 128 is 0.2158 in linear light (IEC 61966-2-1), a grey has no saturation, plus the floor 0.002.
    expect(s!.whiteness[s!.w * 150 + 200]).toBeCloseTo(0.2178, 2);
    expect(fromWorking.whiteness[s!.w * 150 + 200]).toBeCloseTo(0.2178, 2);
  });
  it("gives nothing for a photo already as small as a search copy", async () => {
    expect(await decodeSearchCopy(await grey(400, 300), { width: 400, height: 300 })).toBeNull();
  });
  it("gives nothing for bytes that are no photo (the working decode reports the error)", async () => {
    expect(await decodeSearchCopy(Buffer.from("not a photo at all"), { width: 1600, height: 1200 })).toBeNull();
  });
});

describe("searchDecodePays", () => {
  it("decodes the search copy apart from a photo at least twice the working size, whatever its format", () => {
    expect(searchDecodePays({ width: 4032, height: 3024 }, { width: 1600, height: 1200 }, { format: "png" })).toBe(true);
    expect(searchDecodePays({ width: 3200, height: 2400 }, { width: 1600, height: 1200 })).toBe(true);
  });
  it("from a JPEG or WebP nearer the working size only when its own decode is slow: progressive, resized, or colour-managed", () => {
    expect(searchDecodePays({ width: 2016, height: 1512 }, { width: 1600, height: 1200 }, { format: "jpeg" })).toBe(true);
    expect(searchDecodePays({ width: 1000, height: 1334 }, { width: 1000, height: 1334 }, { format: "jpeg", progressive: true })).toBe(true);
    expect(searchDecodePays({ width: 1000, height: 1334 }, { width: 1000, height: 1334 }, { format: "jpeg", hasProfile: true })).toBe(true);
    // A profile that is sRGB itself is not converted: the working decode is fast, no second decode beside it.
    expect(searchDecodePays({ width: 1000, height: 1334 }, { width: 1000, height: 1334 }, { format: "jpeg", hasProfile: true, srgbProfile: true })).toBe(false);
    expect(searchDecodePays({ width: 1000, height: 1334 }, { width: 1000, height: 1334 }, { format: "jpeg", hasProfile: true, srgbProfile: true, progressive: true })).toBe(true);
    expect(searchDecodePays({ width: 4000, height: 3000 }, { width: 1600, height: 1200 }, { format: "jpeg", hasProfile: true, srgbProfile: true })).toBe(true);
    expect(searchDecodePays({ width: 1000, height: 1334 }, { width: 1000, height: 1334 }, { format: "webp" })).toBe(false);
    expect(searchDecodePays({ width: 1600, height: 1200 }, { width: 1600, height: 1200 }, { format: "jpeg" })).toBe(false);
    expect(searchDecodePays({ width: 2016, height: 1512 }, { width: 1600, height: 1200 }, { format: "png", hasProfile: true })).toBe(false);
    expect(searchDecodePays({ width: 1000, height: 1334 }, { width: 1000, height: 1334 }, { format: "tiff", progressive: true })).toBe(false);
  });
  it("never for a photo already about the size of a search copy", () => {
    expect(searchDecodePays({ width: 400, height: 300 }, { width: 400, height: 300 }, { format: "jpeg", progressive: true, hasProfile: true })).toBe(false);
  });
});

describe("earlySearch", () => {
  const chart = parseChart({
    format: "strip-chart/1",
    strip: { widthMm: 5, lengthMm: 80, color: "#f4f3ef" },
    pads: [{ analyte: "ph", label: "pH", unit: "pH", centerMm: 5, sizeMm: 5, swatches: [{ value: 7, color: "#e08040" }, { value: 8, color: "#c04060" }] }],
  });
  it("searches a JPEG's small copy before its working copy is decoded", async () => {
    const photo = await grey(2000, 1500);
    const early = await earlySearch(photo, await startDecode(photo), chart);
    expect(early?.search.factor).toBe(4);
    expect(Array.isArray(early?.wide)).toBe(true);
  });
  it("leaves a baseline JPEG at the working size to the working copy (a quick decode, not slowed by a second)", async () => {
    const photo = await grey(1600, 1200);
    expect(await earlySearch(photo, await startDecode(photo), chart)).toBeUndefined();
  });
  it("leaves a PNG near the working size to the working copy (no second full decode)", async () => {
    const photo = await sharp({ create: { width: 1600, height: 1200, channels: 3, background: "#808080" } }).png().toBuffer();
    expect(await earlySearch(photo, await startDecode(photo), chart)).toBeUndefined();
  });
});
