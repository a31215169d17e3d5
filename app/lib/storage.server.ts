// Object storage through the S3 API: real S3 (or any S3-compatible store) in
// production, s3rver on 127.0.0.1 locally. Photos go up from the browser with
// presigned PUTs to an upload key; the server checks them and keeps its own copy
// under a key the browser never had a URL for, and serves only that copy, with
// the type it registered (never the type storage reports).
import { createHash } from "node:crypto";
import {
  CopyObjectCommand, DeleteObjectCommand, GetObjectCommand, HeadObjectCommand, ListObjectsV2Command, PutObjectCommand, S3Client,
} from "@aws-sdk/client-s3";
import { getSignedUrl } from "@aws-sdk/s3-request-presigner";
import { env } from "./env.server";

let client: S3Client | undefined;

export function s3() {
  const e = env();
  client ??= new S3Client({
    region: e.S3_REGION,
    endpoint: e.S3_ENDPOINT,
    forcePathStyle: e.S3_FORCE_PATH_STYLE,
    credentials: { accessKeyId: e.S3_ACCESS_KEY_ID, secretAccessKey: e.S3_SECRET_ACCESS_KEY },
    // S3-compatible stores (s3rver among them) reject the SDK's default CRC checksums.
    requestChecksumCalculation: "WHEN_REQUIRED",
    responseChecksumValidation: "WHEN_REQUIRED",
    // A storage outage answers quickly instead of holding the request.
    maxAttempts: 2,
    requestHandler: { connectionTimeout: 3_000, requestTimeout: 30_000 },
  });
  return client;
}

export const bucket = () => env().S3_BUCKET;

/** How long a presigned upload URL stays valid. */
export const UPLOAD_URL_SECONDS = 300;

/** Storage could not be reached (down, refused, timed out): not the user's fault, nothing is lost. */
export class StorageUnavailableError extends Error {
  constructor(cause: unknown) {
    super("storage is unavailable", { cause });
  }
}

const STATUS = (error: unknown) => (error as { $metadata?: { httpStatusCode?: number } }).$metadata?.httpStatusCode;

/** A network failure or a 5xx from storage becomes StorageUnavailableError; anything else is rethrown. */
function unavailable(error: unknown): never {
  const status = STATUS(error);
  if (status === undefined || status >= 500) throw new StorageUnavailableError(error);
  throw error;
}

/**
 * A URL the browser can PUT exactly one file to: the content type and the length are part of
 * the signature (a store that checks signatures, as S3 does, refuses any other type or size),
 * and it expires after UPLOAD_URL_SECONDS.
 */
export async function presignUpload(key: string, contentType: string, size: number) {
  return getSignedUrl(
    s3(),
    new PutObjectCommand({ Bucket: bucket(), Key: key, ContentType: contentType, ContentLength: size }),
    { expiresIn: UPLOAD_URL_SECONDS, signableHeaders: new Set(["content-type", "content-length"]), unhoistableHeaders: new Set(["content-type", "content-length"]) },
  );
}

export async function headObject(key: string) {
  try {
    const head = await s3().send(new HeadObjectCommand({ Bucket: bucket(), Key: key }));
    return { size: head.ContentLength ?? 0 };
  } catch (error) {
    if (STATUS(error) === 404 || (error as Error).name === "NotFound") return null;
    unavailable(error);
  }
}

/**
 * Streams the object's bytes to `take` as they arrive, refusing to read past maxBytes (the
 * stream is cut off there); answers the size read and the object's ETag.
 */
async function readChunks(key: string, maxBytes: number, take: (chunk: Uint8Array) => void): Promise<{ size: number; etag?: string } | { tooLarge: true; size: number }> {
  let out;
  try {
    out = await s3().send(new GetObjectCommand({ Bucket: bucket(), Key: key }));
  } catch (error) {
    unavailable(error);
  }
  if ((out.ContentLength ?? 0) > maxBytes) {
    (out.Body as { destroy?: () => void } | undefined)?.destroy?.();
    return { tooLarge: true, size: out.ContentLength ?? 0 };
  }
  let total = 0;
  try {
    for await (const chunk of out.Body as AsyncIterable<Uint8Array>) {
      total += chunk.length;
      if (total > maxBytes) {
        (out.Body as { destroy?: () => void }).destroy?.();
        return { tooLarge: true, size: total };
      }
      take(chunk);
    }
  } catch (error) {
    throw new StorageUnavailableError(error);
  }
  return { size: total, etag: out.ETag };
}

/** The object's bytes, refusing to hold more than maxBytes (the stream is cut off there). */
export async function getObjectBytes(key: string, maxBytes = Number.POSITIVE_INFINITY): Promise<Buffer | { tooLarge: true; size: number }> {
  const chunks: Buffer[] = [];
  const read = await readChunks(key, maxBytes, (chunk) => chunks.push(Buffer.from(chunk)));
  return "tooLarge" in read ? read : Buffer.concat(chunks);
}

/**
 * The object's SHA-256, its size, its ETag and its first `headBytes` bytes, read as a stream (the
 * bytes are hashed as they arrive and never held whole); refuses to read past maxBytes.
 */
export async function digestObject(key: string, maxBytes: number, headBytes = 32): Promise<{ sha256: string; size: number; head: Buffer; etag?: string } | { tooLarge: true; size: number }> {
  const hash = createHash("sha256");
  const head: Buffer[] = [];
  let headLength = 0;
  const read = await readChunks(key, maxBytes, (chunk) => {
    hash.update(chunk);
    if (headLength < headBytes) {
      head.push(Buffer.from(chunk.subarray(0, headBytes - headLength)));
      headLength += Math.min(chunk.length, headBytes - headLength);
    }
  });
  return "tooLarge" in read ? read : { sha256: hash.digest("hex"), size: read.size, head: Buffer.concat(head), etag: read.etag };
}

/**
 * Copies an object inside the bucket (storage copies the bytes; none pass through this process).
 * With `ifMatch` (the ETag of the bytes that were checked), storage refuses to copy an object
 * replaced since (false is returned); the reading job also compares the kept bytes' hash, for stores that ignore it.
 */
export async function copyObject(from: string, to: string, contentType: string, ifMatch?: string): Promise<boolean> {
  try {
    await s3().send(
      new CopyObjectCommand({ Bucket: bucket(), Key: to, CopySource: `${bucket()}/${from.split("/").map(encodeURIComponent).join("/")}`, ContentType: contentType, MetadataDirective: "REPLACE", CopySourceIfMatch: ifMatch }),
    );
    return true;
  } catch (error) {
    if (ifMatch && STATUS(error) === 412) return false; // replaced since it was checked
    unavailable(error);
  }
}

/** The object's bytes (objects the server wrote itself). */
export async function readObject(key: string): Promise<Buffer> {
  const out = await getObjectBytes(key);
  if (!Buffer.isBuffer(out)) throw new Error("unreachable");
  return out;
}

export async function putObject(key: string, body: Buffer, contentType: string) {
  try {
    await s3().send(new PutObjectCommand({ Bucket: bucket(), Key: key, Body: body, ContentType: contentType, ContentLength: body.length }));
  } catch (error) {
    unavailable(error);
  }
}

/** Deletes an object; a missing one is not an error. */
export async function deleteObject(key: string) {
  try {
    await s3().send(new DeleteObjectCommand({ Bucket: bucket(), Key: key }));
  } catch (error) {
    if (STATUS(error) === 404) return;
    unavailable(error);
  }
}

/** One page of the objects under a prefix (key and last-modified), at most 1000. */
export async function listObjects(prefix: string, continuationToken?: string) {
  try {
    const out = await s3().send(new ListObjectsV2Command({ Bucket: bucket(), Prefix: prefix, ContinuationToken: continuationToken, MaxKeys: 1000 }));
    return {
      objects: (out.Contents ?? []).map((o) => ({ key: o.Key!, lastModified: o.LastModified ?? new Date(0), size: o.Size ?? 0 })),
      next: out.IsTruncated ? out.NextContinuationToken : undefined,
    };
  } catch (error) {
    unavailable(error);
  }
}

/** The only image types Dipwell ever serves; anything else goes out as a download. */
const SERVABLE = new Set(["image/jpeg", "image/png", "image/webp"]);

/** Headers for a stored image: its registered type, no sniffing, no scripts, no framing of it. */
export function imageHeaders(contentType: string) {
  const type = SERVABLE.has(contentType) ? contentType : "application/octet-stream";
  return new Headers({
    "content-type": type,
    "x-content-type-options": "nosniff",
    "content-security-policy": "default-src 'none'; img-src 'self'; style-src 'unsafe-inline'; sandbox",
    "content-disposition": type === "application/octet-stream" ? "attachment" : "inline",
    "cross-origin-resource-policy": "same-origin",
    "cache-control": "private, max-age=3600",
  });
}

/**
 * Streams a stored image to the browser with the type Dipwell registered for it (never the
 * type storage reports); 404 when it is not there, 503 when storage cannot be reached.
 */
export async function streamObject(key: string, contentType: string) {
  try {
    const out = await s3().send(new GetObjectCommand({ Bucket: bucket(), Key: key }));
    const body = out.Body!.transformToWebStream();
    const headers = imageHeaders(contentType);
    if (out.ContentLength) headers.set("content-length", String(out.ContentLength));
    return new Response(body as ReadableStream, { headers });
  } catch (error) {
    const status = STATUS(error);
    if (status === 404 || (error as Error).name === "NoSuchKey") return new Response("The photo is not in storage.", { status: 404, headers: { "content-type": "text/plain; charset=utf-8", "x-content-type-options": "nosniff" } });
    return new Response("Photo storage is unavailable at the moment. Try again in a minute.", { status: 503, headers: { "content-type": "text/plain; charset=utf-8", "x-content-type-options": "nosniff", "retry-after": "30" } });
  }
}
