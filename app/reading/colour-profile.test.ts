// The embedded-profile check, against the profiles libvips ships (through sharp's withIccProfile:
// its sRGB, Display P3 and CMYK profiles) and against sharp's own reading of the JPEG's profile.
import sharp from "sharp";
import { describe, expect, it } from "vitest";
import { SRGB_D50_COLORANTS, embedsSrgbProfile, isSrgbProfile, jpegIccProfile } from "./colour-profile";
import { startDecode } from "./image";

const grey = () => sharp({ create: { width: 240, height: 240, channels: 3, background: { r: 150, g: 90, b: 60 } } });
const jpegWith = (profile?: string) => (profile ? grey().withIccProfile(profile) : grey()).jpeg().toBuffer();

/** A copy of a profile with one colorant tag's X changed by `dx`. */
function withColorant(p: Uint8Array, sig: string, dx: number): Uint8Array {
  const q = Uint8Array.from(p), view = new DataView(q.buffer);
  const n = view.getUint32(128);
  for (let k = 0; k < n; k++) {
    const at = 132 + 12 * k;
    if (String.fromCharCode(...q.subarray(at, at + 4)) === sig) {
      const o = view.getUint32(at + 4) + 8;
      view.setInt32(o, view.getInt32(o) + Math.round(dx * 65536));
    }
  }
  return q;
}

describe("jpegIccProfile", () => {
  it("reads the profile a JPEG embeds, the same bytes as sharp reads", async () => {
    for (const profile of ["srgb", "p3", "cmyk"]) {
      const jpeg = await jpegWith(profile);
      const icc = jpegIccProfile(jpeg);
      const meta = await sharp(jpeg).metadata();
      expect(icc).toBeInstanceOf(Uint8Array);
      // The CMYK profile (about 1 MB) spans many APP2 segments, joined in order.
      expect(Buffer.compare(Buffer.from(icc!), meta.icc!)).toBe(0);
    }
  });
  it("null for a JPEG without one, undefined for what is not a JPEG or cannot be followed", async () => {
    expect(jpegIccProfile(await jpegWith())).toBeNull();
    expect(jpegIccProfile(await grey().png().toBuffer())).toBeUndefined();
    expect(jpegIccProfile(new Uint8Array(0))).toBeUndefined();
    const jpeg = await jpegWith("srgb");
    // Cut inside its header segments, or with a segment length running past the end.
    expect(jpegIccProfile(jpeg.subarray(0, 40))).toBeUndefined();
    const bad = Uint8Array.from(jpeg);
    bad[4] = 0xff;
    bad[5] = 0xff;
    expect(jpegIccProfile(bad)).toBeUndefined();
  });
});

describe("isSrgbProfile", () => {
  it("libvips's sRGB profile is sRGB; its Display P3 and CMYK profiles are not", async () => {
    expect(isSrgbProfile(jpegIccProfile(await jpegWith("srgb"))!)).toBe(true);
    expect(isSrgbProfile(jpegIccProfile(await jpegWith("p3"))!)).toBe(false);
    expect(isSrgbProfile(jpegIccProfile(await jpegWith("cmyk"))!)).toBe(false);
  });
  it("an sRGB profile with a colorant moved, or cut short, is not", async () => {
    const srgb = jpegIccProfile(await jpegWith("srgb"))!;
    expect(isSrgbProfile(withColorant(srgb, "gXYZ", 0.001))).toBe(true);
    for (const sig of Object.keys(SRGB_D50_COLORANTS)) expect(isSrgbProfile(withColorant(srgb, sig, 0.01))).toBe(false);
    expect(isSrgbProfile(srgb.subarray(0, srgb.length - 4))).toBe(false);
    expect(isSrgbProfile(new Uint8Array(100))).toBe(false);
  });
});

describe("decoding a photo with an embedded profile", () => {
  it("an sRGB photo decodes to the same pixels as with its profile converted through", async () => {
    // A photo with real texture: noise over a gradient.
    const w = 320, h = 240, raw = new Uint8Array(w * h * 3);
    let seed = 3;
    for (let i = 0; i < raw.length; i++) raw[i] = Math.min(255, ((i / 3) % w) * 0.6 + ((seed = (seed * 48271) % 2147483647) % 60));
    const jpeg = await sharp(raw, { raw: { width: w, height: h, channels: 3 } }).withIccProfile("srgb").jpeg({ quality: 90 }).toBuffer();
    expect(embedsSrgbProfile(jpeg)).toBe(true);
    const started = await startDecode(jpeg);
    expect(started.srgbProfile).toBe(true);
    const { image } = await started.decoded;
    const managed = await sharp(jpeg).removeAlpha().toColourspace("srgb").raw().toBuffer();
    let worst = 0;
    for (let i = 0; i < managed.length; i++) worst = Math.max(worst, Math.abs(managed[i] - image.data[i]));
    expect(worst).toBeLessThanOrEqual(1);
  });
  it("a Display P3 photo is still converted to sRGB through its profile", async () => {
    const jpeg = await grey().withIccProfile("p3").jpeg({ quality: 95 }).toBuffer();
    const started = await startDecode(jpeg);
    expect(started.srgbProfile).toBe(false);
    const { image } = await started.decoded;
    const managed = await sharp(jpeg).removeAlpha().toColourspace("srgb").raw().toBuffer();
    const ignored = await sharp(jpeg, { ignoreIcc: true }).removeAlpha().toColourspace("srgb").raw().toBuffer();
    expect(Buffer.compare(Buffer.from(image.data), managed)).toBe(0);
    // And the conversion matters for this colour.
    expect(Buffer.compare(managed, ignored)).not.toBe(0);
  });
});
