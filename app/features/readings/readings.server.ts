// Strip photos and readings: presigned upload, registration (checks, hash, duplicates),
// the reader run, the owner's review, history, CSV and trends.
import { and, asc, count, desc, eq, gte, inArray, lte } from "drizzle-orm";
import { isUuid } from "~/lib/ids";
import { padsByReading, padsOf } from "./pads.server";
import sharp from "sharp";
import { parseChart, type StripChart } from "~/reading";
import { chartVersion, photo, reading, readingPad, treatment, tub as tubTable, user as userTable } from "~/db/schema";
import type { SessionUser } from "~/lib/auth.server";
import { db } from "~/lib/db.server";
import { PhotoError, presignPhoto, takeUpload, thumbKey } from "~/features/photos/intake.server";
import { appBoss } from "~/jobs/boss.server";
import { queueRead } from "./read-job.server";
import { READ_QUEUE } from "~/jobs/queues";
import { headObject, putObject, readObject } from "~/lib/storage.server";
import { csvLine, csvNumberSql, csvTextSql } from "~/lib/csv";
import { analyteSwatches } from "~/features/charts/analyte-swatches";
import { pageOf } from "~/lib/paging";
import { MAX_TREND_DAYS, TREND_PERIODS } from "./periods";
import { AHEAD_SHOWN_UP_TO } from "./status-poll";
import { relationOf, requireTub, type Tub } from "~/lib/tub-access.server";
import { daysAgo, rangeStatus, type RangeStatus } from "~/lib/range-status";
import { currentChartFor, tubTargets } from "../tubs/tubs.server";
import { analyteName } from "~/chemistry";

export { PhotoError, maxPhotoBytes } from "~/features/photos/intake.server";

/** A presigned PUT for one strip photo of this tub; checks the type and size the browser declares. */
export async function presignPhotoUpload(t: Tub, contentType: string, size: number) {
  if (!t.batchId) throw new PhotoError("no_batch", "Choose the strip batch you use in the tub's settings first, so Dipwell knows which colour chart to read with.");
  return presignPhoto({ tubId: t.id }, contentType, size);
}

export type RegisterResult = { readingId: string; photoId: string; status: string; duplicate: boolean };

/**
 * Registers an uploaded strip photo: takes it in with the checks that need no decode (size, the
 * type's signature, the hash as the bytes stream past, storage's own copy under a key the browser
 * never had; see takeUpload), then in one transaction the photo row, its reading (status
 * "pending") and the job that reads it. Idempotent and resumable: the same photo (the same key
 * again, or the same bytes in a new upload, at the same moment or after a crash) gives the same
 * reading, and a reading still pending is queued again (a job already queued is not doubled).
 * The decode (a file cut short, the size in pixels, the thumbnail) is the reading job's: a photo
 * that cannot be decoded becomes a failed reading with the reason, the photo kept.
 */
export async function registerPhoto(user: SessionUser, t: Tub, key: string): Promise<RegisterResult> {
  const received = await takeUpload({ tubId: t.id }, key, async (sha256) =>
    Boolean((await db.$client.query({ name: "dipwell-photo-known", text: "select 1 from photo where tub_id = $1 and sha256 = $2", values: [t.id, sha256] })).rowCount),
  );
  const current = await currentChartFor(t);
  const boss = await appBoss();
  const client = await db.$client.connect();
  try {
    await client.query("begin");
    const inserted = await client.query<{ id: string }>(
      `insert into photo (tub_id, batch_id, purpose, uploader_id, s3_key, content_type, size_bytes, sha256, width, height)
       values ($1, $2, 'strip', $3, $4, $5, $6, $7, $8, $9)
       on conflict do nothing returning id`,
      [t.id, t.batchId, user.id, received.s3Key, received.contentType, received.sizeBytes, received.sha256, null, null],
    );
    const photoId =
      inserted.rows[0]?.id ??
      (await client.query<{ id: string }>(`select id from photo where tub_id = $1 and sha256 = $2`, [t.id, received.sha256])).rows[0]?.id;
    if (!photoId) throw new Error("photo row neither inserted nor found");
    const created = await client.query<{ id: string }>(
      `insert into reading (tub_id, photo_id, batch_id, chart_version_id, status, created_by)
       values ($1, $2, $3, $4, 'pending', $5)
       on conflict (photo_id) do nothing returning id`,
      [t.id, photoId, t.batchId, current?.version.id ?? null, user.id],
    );
    const row = created.rows[0]
      ? { id: created.rows[0].id, status: "pending" }
      : (await client.query<{ id: string; status: string }>(`select id, status from reading where photo_id = $1`, [photoId])).rows[0];
    if (row.status === "pending") await queueRead(boss, row.id, (text, values) => client.query(text, values));
    await client.query("commit");
    return { readingId: row.id, photoId, status: row.status, duplicate: !created.rows[0] };
  } catch (error) {
    await client.query("rollback").catch(() => {});
    throw error;
  } finally {
    client.release();
  }
}

/** Everything the review screen needs: pads with crops and the chart's swatches. */
export async function loadReview(t: Tub, readingId: string | undefined) {
  if (!isUuid(readingId)) return null;
  const r = await db.query.reading.findFirst({ where: and(eq(reading.id, readingId), eq(reading.tubId, t.id)) });
  if (!r) return null;
  const pads = await padsOf(r.id);
  let chart: StripChart | null = null;
  const versionId = r.chartVersionId ?? (await currentChartFor(t))?.version.id;
  if (versionId) {
    const v = await db.query.chartVersion.findFirst({ where: eq(chartVersion.id, versionId) });
    if (v) {
      try {
        chart = parseChart(v.definition);
      } catch {
        chart = null;
      }
    }
  }
  const confirmer = r.confirmedBy ? await db.query.user.findFirst({ where: eq(userTable.id, r.confirmedBy) }) : null;
  // One entry per analyte: an analyte read from several pads shows once, its pads' colours side by side.
  const groups = new Map(analyteSwatches(chart?.pads ?? []).map((g) => [g.analyte, g]));
  const analytes = groups.size ? [...groups.keys()] : pads.map((p) => p.analyte);
  const targets = new Map(tubTargets(t).map((x) => [x.parameter, x]));
  return {
    reading: {
      id: r.id, status: r.status, error: r.error, takenAt: r.takenAt.toISOString(), photoId: r.photoId, needsReview: r.needsReview,
      warnings: ((r.detail as { warnings?: string[] } | null)?.warnings ?? []) as string[],
      confirmedBy: confirmer?.name ?? null, confirmedAt: r.confirmedAt?.toISOString() ?? null,
    },
    pads: analytes.map((analyte) => {
      const cp = groups.get(analyte);
      const p = pads.find((x) => x.analyte === analyte);
      const target = targets.get(analyte);
      return {
        analyte,
        label: cp?.label ?? analyteName(analyte),
        unit: cp?.unit ?? p?.unit ?? "",
        swatches: cp?.swatches ?? [],
        padCount: cp?.pads ?? 1,
        readValue: p?.readValue ?? null,
        confidence: p?.confidence ?? null,
        needsReview: p ? p.needsReview : true,
        reason: p?.reviewReason ?? null,
        hasCrop: Boolean(p?.cropKey),
        confirmedValue: p?.confirmedValue ?? null,
        source: p?.source ?? null,
        target: target ? { min: target.min, max: target.max } : null,
      };
    }),
  };
}

/** Plausible bounds per parameter, for typed values (common practice: the widest ranges strips print). */
function bounds(analyte: string) {
  if (analyte === "ph") return { min: 0, max: 14 };
  return { min: 0, max: 5000 };
}

/**
 * The owner's confirmation: for each pad, the value they accept (as read, a tapped swatch or a
 * typed number). Keeps the reader's value beside it.
 */
export async function confirmReading(user: SessionUser, t: Tub, readingId: string | undefined, form: FormData) {
  const review = await loadReview(t, readingId);
  if (!review) return { ok: false as const, notFound: true, fields: {} as Record<string, string>, form: "" };
  const fields: Record<string, string> = {};
  const values: { analyte: string; unit: string; value: number; source: string }[] = [];
  for (const pad of review.pads) {
    const typed = String(form.get(`typed:${pad.analyte}`) ?? "").trim();
    const raw = typed || (pad.readValue !== null ? String(pad.readValue) : "");
    if (!raw) {
      if (review.reading.status === "failed") continue; // leave a pad the owner did not test blank
      fields[pad.analyte] = `Enter a value for ${pad.label}, or tap the matching colour.`;
      continue;
    }
    const v = Number(raw.replace(",", "."));
    const b = bounds(pad.analyte);
    if (!Number.isFinite(v) || v < b.min || v > b.max) {
      fields[pad.analyte] = `${pad.label} must be a number between ${b.min} and ${b.max}.`;
      continue;
    }
    const source = pad.readValue === null ? "manual" : Math.abs(v - pad.readValue) < 1e-9 ? "confirmed" : "corrected";
    values.push({ analyte: pad.analyte, unit: pad.unit, value: v, source });
  }
  if (Object.keys(fields).length) return { ok: false as const, fields, form: "Some values need a look; see the messages below." };
  if (values.length === 0) return { ok: false as const, fields, form: "Enter at least one value, or take a new photo." };
  const id = review.reading.id;
  await db.transaction(async (tx) => {
    for (const v of values) {
      const existing = await tx.query.readingPad.findFirst({ where: and(eq(readingPad.readingId, id), eq(readingPad.analyte, v.analyte)) });
      if (existing) {
        await tx.update(readingPad).set({ confirmedValue: v.value, source: v.source }).where(eq(readingPad.id, existing.id));
      } else {
        await tx.insert(readingPad).values({ readingId: id, analyte: v.analyte, unit: v.unit, confirmedValue: v.value, source: "manual", needsReview: false });
      }
    }
    const now = new Date();
    await tx.update(reading).set({ status: "confirmed", confirmedBy: user.id, confirmedAt: now, reviewedBy: user.id, reviewedAt: now }).where(eq(reading.id, id));
  });
  return { ok: true as const };
}

export const HISTORY_SORTS = { taken: reading.takenAt, status: reading.status } as const;
export const PAGE_SIZE = 10;

export async function historyPage(t: Tub, opts: { sort: keyof typeof HISTORY_SORTS; dir: "asc" | "desc"; page: number }) {
  const [{ total }] = await db.select({ total: count() }).from(reading).where(eq(reading.tubId, t.id));
  const { page, pages } = pageOf(total, PAGE_SIZE, opts.page);
  const col = HISTORY_SORTS[opts.sort];
  const rows = await db
    .select({ r: reading, confirmer: userTable.name })
    .from(reading)
    .leftJoin(userTable, eq(userTable.id, reading.confirmedBy))
    .where(eq(reading.tubId, t.id))
    .orderBy(opts.dir === "asc" ? asc(col) : desc(col), desc(reading.takenAt), desc(reading.id))
    .limit(PAGE_SIZE)
    .offset((page - 1) * PAGE_SIZE);
  // One page of readings (PAGE_SIZE at most), their pads grouped by reading.
  const pads = await padsByReading(rows.map((x) => x.r.id));
  return {
    total, page, pages,
    rows: rows.map(({ r, confirmer }) => ({
      id: r.id, takenAt: r.takenAt.toISOString(), status: r.status, photoId: r.photoId, confirmedBy: confirmer,
      /** unsure and neither confirmed nor reviewed: not to be taken as the water */
      needsReview: r.needsReview && !r.reviewedAt && r.status !== "confirmed",
      pads: (pads.get(r.id) ?? [])
        .map((p) => ({ analyte: p.analyte, label: analyteName(p.analyte), unit: p.unit ?? "", value: p.confirmedValue ?? p.readValue, source: p.source })),
    })),
  };
}


const CSV_BATCH = 1000;

const TREATMENT_COLUMNS = ["treatment_product", "treatment_chemical", "treatment_for", "treatment_amount", "treatment_unit", "treatment_shock", "treatment_note"];

/** A timestamp as JavaScript's toISOString writes it (UTC, milliseconds). */
const isoSql = (expr: string) => `to_char((${expr}) at time zone 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"')`;

/**
 * One batch of the export, in time order after the last row sent ($2 time, $3 id): each row's
 * CSV line made by PostgreSQL. $4 rows at most; $5 the pad columns' analytes in order; $6 the
 * empty pad cells of a treatment row; $7 the names of the parameters treatments were for. Readings
 * and treatments are each walked along their tub-and-time index, the lines are made only for the
 * rows of the batch, and each reading's pads are looked up once per column.
 */
const CSV_BATCH_SQL = `select h.at::text as "atKey", h.id,
    case when h.record = 'reading' then
      'reading,' || ${isoSql("h.at")} || ',' || ${csvTextSql("h.status")} || ',' || ${csvTextSql("h.person")} || ',' || coalesce(${isoSql("h.confirmed_at")}, '')
        || coalesce(',' || (
             select string_agg(case when p.id is null then ',,' else ${csvNumberSql("p.read_value")} || ',' || ${csvNumberSql("p.confirmed_value")} || ',' || ${csvTextSql("p.unit")} end, ',' order by a.i)
               from unnest($5::text[]) with ordinality a(analyte, i)
               left join reading_pad p on p.reading_id = h.id and p.analyte = a.analyte), '')
        || ',,,,,,,'
    else
      'treatment,' || ${isoSql("h.at")} || ',,' || ${csvTextSql("h.person")} || ',' || $6::text || ','
        || ${csvTextSql("h.product")} || ',' || ${csvTextSql("h.chemical")} || ',' || ${csvTextSql("$7::jsonb ->> nullif(h.parameter, '')")} || ','
        || ${csvNumberSql("h.amount")} || ',' || ${csvTextSql("h.unit")} || ',' || (case when h.shock then 'yes' else 'no' end) || ',' || ${csvTextSql("h.note")}
    end as line
  from (
    (select 'reading' as record, r.id, r.taken_at as at, r.status::text as status, u.name as person, r.confirmed_at,
            null::text as product, null::text as chemical, null::text as parameter, null::float8 as amount, null::text as unit, null::boolean as shock, null::text as note
       from reading r left join "user" u on u.id = r.confirmed_by
      where r.tub_id = $1 and ($2::timestamptz is null or (r.taken_at >= $2::timestamptz and (r.taken_at, r.id) > ($2::timestamptz, $3::uuid)))
      order by r.taken_at, r.id limit $4)
    union all
    (select 'treatment', x.id, x.added_at, null, u.name, null, x.product_name, x.chemical, x.parameter, x.amount, x.unit, x.shock, x.note
       from treatment x left join "user" u on u.id = x.added_by
      where x.tub_id = $1 and ($2::timestamptz is null or (x.added_at >= $2::timestamptz and (x.added_at, x.id) > ($2::timestamptz, $3::uuid)))
      order by x.added_at, x.id limit $4)
    order by at, id limit $4
  ) h
  order by h.at, h.id`;

/**
 * The tub's history as CSV, oldest first: one row per reading (read and confirmed value per
 * parameter) and one per treatment (product, amount, who added it), in time order; the `record`
 * column says which. PostgreSQL writes the lines (the pads pivoted into their columns, every cell
 * quoted and made safe as csvCell does), a batch at a time when the download asks for more, so
 * memory stays flat however long the history, and it stops when the download is cancelled.
 */
export function historyCsvStream(t: Tub, signal?: AbortSignal): ReadableStream<Uint8Array> {
  const encoder = new TextEncoder();
  let columns: { analytes: string[]; names: Record<string, string> } | null = null;
  // The last row's time as PostgreSQL's text (microseconds kept: a Date would round them off).
  let after: { at: string; id: string } | null = null;
  let finished = false;
  return new ReadableStream<Uint8Array>({
    async pull(controller) {
      if (signal?.aborted) return controller.close();
      if (!columns) {
        // The pad columns (every analyte the tub's readings have) and the parameters its treatments were for.
        const found = await db.$client.query<{ kind: "pad" | "treatment"; key: string }>(
          `select 'pad' as kind, a.analyte as key from (select distinct p.analyte from reading_pad p join reading r on r.id = p.reading_id where r.tub_id = $1) a
           union all
           select 'treatment', x.parameter from (select distinct parameter from treatment where tub_id = $1 and parameter <> '') x
           order by 1, 2`,
          [t.id],
        );
        const analytes = found.rows.filter((x) => x.kind === "pad").map((x) => x.key);
        const names = Object.fromEntries(found.rows.filter((x) => x.kind === "treatment").map((x) => [x.key, analyteName(x.key)]));
        columns = { analytes, names };
        const header = ["record", "time", "status", "by", "confirmed_at", ...analytes.flatMap((a) => [`${a}_read`, `${a}_confirmed`, `${a}_unit`]), ...TREATMENT_COLUMNS];
        controller.enqueue(encoder.encode(csvLine(header) + "\r\n"));
        return;
      }
      if (finished) return controller.close();
      const batch = await db.$client.query<{ atKey: string; id: string; line: string }>({
        name: "dipwell-history-csv",
        text: CSV_BATCH_SQL,
        values: [t.id, after?.at ?? null, after?.id ?? null, CSV_BATCH, columns.analytes, ",".repeat(3 * columns.analytes.length), JSON.stringify(columns.names)],
      });
      if (batch.rows.length) controller.enqueue(encoder.encode(batch.rows.map((r) => r.line).join("\r\n") + "\r\n"));
      const last = batch.rows.at(-1);
      if (batch.rows.length < CSV_BATCH || !last) finished = true;
      else after = { at: last.atKey, id: last.id };
    },
  });
}

/** The whole CSV as one string (for small tubs and tests); the route streams it. */
export async function historyCsv(t: Tub) {
  return new Response(historyCsvStream(t)).text();
}

export { MAX_TREND_DAYS, TREND_PERIODS } from "./periods";

/**
 * Trend series per parameter over the chosen period (the last `days` days), with the tub's target
 * band and the treatments on the time axis. Points come from SQL already in time order.
 */
export async function trends(t: Tub, opts: { days?: number; now?: Date } = {}) {
  const days = Math.min(MAX_TREND_DAYS, Math.max(1, Math.round(opts.days ?? TREND_PERIODS[0])));
  const to = opts.now ?? new Date();
  const from = new Date(to.getTime() - days * 86_400_000);
  const points = await db
    .select({ readingId: reading.id, takenAt: reading.takenAt, analyte: readingPad.analyte, unit: readingPad.unit, confirmed: readingPad.confirmedValue, read: readingPad.readValue })
    .from(reading)
    .innerJoin(readingPad, eq(readingPad.readingId, reading.id))
    .where(and(eq(reading.tubId, t.id), gte(reading.takenAt, from), lte(reading.takenAt, to)))
    .orderBy(asc(reading.takenAt), asc(reading.id));
  const targets = new Map(tubTargets(t).map((x) => [x.parameter, x]));
  const byAnalyte = new Map<string, { unit: string; points: { t: number; value: number; readingId: string; confirmed: boolean }[] }>();
  for (const p of points) {
    const value = p.confirmed ?? p.read;
    if (value === null || value === undefined) continue;
    const s = byAnalyte.get(p.analyte) ?? { unit: p.unit ?? "", points: [] };
    s.points.push({ t: p.takenAt.getTime(), value, readingId: p.readingId, confirmed: p.confirmed !== null });
    byAnalyte.set(p.analyte, s);
  }
  const treatments = await db
    .select()
    .from(treatment)
    .where(and(eq(treatment.tubId, t.id), gte(treatment.addedAt, from), lte(treatment.addedAt, to)))
    .orderBy(asc(treatment.addedAt));
  return {
    tub: { id: t.id, name: t.name },
    period: { days, from: from.toISOString(), to: to.toISOString() },
    parameters: [...byAnalyte.entries()].map(([analyte, s]) => {
      const target = targets.get(analyte);
      return {
        analyte, label: analyteName(analyte), unit: s.unit,
        target: target ? { min: target.min, max: target.max } : null,
        points: s.points,
      };
    }),
    treatments: treatments.map((x) => ({ t: x.addedAt.getTime(), label: `${x.productName} ${x.amount} ${x.unit}`, parameter: x.parameter })),
  };
}

export async function photoForTub(t: Tub, photoId: string) {
  if (!isUuid(photoId)) return null;
  return (await db.query.photo.findFirst({ where: and(eq(photo.id, photoId), eq(photo.tubId, t.id)) })) ?? null;
}

/**
 * A small WebP of a photo for lists (history), made the first time it is asked for and kept
 * in storage beside the photo, so a phone never downloads a 12-megapixel photo for a thumbnail.
 * Returns null when the photo cannot be decoded (the caller then serves the photo itself).
 */
export async function thumbnailKey(p: { s3Key: string }) {
  const key = thumbKey(p.s3Key);
  if (await headObject(key)) return key;
  try {
    const bytes = await readObject(p.s3Key);
    const thumb = await sharp(bytes, { limitInputPixels: 50_000_000 }).rotate().resize(160, 160, { fit: "cover" }).webp({ quality: 70 }).toBuffer();
    await putObject(key, thumb, "image/webp");
    return key;
  } catch {
    return null;
  }
}

/** A pad's crop key, by the reading it belongs to (one query, the tub checked in it). */
export async function cropKeyFor(t: Tub, readingId: string, analyte: string) {
  if (!isUuid(readingId)) return null;
  const [row] = await db
    .select({ key: readingPad.cropKey })
    .from(readingPad)
    .innerJoin(reading, eq(reading.id, readingPad.readingId))
    .where(and(eq(readingPad.readingId, readingId), eq(reading.tubId, t.id), eq(readingPad.analyte, analyte)))
    .limit(1);
  return row?.key ?? null;
}

type StatusRow = { owner_id: string; shared: boolean; id: string | null; status: string | null; job_state: string | null; ahead: number | null };

/**
 * Everything the review screen's poll needs, in one named statement (planned once per connection:
 * the screen asks often): the tub's owner and whether the user holds an active grant to it (for
 * the tub guard's rule, relationOf), the reading's status with, while it is pending, its live read
 * job (queued, retrying or being read; found through pg-boss's index of a stately queue's live
 * jobs) and, only while it is queued, how many jobs were queued before it (through the queue's
 * fetch index, whose condition `state < 'active'` is repeated so the planner can use it, up to
 * AHEAD_SHOWN_UP_TO).
 */
const STATUS_SQL = `
  select t.owner_id,
         exists (select 1 from tub_access a where a.tub_id = t.id and a.technician_id = $4 and a.revoked_at is null) as shared,
         r.id, r.status, j.state as job_state,
         case when j.state = 'created' then (
           select count(*)::int from (
             select 1 from pgboss.job q
              where q.name = $3 and q.state < 'active' and q.state = 'created' and q.created_on < j.created_on
              limit ${AHEAD_SHOWN_UP_TO}) ahead)
         end as ahead
    from tub t
    left join reading r on r.id = $1 and r.tub_id = t.id
    left join lateral (
      select state, created_on from pgboss.job
       where r.status = 'pending' and name = $3 and state <= 'active' and policy = 'stately' and coalesce(singleton_key, '') = r.id::text
       order by created_on desc limit 1) j on true
   where t.id = $2`;

export type ReadingStatus = { id: string; status: string; stage: "queued" | "reading" | "retrying" | "done"; ahead: number };

/**
 * Where a reading stands, for the review screen while it waits (pending, then read or failed),
 * with the tub guard's check for viewing the tub made in the same statement: "no tub" when the
 * tub does not exist or the user may not see it (a 404, as the guard answers), null when the tub
 * has no such reading.
 */
export async function readingStatusFor(user: SessionUser, tubId: string | undefined, readingId: string): Promise<ReadingStatus | "no tub" | null> {
  if (!isUuid(tubId)) return "no tub";
  let row: StatusRow | undefined;
  try {
    const values = [isUuid(readingId) ? readingId : null, tubId, READ_QUEUE, user.id];
    row = (await db.$client.query<StatusRow>({ name: "dipwell-reading-status", text: STATUS_SQL, values })).rows[0];
  } catch (error) {
    // No job queue in this database (pg-boss not set up yet: its schema or table is missing): the
    // tub guard and the reading's own status. Any other failure (the database away) is thrown.
    if (!["3F000", "42P01"].includes((error as { code?: string }).code ?? "")) throw error;
    const t = await requireTub(user, tubId, "view").then(
      (found) => found.tub,
      (thrown: { type?: string }) => {
        if (thrown?.type === "DataWithResponseInit") return null;
        throw thrown;
      },
    );
    if (!t) return "no tub";
    const r = isUuid(readingId) ? await db.query.reading.findFirst({ where: and(eq(reading.id, readingId), eq(reading.tubId, t.id)), columns: { id: true, status: true } }) : null;
    row = { owner_id: t.ownerId, shared: true, id: r?.id ?? null, status: r?.status ?? null, job_state: null, ahead: null };
  }
  if (!row || !(await relationOf(user, row.owner_id, async () => row.shared))) return "no tub";
  if (!row.id || !row.status) return null;
  const stage = row.status !== "pending" ? "done" : row.job_state === "active" ? "reading" : row.job_state === "retry" ? "retrying" : "queued";
  return { id: row.id, status: row.status, stage, ahead: row.ahead ?? 0 };
}

/** The latest reading of a tub as the tub page shows it: each pad against its target range. */
export async function latestReadingCard(t: Tub) {
  const r = await db.query.reading.findFirst({ where: eq(reading.tubId, t.id), orderBy: desc(reading.takenAt) });
  if (!r) return null;
  const pads = await padsOf(r.id);
  const targets = new Map(tubTargets(t).map((x) => [x.parameter, x]));
  return {
    id: r.id, takenAt: r.takenAt.toISOString(), status: r.status, error: r.error,
    confirmed: r.status === "confirmed" || r.reviewedAt !== null,
    pads: pads.map((p) => {
      const value = p.confirmedValue ?? p.readValue;
      const target = targets.get(p.analyte);
      return {
        analyte: p.analyte, label: analyteName(p.analyte), unit: p.unit ?? "", value, needsReview: p.needsReview && p.confirmedValue === null,
        target: target ? { min: target.min, max: target.max } : null, status: rangeStatus(value, target),
      };
    }),
  };
}

export type TubGlance = {
  ago: string;
  /** false while the reader's values wait for the owner or a technician to confirm them */
  confirmed: boolean;
  /** the values outside the tub's targets (what the card names), by label */
  off: { analyte: string; label: string; value: number; unit: string; status: "low" | "high" }[];
};

/**
 * The water at a glance for tub cards: the latest reading that has values (one per tub, chosen in
 * SQL with one index probe per tub, reading_tub_taken_idx, however long its history), its values
 * outside the tub's targets, how long ago and whether it is confirmed. One round trip for a page
 * of tubs (the list is one page, so it stays short).
 */
export async function glanceByTub(tubIds: string[], now = new Date()) {
  const out = new Map<string, TubGlance>();
  if (!tubIds.length) return out;
  const rows = (
    await db.$client.query<{
      tubId: string; sanitiser: "chlorine" | "bromine"; targets: Tub["targets"]; guidance: Tub["guidance"]; timeZone: string;
      takenAt: Date; status: string; reviewedAt: Date | null; analytes: string[]; units: (string | null)[]; vals: number[];
    }>({
      name: "dipwell-tub-glance",
      text: `select t.id as "tubId", t.sanitiser, t.targets, t.guidance, t.time_zone as "timeZone",
                    r.taken_at as "takenAt", r.status, r.reviewed_at as "reviewedAt", p.analytes, p.units, p.vals
               from unnest($1::uuid[]) as ids(id)
               join tub t on t.id = ids.id
              cross join lateral (
                select r.id, r.taken_at, r.status, r.reviewed_at from reading r
                 where r.tub_id = t.id and r.status <> 'failed' order by r.taken_at desc limit 1
              ) r
              cross join lateral (
                select array_agg(rp.analyte) as analytes, array_agg(rp.unit) as units, array_agg(coalesce(rp.confirmed_value, rp.read_value)) as vals
                  from reading_pad rp
                 where rp.reading_id = r.id and coalesce(rp.confirmed_value, rp.read_value) is not null
              ) p
             where p.analytes is not null`,
      values: [tubIds],
    })
  ).rows;
  for (const r of rows) {
    const targets = new Map(tubTargets(r).map((x) => [x.parameter, x]));
    const off: TubGlance["off"] = [];
    r.analytes.forEach((analyte, i) => {
      const status = rangeStatus(r.vals[i], targets.get(analyte));
      if (status === "low" || status === "high") off.push({ analyte, label: analyteName(analyte), value: r.vals[i], unit: r.units[i] ?? "", status });
    });
    off.sort((a, b) => a.label.localeCompare(b.label));
    out.set(r.tubId, { ago: daysAgo(r.takenAt, now, r.timeZone), confirmed: r.status === "confirmed" || r.reviewedAt !== null, off });
  }
  return out;
}
