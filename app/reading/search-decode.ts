// The search copy straight from the photo: sharp decodes it small (JPEG shrink-on-load) on its
// own threads while the working copy is still being decoded, so that the search for candidate
// strips runs in the meantime instead of after the decode.
import sharp from "sharp";
import type { StripChart } from "./chart";
import { brightCandidates } from "./bright-components";
import { edgePairCandidates } from "./edge-pairs";
import { sharpInputOptions, type StartedDecode } from "./image";
import { WIDE_DIV, wideLooksOff, type EarlySearch } from "./locate";
import { searchCopyFromReduced, searchFactor, type SearchCopy } from "./search-copy";

/** Formats whose decoder shrinks on load (libjpeg's and libwebp's scaled decoding). */
const SHRINK_ON_LOAD = new Set(["jpeg", "webp"]);

/**
 * Whether decoding the search copy apart from the working copy saves time. A photo at least twice
 * the working size: both decodes shrink on load and the small one costs a fraction of the working
 * one. A JPEG or WebP nearer the working size (their decoders shrink on load too): only when its
 * working decode is slow, a progressive JPEG's many scans, a resize to the working size, or an
 * embedded colour profile other than sRGB (every pixel converted through it; the small copy
 * converts a ninth or less as many). A baseline JPEG decoded at its own size with no transform,
 * one in sRGB or embedding sRGB's own profile (colour-profile.ts), takes a few milliseconds, and a
 * second decode beside it only slows it down on a machine with few cores.
 * Otherwise the search copy is reduced from the working copy (search-copy.ts makeSearchCopy).
 */
export function searchDecodePays(
  original: { width: number; height: number },
  working: { width: number; height: number },
  photo: Pick<StartedDecode, "format" | "progressive" | "hasProfile" | "srgbProfile"> = {},
): boolean {
  if (searchFactor(working.width, working.height) <= 1) return false;
  const long = Math.max(original.width, original.height), workLong = Math.max(working.width, working.height);
  if (long >= 2 * workLong) return true;
  const converted = !!photo.hasProfile && !photo.srgbProfile;
  return !!photo.format && SHRINK_ON_LOAD.has(photo.format) && (!!photo.progressive || converted || long > workLong);
}

/**
 * The search work done while the working copy is still being decoded: the search copy decoded
 * small, its wide-scale candidates, and the edge-pair candidates too when none of the wide
 * scale's best few has the strip's proportions (locate.ts wideLooksOff: the edge pairs are then
 * tried first) and the working decode is still running, so that they cost no wall time.
 * Undefined when the search copy is better reduced from the working copy.
 */
export async function earlySearch(photo: Buffer, started: StartedDecode, chart: StripChart): Promise<EarlySearch | undefined> {
  if (!searchDecodePays(started.original, started.working, started)) return undefined;
  let decoded = false;
  started.decoded.then(
    () => (decoded = true),
    () => (decoded = true),
  );
  const search = await decodeSearchCopy(photo, started.working, started.srgbProfile);
  if (!search) return undefined;
  const early: EarlySearch = { search, wide: brightCandidates(search, chart, WIDE_DIV) };
  if (!decoded && wideLooksOff(early.wide!, chart)) early.edges = edgePairCandidates(search, chart);
  return early;
}

/**
 * The search copy of a photo whose working copy has the given size: reduced by the same whole
 * factor (sides rounded down), or null when there is nothing to reduce or the decode fails (the
 * search copy is then made from the working copy).
 */
export async function decodeSearchCopy(photo: Buffer, working: { width: number; height: number }, srgbProfile = false): Promise<SearchCopy | null> {
  const f = searchFactor(working.width, working.height);
  if (f <= 1) return null;
  const w = Math.floor(working.width / f), h = Math.floor(working.height / f);
  try {
    const { data, info } = await sharp(photo, sharpInputOptions(srgbProfile))
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
