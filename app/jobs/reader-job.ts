// What a reader process is asked, and how a refusal crosses back to the pool: one module for the
// reader process (read-process.ts) and the pool (read-pool.ts), which runs the same jobs in its
// own process when reader processes cannot start.
import { createHash } from "node:crypto";
import { decodePhoto, PhotoError } from "../features/photos/decode";
import { cropKey, thumbKey, withStorage } from "../features/photos/intake.server";
import { PHOTO_MESSAGES, type PhotoType } from "../features/photos/rules";
import { putObject, readObject } from "../lib/storage.server";
import { readStrip, ReadingError, type StripChart, type StripReading } from "../reading";

/**
 * A kept strip photo to read, in one visit to a reader process: the reader fetches the bytes from
 * storage itself (they never cross between processes) and reads them with the chart. A photo
 * taken in without a decode (`decode`: the type it was registered as) is first checked against
 * the hash registered for it (`sha256`: storage copied the upload after the check, so an upload
 * replaced in between is caught here) and decoded once (a file cut short, its size in pixels,
 * its thumbnail, written beside the photo), before it is read. The pad crops are written to storage
 * under the keys of the reading (`tubId`, `readingId`): a rerun overwrites them.
 */
export type PhotoRead = { key: string; sha256: string; decode?: PhotoType; chart: StripChart; tubId: string; readingId: string };

/**
 * What a reader found: the photo's size in pixels when it was decoded, and the reading (each
 * analyte's crop already in storage, under `cropKeys`) or the reader's refusal (a photo that
 * decodes but shows no readable strip keeps its size and thumbnail). A photo that could not be
 * opened, or is not the bytes that were checked, is thrown as a PhotoError instead.
 */
export type PhotoReadResult = {
  size?: { width: number; height: number };
  reading?: StripReading;
  cropKeys?: Record<string, string>;
  refused?: ReaderFailure;
};

export async function runPhotoRead(job: PhotoRead): Promise<PhotoReadResult> {
  const bytes = await readObject(job.key);
  let size: PhotoReadResult["size"];
  if (job.decode) {
    if (createHash("sha256").update(bytes).digest("hex") !== job.sha256) throw new PhotoError("changed", PHOTO_MESSAGES.changed, 409);
    const { width, height, thumb } = await decodePhoto(bytes, job.decode);
    await withStorage(() => putObject(thumbKey(job.key), thumb, "image/webp"));
    size = { width, height };
  }
  let reading: StripReading;
  try {
    reading = await readStrip(bytes, job.chart, { crops: true });
  } catch (error) {
    if (error instanceof ReadingError) return { size, refused: failureOf(error) };
    throw error;
  }
  // The crops go to storage from here, so only their keys go back with the reading.
  const cropKeys: Record<string, string> = {};
  await Promise.all(
    reading.pads.map(async (pad) => {
      if (pad.crop) {
        const key = cropKey(job.tubId, job.readingId, pad.analyte);
        await putObject(key, pad.crop, "image/webp");
        cropKeys[pad.analyte] = key;
      }
      delete pad.crop;
      for (const part of pad.parts ?? []) delete part.crop;
    }),
  );
  return { size, reading, cropKeys };
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
