// What a reader process is asked, and how a refusal crosses back to the pool: one module for the
// reader process (read-process.ts) and the pool (read-pool.ts), which runs the same jobs in its
// own process when reader processes cannot start.
import { createHash } from "node:crypto";
import { decodePhoto, PhotoError, type Inspected } from "../features/photos/decode";
import { PHOTO_MESSAGES, type PhotoType } from "../features/photos/rules";
import { readObject } from "../lib/storage.server";
import { readStrip, ReadingError, type StripChart, type StripReading } from "../reading";

/**
 * A kept strip photo to read, in one visit to a reader process: the reader fetches the bytes from
 * storage itself (they never cross between processes) and reads them with the chart. A photo
 * taken in without a decode (`decode`: the type it was registered as) is first checked against
 * the hash registered for it (`sha256`: storage copied the upload after the check, so an upload
 * replaced in between is caught here) and decoded once (a file cut short, its size in pixels,
 * its thumbnail), before it is read.
 */
export type PhotoRead = { key: string; sha256: string; decode?: PhotoType; chart: StripChart };

/**
 * What a reader found: the decode's result when it was asked for, and the reading or the reader's
 * refusal (a photo that decodes but shows no readable strip keeps its decode). A photo that could
 * not be opened, or is not the bytes that were checked, is thrown as a PhotoError instead.
 */
export type PhotoReadResult = { inspected?: Inspected; reading?: StripReading; refused?: ReaderFailure };

export async function runPhotoRead(job: PhotoRead): Promise<PhotoReadResult> {
  const bytes = await readObject(job.key);
  let inspected: Inspected | undefined;
  if (job.decode) {
    if (createHash("sha256").update(bytes).digest("hex") !== job.sha256) throw new PhotoError("changed", PHOTO_MESSAGES.changed, 409);
    inspected = await decodePhoto(bytes, job.decode);
  }
  try {
    return { inspected, reading: await readStrip(bytes, job.chart, { crops: true }) };
  } catch (error) {
    if (error instanceof ReadingError) return { inspected, refused: failureOf(error) };
    throw error;
  }
}

/** A result as it arrives from a reader process: its binary parts back as Buffers. */
export function revived(r: PhotoReadResult): PhotoReadResult {
  const buffer = (b: Buffer) => Buffer.from(b as unknown as Uint8Array);
  if (r.inspected) r.inspected.thumb = buffer(r.inspected.thumb);
  for (const pad of r.reading?.pads ?? []) {
    if (pad.crop) pad.crop = buffer(pad.crop);
    for (const part of pad.parts ?? []) if (part.crop) part.crop = buffer(part.crop);
  }
  return r;
}

/** A job's failure as it is sent between processes: a reader's or a photo's refusal keeps its code. */
export type ReaderFailure = { code: string | null; message: string; photo?: boolean };

export function failureOf(error: unknown): ReaderFailure {
  if (error instanceof ReadingError) return { code: error.code, message: error.message };
  if (error instanceof PhotoError) return { code: error.code, message: error.message, photo: true };
  const e = error as Error;
  return { code: null, message: e?.stack ?? String(e) };
}

/** The error a failure sent by a reader process stands for, as the job would have thrown it here. */
export function errorOf(f: ReaderFailure): Error {
  if (f.photo) return new PhotoError(f.code!, f.message);
  if (f.code) return new ReadingError(f.code as never, f.message);
  return new Error(f.message);
}
