// Object storage through the S3 API: real S3 (or any S3-compatible store) in
// production, s3rver on 127.0.0.1 locally. Photos go up from the browser with
// presigned PUTs; the server reads them back to run the reader.
import { GetObjectCommand, HeadObjectCommand, PutObjectCommand, S3Client } from "@aws-sdk/client-s3";
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
  });
  return client;
}

export const bucket = () => env().S3_BUCKET;

/** A URL the browser can PUT the file to directly, valid for 15 minutes. */
export async function presignUpload(key: string, contentType: string) {
  return getSignedUrl(s3(), new PutObjectCommand({ Bucket: bucket(), Key: key, ContentType: contentType }), { expiresIn: 900 });
}

export async function headObject(key: string) {
  try {
    const head = await s3().send(new HeadObjectCommand({ Bucket: bucket(), Key: key }));
    return { size: head.ContentLength ?? 0, contentType: head.ContentType ?? "application/octet-stream" };
  } catch (error) {
    const status = (error as { $metadata?: { httpStatusCode?: number } }).$metadata?.httpStatusCode;
    if (status === 404 || (error as Error).name === "NotFound") return null;
    throw error;
  }
}

export async function getObjectBytes(key: string): Promise<Buffer> {
  const out = await s3().send(new GetObjectCommand({ Bucket: bucket(), Key: key }));
  const bytes = await out.Body!.transformToByteArray();
  return Buffer.from(bytes);
}

export async function putObject(key: string, body: Buffer, contentType: string) {
  await s3().send(new PutObjectCommand({ Bucket: bucket(), Key: key, Body: body, ContentType: contentType, ContentLength: body.length }));
}

/** Streams an object from storage to the browser (private, cached briefly); 404 when it is not there. */
export async function streamObject(key: string, contentType: string) {
  try {
    const out = await s3().send(new GetObjectCommand({ Bucket: bucket(), Key: key }));
    const body = out.Body!.transformToWebStream();
    const headers = new Headers({ "content-type": out.ContentType ?? contentType, "cache-control": "private, max-age=3600" });
    if (out.ContentLength) headers.set("content-length", String(out.ContentLength));
    return new Response(body as ReadableStream, { headers });
  } catch {
    return new Response("The photo is not in storage.", { status: 404 });
  }
}
