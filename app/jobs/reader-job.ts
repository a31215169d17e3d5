// What a reader process is asked, and how a refusal crosses back to the pool: one module for the
// reader process (read-process.ts) and the pool (read-pool.ts), which runs the same jobs in its
// own process when reader processes cannot start.
import { decodePhoto, PhotoError } from "../features/photos/decode";
import type { PhotoType } from "../features/photos/rules";
import { readStrip, ReadingError, type StripChart } from "../reading";

/** A strip to read with a chart, or (`decode`) a newly registered photo to decode once: size and thumbnail. */
export type ReaderJob = { bytes: Buffer; chart?: StripChart; decode?: PhotoType };

export const runReaderJob = (j: ReaderJob) => (j.decode ? decodePhoto(j.bytes, j.decode) : readStrip(j.bytes, j.chart!, { crops: true }));

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
