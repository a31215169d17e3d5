// Reading a registered strip photo, off the request path. The registration queues one job per
// reading (queueRead, in the registration's transaction); the worker runs readPendingReading,
// which has a reader process fetch, check, decode and read the photo in one visit (reader-job.ts)
// with the chart version chosen at registration and write the thumbnail and the pad crops to
// storage (outside any database transaction, under keys named by the reading), then in one short
// transaction turns the reading from "pending" into "read" or "failed" and stores its pads.
// Only a pending reading is ever written: a second run (a retried job whose first run was not
// dead after all, a duplicate job) finds it done and writes nothing, so a photo is read into one
// reading, once.
import { and, eq } from "drizzle-orm";
import type PgBoss from "pg-boss";
import { chartVersion, photo, reading, readingPad } from "../../db/schema";
import { READ_QUEUE } from "../../jobs/queues";
import { db } from "../../lib/db.server";
import { errorOf, runPhotoRead, type PhotoRead, type PhotoReadResult } from "../../jobs/reader-job";
import { parseChart, ReadingError, type StripChart, type StripReading } from "../../reading";
import { PhotoError } from "../photos/intake.server";
import { isPhotoType } from "../photos/rules";

export type ReadJob = { readingId: string };

/** Reads a kept photo in one visit (see PhotoRead); the worker passes its pool of reader processes, tests may read in process. */
export type PhotoReader = (job: PhotoRead) => Promise<PhotoReadResult>;

/** Queues the read of one reading; sent through the caller's transaction when `executeSql` is given. */
export async function queueRead(boss: PgBoss, readingId: string, executeSql?: (text: string, values: unknown[]) => Promise<unknown>) {
  return boss.send(READ_QUEUE, { readingId } satisfies ReadJob, {
    singletonKey: readingId,
    ...(executeSql ? { db: { executeSql: executeSql as never } } : {}),
  });
}

/** The message shown when the reader itself could not run (after its retries). */
export const COULD_NOT_READ = "We could not read this photo. Your photo is kept: type the values from the strip below, or take a new photo.";

/** Why a registered photo could not be opened, in the owner's words (the decode is this job's). */
const UNOPENED: Record<string, string> = {
  truncated: "only part of the photo arrived: the file ends before the picture does",
  wrong_type: "the file is not the kind of photo it claims to be",
  not_image: "the file could not be opened as a picture",
  changed: "the file was replaced while it was being taken in, so what is kept is not the photo that was checked",
};
export const couldNotOpen = (code: string) =>
  `We could not read this photo: ${UNOPENED[code] ?? UNOPENED.not_image}. Your photo is kept: type the values from the strip below, or take a new photo.`;

/** The reader's value at the precision a strip can tell apart (pH and small values to 0.1, larger to 1). */
export function roundReading(analyte: string, v: number) {
  const step = analyte === "ph" || Math.abs(v) < 10 ? 0.1 : 1;
  return Math.max(0, Number((Math.round(v / step) * step).toFixed(step < 1 ? 1 : 0)));
}

async function fail(readingId: string, message: string, detail: object | null = null) {
  const done = await db
    .update(reading)
    .set({ status: "failed", error: message, detail })
    .where(and(eq(reading.id, readingId), eq(reading.status, "pending")))
    .returning({ id: reading.id });
  return done.length ? ("failed" as const) : ("already-done" as const);
}

/**
 * Reads one pending reading's photo and stores the result. Throws on a failure worth retrying
 * (storage down, the reader process died); on the final attempt such a failure is stored as a
 * failed reading instead, so the owner is never left waiting.
 */
export async function readPendingReading(
  readingId: string,
  opts: { reader?: PhotoReader; finalAttempt?: boolean } = {},
): Promise<"read" | "failed" | "already-done"> {
  const r = await db.query.reading.findFirst({ where: eq(reading.id, readingId) });
  if (!r || r.status !== "pending") return "already-done";
  try {
    const p = r.photoId ? await db.query.photo.findFirst({ where: eq(photo.id, r.photoId) }) : null;
    if (!p) return await fail(readingId, "The photo of this reading is no longer there. Enter the values by hand below, or take a new photo.");
    const version = r.chartVersionId ? await db.query.chartVersion.findFirst({ where: eq(chartVersion.id, r.chartVersionId) }) : null;
    if (!version) {
      return await fail(readingId, "This tub has no strip batch chosen, so there was no colour chart to read with. Enter the values by hand below, or choose the batch in the tub's settings.");
    }
    let chart: StripChart;
    try {
      chart = parseChart(version.definition);
    } catch {
      return await fail(readingId, "The colour chart of this strip batch could not be used. Enter the values by hand below and ask your technician to check the chart.");
    }
    // A photo taken in without a decode (its size in pixels not yet known) is checked against the
    // hash registered for it and decoded in the same visit, before it is read; a file that does
    // not open, or is not the bytes that were checked, is a failed reading with the reason.
    const decode = p.width === null && p.purpose === "strip" && isPhotoType(p.contentType) ? p.contentType : undefined;
    let found: PhotoReadResult;
    try {
      found = await (opts.reader ?? runPhotoRead)({ key: p.s3Key, sha256: p.sha256, decode, chart, tubId: r.tubId, readingId: r.id });
    } catch (error) {
      if (error instanceof PhotoError && error.code !== "storage_unavailable") return await fail(readingId, couldNotOpen(error.code), { code: error.code });
      throw error;
    }
    if (found.size) await db.update(photo).set(found.size).where(eq(photo.id, p.id));
    if (found.refused) {
      const refusal = errorOf(found.refused);
      if (refusal instanceof ReadingError) return await fail(readingId, refusal.message, { code: refusal.code });
      throw refusal;
    }
    const result: StripReading = found.reading!;
    // The crops are in storage already (the reader wrote them, outside any transaction, under the
    // reading's keys, so a rerun overwrites them); the pads name them.
    const pads: (typeof readingPad.$inferInsert)[] = result.pads.map((pad) => ({
      readingId: r.id, analyte: pad.analyte, unit: pad.unit, readValue: roundReading(pad.analyte, pad.value), confidence: pad.confidence,
      needsReview: pad.needsReview, reviewReason: pad.reason ?? null, lab: pad.lab, swatchIndex: pad.swatchIndex, cropKey: found.cropKeys?.[pad.analyte] ?? null, source: "auto",
    }));
    return await db.transaction(async (tx) => {
      const done = await tx
        .update(reading)
        .set({ status: "read", needsReview: result.pads.some((x) => x.needsReview), detail: { warnings: result.warnings, strip: result.strip, imageSize: result.imageSize } })
        .where(and(eq(reading.id, r.id), eq(reading.status, "pending")))
        .returning({ id: reading.id });
      if (!done.length) return "already-done" as const;
      if (pads.length) await tx.insert(readingPad).values(pads).onConflictDoNothing();
      return "read" as const;
    });
  } catch (error) {
    if (!opts.finalAttempt) throw error;
    console.error("reading failed for good", readingId, error);
    return fail(readingId, COULD_NOT_READ, { code: "reader_failed" });
  }
}
