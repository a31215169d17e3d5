// Whether a photo's embedded colour profile is sRGB itself. Most phone cameras embed one in every
// JPEG; converting through it (sharp's default) maps each pixel to the very same values, at the
// cost of a colour transform per pixel, which took most of the decode of a 1.3 MP phone photo
// here. Such a photo is decoded as it is; a photo with any other profile (a wide-gamut one such as
// Display P3, a printer's) is still converted to sRGB through its profile.
//
// The profile is read straight from the JPEG's APP2 segments (ICC.1:2022, annex B.4), before the
// decode starts, and counts as sRGB only when it is a matrix-and-curves RGB display profile whose
// primaries and tone curves are sRGB's (IEC 61966-2-1; the primaries as adapted to the D50
// connection space, ICC.1 annex E / the ICC's sRGB profiles), with no lookup tables that a colour
// engine would prefer to the matrix.

/** sRGB's red, green and blue colorants in the D50 connection space (the ICC's sRGB profiles, rounded to 4 places). */
export const SRGB_D50_COLORANTS: Record<"rXYZ" | "gXYZ" | "bXYZ", [number, number, number]> = {
  rXYZ: [0.4361, 0.2225, 0.0139],
  gXYZ: [0.3851, 0.7169, 0.0971],
  bXYZ: [0.1431, 0.0606, 0.7141],
};
/** How far (XYZ, s15Fixed16) a colorant may lie from sRGB's: the profiles' own rounding. */
const COLORANT_TOLERANCE = 0.002;
/** How far (0..1) a tone curve may lie from sRGB's at any sampled code: half an 8-bit step. */
const CURVE_TOLERANCE = 0.5 / 255;

/** The sRGB decoding function (IEC 61966-2-1): encoded value → linear, both 0..1. */
function srgbCurve(v: number): number {
  return v <= 0.04045 ? v / 12.92 : ((v + 0.055) / 1.055) ** 2.4;
}

const MAX_SEGMENTS = 255;
const ICC_MARKER = "ICC_PROFILE\0";

/**
 * The ICC profile embedded in a JPEG (its APP2 chunks joined in sequence order), null when the
 * JPEG embeds none, undefined when the data is not a JPEG or its segments cannot be followed.
 * Only the segments before the image data are read.
 */
export function jpegIccProfile(jpeg: Uint8Array): Uint8Array | null | undefined {
  if (jpeg.length < 4 || jpeg[0] !== 0xff || jpeg[1] !== 0xd8) return undefined;
  const chunks: { seq: number; count: number; data: Uint8Array }[] = [];
  let o = 2;
  while (o + 4 <= jpeg.length) {
    if (jpeg[o] !== 0xff) return undefined;
    const marker = jpeg[o + 1];
    if (marker === 0xff) {
      o++; // fill byte
      continue;
    }
    // Start of scan or end of image: no more header segments.
    if (marker === 0xda || marker === 0xd9) break;
    // Markers without a length (restart markers, TEM).
    if ((marker >= 0xd0 && marker <= 0xd7) || marker === 0x01) {
      o += 2;
      continue;
    }
    const len = (jpeg[o + 2] << 8) | jpeg[o + 3];
    if (len < 2 || o + 2 + len > jpeg.length) return undefined;
    if (marker === 0xe2 && len >= 2 + ICC_MARKER.length + 2) {
      let isIcc = true;
      for (let i = 0; i < ICC_MARKER.length && isIcc; i++) isIcc = jpeg[o + 4 + i] === ICC_MARKER.charCodeAt(i);
      if (isIcc) {
        const at = o + 4 + ICC_MARKER.length;
        if (chunks.length >= MAX_SEGMENTS) return undefined;
        chunks.push({ seq: jpeg[at], count: jpeg[at + 1], data: jpeg.subarray(at + 2, o + 2 + len) });
      }
    }
    o += 2 + len;
  }
  if (!chunks.length) return null;
  // Chunks numbered 1..count, each once.
  const count = chunks[0].count;
  if (chunks.length !== count || chunks.some((c) => c.count !== count)) return undefined;
  chunks.sort((a, b) => a.seq - b.seq);
  if (chunks.some((c, i) => c.seq !== i + 1)) return undefined;
  const out = new Uint8Array(chunks.reduce((s, c) => s + c.data.length, 0));
  let at = 0;
  for (const c of chunks) out.set(c.data, at), (at += c.data.length);
  return out;
}

/** The four-character signature at byte `o` of a profile (a tag's, a type's, a header field's). */
function signatureAt(p: Uint8Array, o: number): string {
  return String.fromCharCode(p[o], p[o + 1], p[o + 2], p[o + 3]);
}

/** Reads a profile's tag table: each tag's signature with its offset and size, checked against the profile's length. */
function tagTable(p: Uint8Array): Map<string, { offset: number; size: number }> | null {
  if (p.length < 132) return null;
  const view = new DataView(p.buffer, p.byteOffset, p.length);
  if (view.getUint32(0) !== p.length || signatureAt(p, 36) !== "acsp") return null;
  const n = view.getUint32(128);
  if (n > 200 || 132 + 12 * n > p.length) return null;
  const tags = new Map<string, { offset: number; size: number }>();
  for (let k = 0; k < n; k++) {
    const at = 132 + 12 * k;
    const offset = view.getUint32(at + 4), size = view.getUint32(at + 8);
    if (offset + size > p.length || size < 8) return null;
    tags.set(signatureAt(p, at), { offset, size });
  }
  return tags;
}

/** Whether a tone curve tag ('curv' or 'para') follows sRGB's within CURVE_TOLERANCE. */
function curveIsSrgb(p: Uint8Array, tag: { offset: number; size: number }): boolean {
  const view = new DataView(p.buffer, p.byteOffset + tag.offset, tag.size);
  const type = signatureAt(p, tag.offset);
  let f: ((v: number) => number) | null = null;
  if (type === "curv") {
    const n = view.getUint32(8);
    // A table of at least a few dozen entries (a single entry is a pure gamma, not sRGB).
    if (n < 32 || 12 + 2 * n > tag.size) return false;
    f = (v) => {
      const x = v * (n - 1), i = Math.min(n - 2, Math.floor(x)), t = x - i;
      return (view.getUint16(12 + 2 * i) * (1 - t) + view.getUint16(12 + 2 * (i + 1)) * t) / 65535;
    };
  } else if (type === "para") {
    const fn = view.getUint16(8);
    const count = [1, 3, 4, 5, 7][fn];
    if (count === undefined || 12 + 4 * count > tag.size) return false;
    const q = Array.from({ length: count }, (_, i) => view.getInt32(12 + 4 * i) / 65536);
    const [g, a = 1, b = 0, c = 0, d = 0, e = 0, ff = 0] = q;
    if (fn === 3) f = (v) => (v >= d ? (a * v + b) ** g : c * v);
    else if (fn === 4) f = (v) => (v >= d ? (a * v + b) ** g + e : c * v + ff);
    else return false;
  } else return false;
  for (let k = 0; k <= 64; k++) {
    const v = k / 64;
    if (!(Math.abs(f(v) - srgbCurve(v)) <= CURVE_TOLERANCE)) return false;
  }
  return true;
}

/**
 * Whether an ICC profile is sRGB: an RGB display (or input) profile with the XYZ connection
 * space, sRGB's colorants and tone curves, and no device-to-connection lookup tables.
 */
export function isSrgbProfile(p: Uint8Array): boolean {
  const tags = tagTable(p);
  if (!tags) return false;
  const view = new DataView(p.buffer, p.byteOffset, p.length);
  if (signatureAt(p, 16) !== "RGB " || signatureAt(p, 20) !== "XYZ " || !["mntr", "scnr"].includes(signatureAt(p, 12))) return false;
  for (const lut of ["A2B0", "A2B1", "A2B2", "D2B0", "D2B1", "D2B2"]) if (tags.has(lut)) return false;
  for (const [sig, want] of Object.entries(SRGB_D50_COLORANTS)) {
    const t = tags.get(sig);
    if (!t || t.size < 20 || signatureAt(p, t.offset) !== "XYZ ") return false;
    for (let i = 0; i < 3; i++) if (!(Math.abs(view.getInt32(t.offset + 8 + 4 * i) / 65536 - want[i]) <= COLORANT_TOLERANCE)) return false;
  }
  for (const sig of ["rTRC", "gTRC", "bTRC"]) {
    const t = tags.get(sig);
    if (!t || !curveIsSrgb(p, t)) return false;
  }
  return true;
}

/** Whether the photo is a JPEG whose embedded profile is sRGB (see above): decoded as it is, with no colour transform. */
export function embedsSrgbProfile(photo: Uint8Array): boolean {
  const icc = jpegIccProfile(photo);
  return !!icc && isSrgbProfile(icc);
}
