// What a photo must be before Dipwell takes it: the accepted types and the words for each
// refusal. Shared by the browser (PhotoUpload checks a file before sending it) and the server
// (which checks again, on the bytes themselves). The size limit comes from the server's
// validated environment (MAX_PHOTO_BYTES) and is handed to the browser by the loader.

export const PHOTO_TYPES = {
  "image/jpeg": { ext: "jpg", format: "jpeg", label: "JPEG" },
  "image/png": { ext: "png", format: "png", label: "PNG" },
  "image/webp": { ext: "webp", format: "webp", label: "WebP" },
} as const;

export type PhotoType = keyof typeof PHOTO_TYPES;

/** For `<input type="file" accept=…>`. */
export const PHOTO_ACCEPT = Object.keys(PHOTO_TYPES).join(",");

export const isPhotoType = (t: string): t is PhotoType => Object.hasOwn(PHOTO_TYPES, t);

/** The photo type of a file extension (the part of an upload key after the dot). */
export const typeOfExt = (ext: string): PhotoType | null =>
  (Object.entries(PHOTO_TYPES).find(([, v]) => v.ext === ext)?.[0] as PhotoType | undefined) ?? null;

/** The photo type sharp reports for decoded bytes (its `format`), or null when it is not one Dipwell takes. */
export const typeOfFormat = (format: string | undefined): PhotoType | null =>
  (Object.entries(PHOTO_TYPES).find(([, v]) => v.format === format)?.[0] as PhotoType | undefined) ?? null;

/**
 * The photo type the file's first bytes announce (its signature: JPEG's SOI marker, PNG's eight
 * signature bytes, WebP's RIFF container with the WEBP form type), or null for anything else.
 * A cheap first look only: the full decode still has the last word.
 */
export function typeOfMagic(head: Uint8Array): PhotoType | null {
  const at = (i: number, bytes: number[]) => bytes.every((b, j) => head[i + j] === b);
  if (at(0, [0xff, 0xd8, 0xff])) return "image/jpeg";
  if (at(0, [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])) return "image/png";
  if (at(0, [0x52, 0x49, 0x46, 0x46]) && at(8, [0x57, 0x45, 0x42, 0x50])) return "image/webp";
  return null;
}

export const formatMb = (bytes: number) => `${Math.round((bytes / 1024 / 1024) * 10) / 10} MB`;

export const PHOTO_MESSAGES = {
  wrongType: "That file is not a photo Dipwell can read. Choose a JPEG, PNG or WebP photo (on an iPhone, set Camera › Formats to “Most Compatible”).",
  notWhatItClaims: "That file is not the kind of photo it claims to be. Choose a JPEG, PNG or WebP photo.",
  empty: "That file is empty. Take the photo again.",
  tooLarge: (size: number, max: number) =>
    `That photo is ${formatMb(size)}; the largest Dipwell accepts is ${formatMb(max)}. Take it again at a lower resolution, or crop it around the strip.`,
  notImage: "That file could not be opened as a photo. It may be damaged or not a picture. Take the photo again.",
  truncated: "Only part of that photo is there: the file ends before the picture does. Take the photo again, or choose the original file.",
  missing: "The photo did not arrive: the upload stopped before it finished. Press “Try the upload again”; you do not need a new photo.",
  changed: "The photo changed while it was being sent. Press “Try the upload again”.",
  storageDown: "Photo storage is unavailable at the moment. Your photo is safe on your phone: try again in a minute.",
} as const;

export type PhotoProblem = { code: "wrong_type" | "empty" | "too_large"; message: string };

/** The checks that can be made before any byte is sent: declared type and size. */
export function photoProblem(type: string, size: number, maxBytes: number): PhotoProblem | null {
  if (!isPhotoType(type)) return { code: "wrong_type", message: PHOTO_MESSAGES.wrongType };
  if (!Number.isFinite(size) || size <= 0) return { code: "empty", message: PHOTO_MESSAGES.empty };
  if (size > maxBytes) return { code: "too_large", message: PHOTO_MESSAGES.tooLarge(size, maxBytes) };
  return null;
}
