// Photo decoding (header checks, the working copy) and pad crops.
import sharp, { type Metadata, type OutputInfo } from "sharp";
import { embedsSrgbProfile } from "./colour-profile";

export type ReadingErrorCode = "not_an_image" | "truncated" | "too_small" | "too_large" | "no_strip" | "too_few_pads" | "bad_chart";

export class ReadingError extends Error {
  code: ReadingErrorCode;
  constructor(code: ReadingErrorCode, message: string) {
    super(message);
    this.name = "ReadingError";
    this.code = code;
  }
}

/** An 8-bit sRGB image, 3 channels interleaved, row-major. */
export type RgbImage = { width: number; height: number; data: Uint8Array };

/** Photos above this many pixels are refused before decoding (decompression bombs). */
export const MAX_INPUT_PIXELS = 50_000_000;
/** The shortest side a photo may have. */
export const MIN_SIDE = 200;
/** Long side of the copy the reader works on. */
export const WORK_LONG_SIDE = 1600;

/**
 * sharp's input options for a photo. `ignoreIcc`: the photo's embedded profile is sRGB itself
 * (colour-profile.ts): its pixels are taken as they are, with no colour transform to sRGB.
 */
export function sharpInputOptions(ignoreIcc = false) {
  return { limitInputPixels: MAX_INPUT_PIXELS, failOn: "truncated" as const, sequentialRead: true, ...(ignoreIcc ? { ignoreIcc } : {}) };
}

/**
 * The sharp pipeline the reader decodes with. The benchmark's baseline is this pipeline as sharp
 * runs it by default (`ignoreIcc` false: every embedded profile converted through).
 */
export function workingPipeline(photo: Buffer, longSide = WORK_LONG_SIDE, ignoreIcc = false) {
  return sharp(photo, sharpInputOptions(ignoreIcc))
    .rotate()
    .resize({ width: longSide, height: longSide, fit: "inside", withoutEnlargement: true })
    .removeAlpha()
    .toColourspace("srgb")
    .raw();
}

function explain(err: unknown): ReadingError {
  const msg = String((err as Error)?.message ?? err);
  if (/pixel limit|exceeds.*limit/i.test(msg))
    return new ReadingError("too_large", `This image is too large to read (more than ${MAX_INPUT_PIXELS / 1e6} megapixels). Please send a smaller photo.`);
  if (/premature|truncat|end of (file|data|stream)|corrupt|incomplete|short read|not enough|unexpected end/i.test(msg))
    return new ReadingError("truncated", "This photo file is incomplete or damaged (it may have been cut off while uploading). Please send it again.");
  if (/unsupported image format|input buffer|bad seek|not a known file format|does not contain|empty/i.test(msg))
    return new ReadingError("not_an_image", "This file is not a photo the reader understands. Please send a JPEG, PNG, WebP or HEIC picture.");
  return new ReadingError("not_an_image", "This photo could not be opened; the file seems to be damaged or not an image.");
}

export type DecodedPhoto = { image: RgbImage; original: { width: number; height: number } };

/** A decode under way: the header already checked, the working copy still being decoded. */
export type StartedDecode = {
  original: { width: number; height: number };
  /** The working copy's expected size (sharp's fit inside the long side, never enlarged). */
  working: { width: number; height: number };
  /** The photo's format as sharp names it ("jpeg", "png", "webp", ...). */
  format?: string;
  /** A progressive (or interlaced) photo: decoded scan by scan, slower than a baseline one. */
  progressive?: boolean;
  /** The photo embeds a colour profile: unless it is sRGB (`srgbProfile`), its decode converts every pixel through it to sRGB. */
  hasProfile?: boolean;
  /** The photo embeds an sRGB profile: decoded with no colour transform (colour-profile.ts). */
  srgbProfile?: boolean;
  decoded: Promise<DecodedPhoto>;
};

export async function decodePhoto(photo: Buffer, longSide = WORK_LONG_SIDE): Promise<DecodedPhoto> {
  return (await startDecode(photo, longSide)).decoded;
}

/**
 * Reads and checks the photo's header while its decode to the working size starts (sharp runs
 * both on its own threads); resolves once the header is checked, with the decode still running.
 */
export async function startDecode(photo: Buffer, longSide = WORK_LONG_SIDE): Promise<StartedDecode> {
  if (!Buffer.isBuffer(photo) && !((photo as unknown) instanceof Uint8Array))
    throw new ReadingError("not_an_image", "No photo was given.");
  if (photo.length < 16) throw new ReadingError("not_an_image", "This file is too short to be a photo.");
  // The decode is queued before the header is read (starting a sharp pipeline takes a fraction of
  // a millisecond); the header's checks still decide first: a photo over the pixel cap is refused by both.
  const srgbProfile = embedsSrgbProfile(photo);
  const outP = workingPipeline(photo, longSide, srgbProfile).toBuffer({ resolveWithObject: true });
  const metaP = sharp(photo, sharpInputOptions()).metadata();
  outP.catch(() => {}); // awaited later, unless the header already refused the photo
  let meta: Metadata;
  try {
    meta = await metaP;
  } catch (e) {
    throw explain(e);
  }
  const w0 = meta.width ?? 0, h0 = meta.height ?? 0;
  if (w0 * h0 > MAX_INPUT_PIXELS)
    throw new ReadingError(
      "too_large",
      `This image is too large to read (${w0} × ${h0} pixels, more than ${MAX_INPUT_PIXELS / 1e6} megapixels). Please send a smaller photo.`,
    );
  if (Math.min(w0, h0) < MIN_SIDE)
    throw new ReadingError("too_small", `This image is too small (${w0} × ${h0} pixels) to show a test strip. Please send a photo at least ${MIN_SIDE} pixels on each side.`);
  const swap = (meta.orientation ?? 1) >= 5;
  const original = swap ? { width: h0, height: w0 } : { width: w0, height: h0 };
  const k = Math.min(1, longSide / Math.max(original.width, original.height));
  const working = { width: Math.round(original.width * k), height: Math.round(original.height * k) };
  const decoded = outP.then(
    (out: { data: Buffer; info: OutputInfo }) => {
      if (out.info.channels !== 3) throw new ReadingError("not_an_image", "This photo has an unusual colour format the reader cannot use.");
      const image = { width: out.info.width, height: out.info.height, data: new Uint8Array(out.data.buffer, out.data.byteOffset, out.data.length) };
      return { image, original };
    },
    (e) => {
      throw explain(e);
    },
  );
  decoded.catch(() => {}); // the caller awaits it when it needs the pixels
  return { original, working, format: meta.format, progressive: !!meta.isProgressive, hasProfile: !!meta.hasProfile, srgbProfile, decoded };
}

/** Axis-aligned square crop around a point, as a small WebP. */
export async function cropPad(img: RgbImage, cx: number, cy: number, half: number, size = 96): Promise<Buffer> {
  const left = Math.max(0, Math.round(cx - half)), top = Math.max(0, Math.round(cy - half));
  const w = Math.max(1, Math.min(img.width - left, Math.round(2 * half))), h = Math.max(1, Math.min(img.height - top, Math.round(2 * half)));
  return sharp(Buffer.from(img.data.buffer, img.data.byteOffset, img.data.length), { raw: { width: img.width, height: img.height, channels: 3 } })
    .extract({ left, top, width: w, height: h })
    .resize(size, size, { fit: "fill" })
    .webp({ quality: 80 })
    .toBuffer();
}

/** Pad crops (square WebP images of one size) side by side in one WebP, in the order given. */
export async function cropStrip(crops: Buffer[], size = 96, gap = 4): Promise<Buffer> {
  const width = crops.length * size + (crops.length - 1) * gap;
  const tiles = await Promise.all(crops.map((c) => sharp(c).resize(size, size, { fit: "fill" }).png().toBuffer()));
  return sharp({ create: { width, height: size, channels: 3, background: "#ffffff" } })
    .composite(tiles.map((input, i) => ({ input, left: i * (size + gap), top: 0 })))
    .webp({ quality: 80 })
    .toBuffer();
}
