// The search copy straight from the photo: sharp decodes it small (JPEG shrink-on-load) on its
// own threads while the working copy is still being decoded, so that the search for candidate
// strips runs in the meantime instead of after the decode.
import sharp from "sharp";
import { sharpInputOptions } from "./image";
import { searchCopyFromReduced, searchFactor, type SearchCopy } from "./search-copy";

/**
 * Whether decoding the search copy apart from the working copy saves time: only when the photo is
 * at least twice the working size, so that both decodes shrink on load and the small one costs a
 * fraction of the working one. A photo near the working size would be decoded twice in full; its
 * search copy is reduced from the working copy instead (search-copy.ts makeSearchCopy).
 */
export function searchDecodePays(original: { width: number; height: number }, working: { width: number; height: number }): boolean {
  return Math.max(original.width, original.height) >= 2 * Math.max(working.width, working.height);
}

/**
 * The search copy of a photo whose working copy has the given size: reduced by the same whole
 * factor (sides rounded down), or null when there is nothing to reduce or the decode fails (the
 * search copy is then made from the working copy).
 */
export async function decodeSearchCopy(photo: Buffer, working: { width: number; height: number }): Promise<SearchCopy | null> {
  const f = searchFactor(working.width, working.height);
  if (f <= 1) return null;
  const w = Math.floor(working.width / f), h = Math.floor(working.height / f);
  try {
    const { data, info } = await sharp(photo, sharpInputOptions())
      .rotate()
      .resize(w, h, { fit: "fill", kernel: "linear" })
      .removeAlpha()
      .toColourspace("srgb")
      .raw()
      .toBuffer({ resolveWithObject: true });
    if (info.channels !== 3 || info.width !== w || info.height !== h) return null;
    return searchCopyFromReduced({ width: w, height: h, data: new Uint8Array(data.buffer, data.byteOffset, data.length) }, f);
  } catch {
    return null;
  }
}
