// One way in for every photo: strip photos of a tub, chart photos and reference-solution photos
// of a strip batch (these last are read once and not kept). The browser PUTs the file to a
// presigned upload key (type and length signed); the
// server then fetches it (never more than MAX_PHOTO_BYTES), decodes it once (the real type from
// the bytes, a truncated file refused, the thumbnail made from that same decode), hashes it and
// writes its own copy under a final key the browser never had a URL for. A refused upload is
// deleted at once; every other upload object is swept by the worker after an hour (sweepUploads)
// and, in production, by the bucket's lifecycle rule on `uploads/`.
import { createHash, randomUUID } from "node:crypto";
import { env } from "../../lib/env.server";
import {
  copyObject, deleteObject, digestObject, getObjectBytes, headObject, listObjects, presignUpload, putObject, StorageUnavailableError, UPLOAD_URL_SECONDS,
} from "../../lib/storage.server";
import { decodePhoto, PhotoError, type Inspected } from "./decode";
import { PHOTO_MESSAGES, PHOTO_TYPES, photoProblem, typeOfExt, typeOfMagic, type PhotoType } from "./rules";

export const maxPhotoBytes = () => env().MAX_PHOTO_BYTES;

/** Whose photo it is: a tub's strip photo, or a strip batch's chart or reference-solution photo. */
export type PhotoScope = { tubId: string } | { batchId: string };

const scopePath = (s: PhotoScope) => ("tubId" in s ? `tubs/${s.tubId}` : `batches/${s.batchId}`);

/** Every upload key starts with this prefix (one lifecycle rule covers them all). */
export const UPLOAD_PREFIX = "uploads/";
const uploadPrefix = (s: PhotoScope) => `${UPLOAD_PREFIX}${scopePath(s)}/`;
const UPLOAD_NAME = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}\.(jpg|png|webp)$/;

/** The key of the kept photo: by content, so the same bytes always land on the same key. */
export const photoKey = (s: PhotoScope, sha256: string, type: PhotoType) => `${scopePath(s)}/photos/${sha256}.${PHOTO_TYPES[type].ext}`;
/** The list-sized WebP kept beside a photo. */
export const thumbKey = (photoS3Key: string) => `${photoS3Key}.thumb.webp`;
/** A pad's crop, addressed by the reading it belongs to. */
export const cropKey = (tubId: string, readingId: string, analyte: string) => `tubs/${tubId}/readings/${readingId}/${analyte}.webp`;

/** Translates a storage outage into the plain refusal every photo path gives. */
export async function withStorage<T>(work: () => Promise<T>): Promise<T> {
  try {
    return await work();
  } catch (error) {
    if (error instanceof StorageUnavailableError) {
      console.error("photo storage unavailable:", (error.cause as Error)?.message ?? error.cause);
      throw new PhotoError("storage_unavailable", PHOTO_MESSAGES.storageDown, 503);
    }
    throw error;
  }
}

/** A presigned PUT for one photo (type and size as the browser declares them, both signed). */
export async function presignPhoto(scope: PhotoScope, contentType: string, size: number) {
  const problem = photoProblem(contentType, size, maxPhotoBytes());
  if (problem) throw new PhotoError(problem.code, problem.message);
  const type = contentType as PhotoType;
  const key = `${uploadPrefix(scope)}${randomUUID()}.${PHOTO_TYPES[type].ext}`;
  const url = await withStorage(() => presignUpload(key, type, size));
  return { key, url, contentType: type, expiresInSeconds: UPLOAD_URL_SECONDS };
}

export type { Inspected } from "./decode";
export { PhotoError } from "./decode";

/** Decodes in this process (see decode.ts): chart and reference photos, taken in by the web app. */
export async function inspectPhoto(bytes: Buffer, declared?: PhotoType): Promise<Inspected> {
  return decodePhoto(bytes, declared);
}

export type ReceivedPhoto = { s3Key: string; contentType: PhotoType; sizeBytes: number; sha256: string; width: number; height: number; bytes: Buffer };

/** Checks that an upload key was made for this scope, and returns the type its name declares. */
export function checkUploadKey(scope: PhotoScope, key: unknown): PhotoType {
  const prefix = uploadPrefix(scope);
  if (typeof key !== "string" || !key.startsWith(prefix) || !UPLOAD_NAME.test(key.slice(prefix.length))) {
    throw new PhotoError("bad_key", "That upload does not belong here. Start again and choose the photo once more.");
  }
  return typeOfExt(key.split(".").pop()!)!;
}

/** What the caller may still refuse once the photo is decoded (e.g. too small for its use); null accepts it. */
export type PhotoCheck = (inspected: Inspected) => PhotoError | null;

/**
 * Fetches an uploaded photo (cut off past the size limit) and inspects it (one decode). A refused
 * upload, by these rules or by the caller's `check`, is deleted at once. The upload object itself
 * stays until the sweep otherwise (a double submit of the same key finds it again).
 */
export async function inspectUpload(scope: PhotoScope, key: string, check?: PhotoCheck): Promise<{ bytes: Buffer; inspected: Inspected }> {
  const declared = checkUploadKey(scope, key);
  return withStorage(async () => {
    const max = maxPhotoBytes();
    const head = await headObject(key);
    if (!head) throw new PhotoError("missing_upload", PHOTO_MESSAGES.missing, 409);
    const fetched = await getObjectBytes(key, max);
    if (!Buffer.isBuffer(fetched)) {
      await deleteObject(key);
      throw new PhotoError("too_large", PHOTO_MESSAGES.tooLarge(fetched.size, max));
    }
    try {
      const inspected = await inspectPhoto(fetched, declared);
      const refusal = check?.(inspected);
      if (refusal) throw refusal;
      return { bytes: fetched, inspected };
    } catch (error) {
      if (error instanceof PhotoError) await deleteObject(key);
      throw error;
    }
  });
}

/**
 * Takes an uploaded photo in: inspectUpload, then the checked bytes and the thumbnail written
 * under the final key; the photo is served only from that kept copy. Idempotent: the same bytes
 * give the same final key.
 */
export async function receivePhoto(scope: PhotoScope, key: string, check?: PhotoCheck): Promise<ReceivedPhoto> {
  const { bytes, inspected } = await inspectUpload(scope, key, check);
  return keepPhoto(scope, bytes, inspected);
}

/** Writes checked bytes and their thumbnail under the final key (for bytes already in hand). */
export async function keepPhoto(scope: PhotoScope, bytes: Buffer, inspected: Inspected): Promise<ReceivedPhoto> {
  const sha256 = createHash("sha256").update(bytes).digest("hex");
  const s3Key = photoKey(scope, sha256, inspected.type);
  await withStorage(async () => {
    await putObject(s3Key, bytes, inspected.type);
    await putObject(thumbKey(s3Key), inspected.thumb, "image/webp");
  });
  return { s3Key, contentType: inspected.type, sizeBytes: bytes.length, sha256, width: inspected.width, height: inspected.height, bytes };
}

export type TakenPhoto = { s3Key: string; contentType: PhotoType; sizeBytes: number; sha256: string };

/**
 * Takes a strip photo's upload in with the checks that need no decode, so a registration stays
 * light for the web app: the upload is there (HEAD), not over the size limit, and starts with the
 * signature of the type it was declared as; its bytes are hashed as they stream past (never held
 * whole), and storage itself copies them to the final key by content. The decode (a file cut
 * short, the size in pixels, the thumbnail) is the reading job's, in a reader process (`runPhotoRead`). A refused
 * upload is deleted at once. Idempotent: the same bytes give the same final key.
 *
 * `known` answers whether this scope already keeps a photo with these bytes (then the copy is
 * skipped: it is there already).
 */
export async function takeUpload(scope: PhotoScope, key: string, known?: (sha256: string) => Promise<boolean>): Promise<TakenPhoto> {
  const declared = checkUploadKey(scope, key);
  return withStorage(async () => {
    const max = maxPhotoBytes();
    const head = await headObject(key);
    if (!head) throw new PhotoError("missing_upload", PHOTO_MESSAGES.missing, 409);
    const refuse = async (error: PhotoError) => {
      await deleteObject(key);
      return error;
    };
    if (head.size > max) throw await refuse(new PhotoError("too_large", PHOTO_MESSAGES.tooLarge(head.size, max)));
    if (head.size === 0) throw await refuse(new PhotoError("empty", PHOTO_MESSAGES.empty));
    const digest = await digestObject(key, max);
    if ("tooLarge" in digest) throw await refuse(new PhotoError("too_large", PHOTO_MESSAGES.tooLarge(digest.size, max)));
    if (digest.size === 0) throw await refuse(new PhotoError("empty", PHOTO_MESSAGES.empty));
    const type = typeOfMagic(digest.head);
    if (!type) throw await refuse(new PhotoError("not_image", PHOTO_MESSAGES.notImage));
    if (type !== declared) throw await refuse(new PhotoError("wrong_type", PHOTO_MESSAGES.notWhatItClaims));
    const s3Key = photoKey(scope, digest.sha256, type);
    if (!(await known?.(digest.sha256)) && !(await copyObject(key, s3Key, type, digest.etag))) {
      throw new PhotoError("changed", PHOTO_MESSAGES.changed, 409);
    }
    return { s3Key, contentType: type, sizeBytes: digest.size, sha256: digest.sha256 };
  });
}

/**
 * Deletes upload objects older than `olderThanMs` (their presigned URL expired long ago, and no
 * registration took them). Returns how many were deleted. Bounded: one listing page per call
 * round, at most `maxPages` pages.
 */
export async function sweepUploads(now = new Date(), opts: { olderThanMs?: number; maxPages?: number; scope?: PhotoScope } = {}) {
  const { olderThanMs = 60 * 60 * 1000, maxPages = 20 } = opts;
  const prefix = opts.scope ? uploadPrefix(opts.scope) : UPLOAD_PREFIX;
  let deleted = 0;
  let token: string | undefined;
  for (let page = 0; page < maxPages; page++) {
    const { objects, next } = await listObjects(prefix, token);
    for (const o of objects) {
      if (now.getTime() - o.lastModified.getTime() > olderThanMs) {
        await deleteObject(o.key);
        deleted++;
      }
    }
    if (!next) break;
    token = next;
  }
  return deleted;
}
