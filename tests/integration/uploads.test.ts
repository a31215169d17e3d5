// Photo upload registration and reading, against real PostgreSQL and s3rver: the presigned PUT,
// the server's own checks (type, size, the type's signature, content hash; the decode in the
// reading job), the reader's run, the stored
// reading and pads, the owner's confirmation, and the bad inputs (wrong type, too large, a missing
// upload, a photo of something else, the same photo twice).
import sharp from "sharp";
import { readFileSync } from "node:fs";
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { db } from "~/lib/db.server";
import { env } from "~/lib/env.server";
import { parseChart } from "~/reading";
import { renderStripPhoto } from "../render/strip-photo";
import { asRenderChart } from "../render/types";
import { callRoute, createTub, createUser, type TestUser, createChartBatch } from "../support/fixtures";
import { importRoute } from "../support/routes";
import { readPendingReading } from "~/features/readings/read-job.server";
import { thumbKey } from "~/features/photos/intake.server";
import { headObject, putObject } from "~/lib/storage.server";

const chartJson = JSON.parse(readFileSync("calibration/demo-3pad.json", "utf8"));
const chart = parseChart(chartJson);

let owner: TestUser;
let tubId: string;
let batchId: string;
let versionId: string;
let strip: { jpeg: Buffer; truth: { analyte: string; value: number }[] };

async function presign(contentType: string, size: number, user = owner, tub = tubId) {
  const { action } = await importRoute("routes/api/tubs.uploads.ts");
  return callRoute(action!, { url: `/api/tubs/${tub}/uploads`, params: { tubId: tub }, user, json: { contentType, size } });
}

async function register(key: string, user = owner, tub = tubId) {
  const { action } = await importRoute("routes/api/tubs.photos.ts");
  return callRoute(action!, { url: `/api/tubs/${tub}/photos`, params: { tubId: tub }, user, json: { key } });
}

/** Presigned PUT, exactly as the browser does it. */
async function upload(bytes: Buffer, contentType: string, declaredSize = bytes.length) {
  const p = await presign(contentType, declaredSize);
  expect(p.status, JSON.stringify(p.data)).toBe(200);
  const { url, key } = p.data as { url: string; key: string };
  const put = await fetch(url, { method: "PUT", body: new Uint8Array(bytes), headers: { "content-type": contentType } });
  expect(put.status).toBe(200);
  return key;
}

async function readingCount() {
  return (await db.select().from(s.reading).where(eq(s.reading.tubId, tubId))).length;
}

beforeAll(async () => {
  owner = await createUser("owner");
  const made = await createChartBatch(`Test chart ${owner.id.slice(0, 6)}`, "T-1", chart);
  batchId = made.batchId;
  versionId = made.versionId;
  tubId = (await createTub(owner.id, { batchId })).id;
  // A clean daylight photo on paper, values on the chart's swatches (renderer: tests/render/strip-photo.ts).
  strip = await renderStripPhoto(asRenderChart(chartJson), { seed: 3, surface: "paper", cast: "daylight", values: { free_chlorine: 3, ph: 7.6, total_alkalinity: 80 } });
});

describe("a strip photo goes up and is read", () => {
  let readingId: string;
  let read: Record<string, number> = {};

  it("registers the photo, reads it with the batch's chart version and stores reading, pads and crops", async () => {
    const key = await upload(strip.jpeg, "image/jpeg");
    const r = await register(key);
    expect(r.status, JSON.stringify(r.data)).toBe(201);
    const out = r.data as { readingId: string; photoId: string; status: string; duplicate: boolean };
    expect(out.duplicate).toBe(false);
    expect(out.status).toBe("pending"); // read by the worker, off the request path
    readingId = out.readingId;
    // Registration does no decode: the size in pixels and the thumbnail come from the reading job.
    expect((await db.query.photo.findFirst({ where: eq(s.photo.id, out.photoId) }))?.width).toBeNull();
    expect(await readPendingReading(readingId)).toBe("read");
    const decoded = await sharp(strip.jpeg).metadata();
    const kept = await db.query.photo.findFirst({ where: eq(s.photo.id, out.photoId) });
    expect([kept?.width, kept?.height]).toEqual([decoded.width, decoded.height]);
    expect(await headObject(thumbKey(kept!.s3Key))).toBeTruthy();

    const row = await db.query.reading.findFirst({ where: eq(s.reading.id, readingId) });
    expect(row?.chartVersionId).toBe(versionId);
    expect(row?.batchId).toBe(batchId);
    const photo = await db.query.photo.findFirst({ where: eq(s.photo.id, out.photoId) });
    expect(photo?.sizeBytes).toBe(strip.jpeg.length);
    expect(photo?.contentType).toBe("image/jpeg");
    // sha256 of the bytes (FIPS 180-4), as hex
    const { createHash } = await import("node:crypto");
    expect(photo?.sha256).toBe(createHash("sha256").update(strip.jpeg).digest("hex"));

    const pads = await db.select().from(s.readingPad).where(eq(s.readingPad.readingId, readingId));
    expect(pads.map((p) => p.analyte).sort()).toEqual(["free_chlorine", "ph", "total_alkalinity"]);
    for (const p of pads) {
      const truth = strip.truth.find((t) => t.analyte === p.analyte)!;
      // Within one chart step of the renderer's truth (demo-3pad steps: chlorine 3→5, pH 0.4, alkalinity 40).
      const step = { free_chlorine: 2, ph: 0.4, total_alkalinity: 40 }[p.analyte]!;
      expect(Math.abs(p.readValue! - truth.value), p.analyte).toBeLessThanOrEqual(step);
      expect(p.readValue, "rounded to what a strip can tell apart").toBe(Number(p.readValue!.toFixed(1)));
      expect(p.source).toBe("auto");
      expect(p.confirmedValue).toBeNull();
      expect(p.cropKey).toBe(`tubs/${tubId}/readings/${readingId}/${p.analyte}.webp`);
    }
    // The crop is served through the permission-checked route.
    const { loader } = await importRoute("routes/tubs/reading-crop.ts");
    const crop = await callRoute(loader!, { url: "/x", params: { tubId, readingId, analyte: "ph" }, user: owner });
    expect(crop.status).toBe(200);
    expect(crop.response?.headers.get("content-type")).toBe("image/webp");
    expect((await crop.response!.arrayBuffer()).byteLength).toBeGreaterThan(50);
    // And the photo itself streams back byte for byte.
    const photoRoute = await importRoute("routes/tubs/photo.ts");
    const streamed = await callRoute(photoRoute.loader!, { url: "/x", params: { tubId, photoId: out.photoId }, user: owner });
    expect(Buffer.from(await streamed.response!.arrayBuffer()).equals(strip.jpeg)).toBe(true);
    // Lists get a small WebP thumbnail, made once and kept in storage beside the photo.
    const thumb = await callRoute(photoRoute.loader!, { url: "/x?size=thumb", params: { tubId, photoId: out.photoId }, user: owner });
    expect(thumb.response?.headers.get("content-type")).toBe("image/webp");
    const meta = await sharp(Buffer.from(await thumb.response!.arrayBuffer())).metadata();
    expect([meta.width, meta.height]).toEqual([160, 160]);
  });

  it("the same photo sent twice gives back the same reading, not a second one", async () => {
    const before = await readingCount();
    const key = await upload(strip.jpeg, "image/jpeg");
    const r = await register(key);
    expect(r.status).toBe(200);
    expect((r.data as { readingId: string; duplicate: boolean }).readingId).toBe(readingId);
    expect((r.data as { duplicate: boolean }).duplicate).toBe(true);
    // Registering the very same key again (a double submit) is also answered with the same reading.
    const again = await register(key);
    expect((again.data as { readingId: string }).readingId).toBe(readingId);
    expect(await readingCount()).toBe(before);
  });

  it("one new upload registered three times at once (a double tap, a retry) gives one photo and one reading", async () => {
    const before = await readingCount();
    const bytes = Buffer.concat([strip.jpeg, Buffer.from("another file of the same picture")]);
    const key = await upload(bytes, "image/jpeg");
    const answers = await Promise.all([register(key), register(key), register(key)]);
    for (const a of answers) expect(a.status, JSON.stringify(a.data)).toBeLessThan(300);
    const ids = new Set(answers.map((a) => (a.data as { readingId: string }).readingId));
    expect(ids.size).toBe(1);
    expect(answers.filter((a) => a.status === 201)).toHaveLength(1);
    expect(await readingCount()).toBe(before + 1);
    const [id] = ids;
    // The job run twice (a retried job whose first run was not dead after all) still writes one result.
    const runs = await Promise.all([readPendingReading(id), readPendingReading(id)]);
    expect(runs.filter((r) => r === "read")).toHaveLength(1);
    expect(await readingCount()).toBe(before + 1);
  });

  it("the owner confirms, correcting one pad; both values are kept", async () => {
    const { action, loader } = await importRoute("routes/tubs/reading.tsx");
    const review = await callRoute(loader!, { url: `/tubs/${tubId}/readings/${readingId}`, params: { tubId, readingId }, user: owner });
    expect(review.status).toBe(200);
    const pads = (review.data as { pads: { analyte: string; swatches: unknown[]; readValue: number }[] }).pads;
    expect(pads.every((p) => p.swatches.length === 6)).toBe(true);
    read = Object.fromEntries(pads.map((p) => [p.analyte, p.readValue]));
    expect(read.ph).not.toBe(7.2);
    const r = await callRoute(action!, {
      url: `/tubs/${tubId}/readings/${readingId}`, params: { tubId, readingId }, user: owner,
      form: { intent: "confirm", "typed:free_chlorine": String(read.free_chlorine), "typed:ph": "7.2", "typed:total_alkalinity": String(read.total_alkalinity) },
    });
    expect(r.status).toBe(302);
    const rows = await db.select().from(s.readingPad).where(eq(s.readingPad.readingId, readingId));
    const ph = rows.find((p) => p.analyte === "ph")!;
    expect(ph.readValue).toBe(read.ph);
    expect(ph.confirmedValue).toBe(7.2);
    expect(ph.source).toBe("corrected");
    expect(rows.find((p) => p.analyte === "free_chlorine")!.source).toBe("confirmed");
    const row = await db.query.reading.findFirst({ where: eq(s.reading.id, readingId) });
    expect(row?.status).toBe("confirmed");
    expect(row?.confirmedBy).toBe(owner.id);
  });

  it("a typed value that is not a number is refused in plain words, nothing saved", async () => {
    const { action } = await importRoute("routes/tubs/reading.tsx");
    const r = await callRoute(action!, { url: "/x", params: { tubId, readingId }, user: owner, form: { intent: "confirm", "typed:ph": "abc" } });
    expect(r.status).toBe(400);
    expect((r.data as { fields: Record<string, string> }).fields.ph).toMatch(/pH must be a number between 0 and 14/);
    const ph = (await db.select().from(s.readingPad).where(eq(s.readingPad.readingId, readingId))).find((p) => p.analyte === "ph")!;
    expect(ph.confirmedValue).toBe(7.2);
  });

  it("history, CSV and the trends API show the confirmed reading", async () => {
    const history = await importRoute("routes/tubs/history.tsx");
    const h = await callRoute(history.loader!, { url: `/tubs/${tubId}/history?sort=taken&dir=asc`, params: { tubId }, user: owner });
    const rows = (h.data as { rows: { id: string; confirmedBy: string | null; photoId: string | null }[] }).rows;
    expect(rows[0].id).toBe(readingId);
    expect(rows[0].confirmedBy).toMatch(/^Test owner/);
    expect(rows[0].photoId).toBeTruthy();

    const csv = await importRoute("routes/tubs/history-csv.ts");
    const c = await callRoute(csv.loader!, { url: "/x", params: { tubId }, user: owner });
    const text = await c.response!.text();
    expect(c.response!.headers.get("content-type")).toMatch(/text\/csv/);
    expect(text.split("\r\n")[0]).toContain("ph_read,ph_confirmed,ph_unit");
    expect(text).toContain(`,${read.ph},7.2,pH`);

    const trends = await importRoute("routes/api/tubs.trends.ts");
    const t = await callRoute(trends.loader!, { url: "/x", params: { tubId }, user: owner });
    const ph = (t.data as { parameters: { analyte: string; points: { value: number }[]; target: { min: number; max: number } }[] }).parameters.find((p) => p.analyte === "ph")!;
    expect(ph.points.map((p) => p.value)).toContain(7.2);
    // CDC hot tub user information: pH 7.2–7.8 (app/chemistry DEFAULT_TARGETS)
    expect(ph.target).toEqual({ min: 7.2, max: 7.8 });
    const anon = await callRoute(trends.loader!, { url: "/x", params: { tubId }, user: null });
    expect(anon.status).toBe(401);
    expect(anon.data).toEqual({ message: "Please sign in first." });
  });
});

describe("bad input", () => {
  it("refuses a file that is not a photo before any upload", async () => {
    for (const type of ["image/gif", "application/pdf", "image/heic"]) {
      const r = await presign(type, 1000);
      expect(r.status).toBe(400);
      expect((r.data as { code: string }).code).toBe("wrong_type");
      expect((r.data as { message: string }).message).toMatch(/JPEG, PNG or WebP/);
    }
  });

  it("refuses a photo over the size limit, before the upload and again after it", async () => {
    const max = env().MAX_PHOTO_BYTES;
    const r = await presign("image/jpeg", max + 1);
    expect(r.status).toBe(400);
    expect((r.data as { code: string; message: string }).code).toBe("too_large");
    expect((r.data as { message: string }).message).toMatch(/largest Dipwell accepts is/);
    // A browser that declares a small size but sends a larger file is caught by headObject.
    const big = Buffer.concat([strip.jpeg, Buffer.alloc(max + 1 - strip.jpeg.length)]);
    const before = await readingCount();
    const key = await upload(big, "image/jpeg", 1000);
    const reg = await register(key);
    expect(reg.status).toBe(400);
    expect((reg.data as { code: string }).code).toBe("too_large");
    expect(await readingCount()).toBe(before);
  });

  it("refuses bytes that are not an image even when labelled as a JPEG", async () => {
    const key = await upload(Buffer.from("this is a text file, not a photo\n".repeat(20)), "image/jpeg");
    const r = await register(key);
    expect(r.status).toBe(400);
    expect((r.data as { code: string }).code).toBe("not_image");
  });

  it("answers an interrupted upload (no object in storage) with a retry message, nothing stored", async () => {
    const p = await presign("image/jpeg", strip.jpeg.length);
    const before = await readingCount();
    const r = await register((p.data as { key: string }).key);
    expect(r.status).toBe(409);
    expect((r.data as { code: string; message: string }).code).toBe("missing_upload");
    expect((r.data as { message: string }).message).toMatch(/Try the upload again/);
    expect(await readingCount()).toBe(before);
  });

  it("refuses PNG bytes declared as a JPEG, and deletes the upload", async () => {
    const png = await sharp(strip.jpeg).png({ compressionLevel: 1 }).toBuffer();
    const before = await readingCount();
    const key = await upload(png, "image/jpeg");
    const r = await register(key);
    expect(r.status).toBe(400);
    expect((r.data as { code: string }).code).toBe("wrong_type");
    expect(await headObject(key)).toBeNull();
    expect(await readingCount()).toBe(before);
  });

  it("a photo cut short is kept, its reading fails with the reason in plain words, and values can be typed", async () => {
    const cut = strip.jpeg.subarray(0, Math.floor(strip.jpeg.length * 0.6));
    const key = await upload(cut, "image/jpeg");
    const r = await register(key);
    // It starts as a JPEG does, so it is taken in; the decode in the reading job finds it cut short.
    expect(r.status, JSON.stringify(r.data)).toBe(201);
    const out = r.data as { readingId: string; photoId: string; status: string };
    expect(out.status).toBe("pending");
    expect(await readPendingReading(out.readingId)).toBe("failed");
    const row = await db.query.reading.findFirst({ where: eq(s.reading.id, out.readingId) });
    expect(row?.error).toMatch(/^We could not read this photo: only part of the photo arrived/);
    expect(row?.error).toMatch(/type the values/);
    // The photo is kept and served byte for byte.
    const photoRoute = await importRoute("routes/tubs/photo.ts");
    const served = await callRoute(photoRoute.loader!, { url: "/x", params: { tubId, photoId: out.photoId }, user: owner });
    expect(served.status).toBe(200);
    expect(Buffer.from(await served.response!.arrayBuffer()).equals(cut)).toBe(true);
    // The review screen says why and offers the form to type the values (never a spinner).
    const { loader } = await importRoute("routes/tubs/reading.tsx");
    const review = await callRoute(loader!, { url: "/x", params: { tubId, readingId: out.readingId }, user: owner });
    const data = review.data as { reading: { status: string; error: string }; pads: { analyte: string }[] };
    expect(data.reading.status).toBe("failed");
    expect(data.reading.error).toBe(row?.error);
    expect(data.pads.map((p) => p.analyte)).toEqual(["free_chlorine", "ph", "total_alkalinity"]);
  });

  it("a kept photo whose bytes are not the ones checked at registration is not read", async () => {
    // The kept copy is made by storage after the check; if the upload was replaced in between
    // (its address was still valid), the job finds bytes whose hash is not the registered one.
    const other = await sharp(strip.jpeg).rotate(180).jpeg({ quality: 80 }).toBuffer();
    const key = await upload(other, "image/jpeg");
    const r = await register(key);
    expect(r.status, JSON.stringify(r.data)).toBe(201);
    const out = r.data as { readingId: string; photoId: string };
    const kept = await db.query.photo.findFirst({ where: eq(s.photo.id, out.photoId) });
    await putObject(kept!.s3Key, strip.jpeg, "image/jpeg");
    expect(await readPendingReading(out.readingId)).toBe("failed");
    const row = await db.query.reading.findFirst({ where: eq(s.reading.id, out.readingId) });
    expect(row?.error).toMatch(/^We could not read this photo: the file was replaced while it was being taken in/);
    expect(await db.select().from(s.readingPad).where(eq(s.readingPad.readingId, out.readingId))).toHaveLength(0);
  });

  it("refuses a key that does not belong to the tub", async () => {
    const r = await register(`tubs/${tubId}/../other/x.jpg`);
    expect(r.status).toBe(400);
    expect((r.data as { code: string }).code).toBe("bad_key");
  });

  it("keeps a photo of something else, stores a failed reading with the reason, and takes values by hand", async () => {
    const other = await renderStripPhoto(asRenderChart(chartJson), { seed: 7, noStrip: true, surface: "wood" });
    const key = await upload(other.jpeg, "image/jpeg");
    const r = await register(key);
    expect(r.status).toBe(201);
    const out = r.data as { readingId: string; photoId: string; status: string };
    expect(out.status).toBe("pending");
    expect(await readPendingReading(out.readingId)).toBe("failed");
    const row = await db.query.reading.findFirst({ where: eq(s.reading.id, out.readingId) });
    expect(row?.error).toBeTruthy();
    expect(row?.error).not.toMatch(/Error|undefined|stack/);
    expect(await db.query.photo.findFirst({ where: eq(s.photo.id, out.photoId) })).toBeTruthy();

    const { action, loader } = await importRoute("routes/tubs/reading.tsx");
    const review = await callRoute(loader!, { url: "/x", params: { tubId, readingId: out.readingId }, user: owner });
    expect((review.data as { pads: { analyte: string }[] }).pads.map((p) => p.analyte)).toEqual(["free_chlorine", "ph", "total_alkalinity"]);
    const saved = await callRoute(action!, { url: "/x", params: { tubId, readingId: out.readingId }, user: owner, form: { intent: "confirm", "typed:free_chlorine": "1", "typed:ph": "7.4" } });
    expect(saved.status).toBe(302);
    const pads = await db.select().from(s.readingPad).where(eq(s.readingPad.readingId, out.readingId));
    expect(pads.map((p) => [p.analyte, p.confirmedValue, p.readValue, p.source]).sort()).toEqual([
      ["free_chlorine", 1, null, "manual"],
      ["ph", 7.4, null, "manual"],
    ]);
  });

  it("a tub with no strip batch chosen is told to choose one before uploading", async () => {
    const bare = await createTub(owner.id);
    const r = await presign("image/jpeg", 1000, owner, bare.id);
    expect(r.status).toBe(400);
    expect((r.data as { code: string }).code).toBe("no_batch");
  });

  it("another owner cannot presign or register for this tub", async () => {
    const stranger = await createUser("owner");
    expect((await presign("image/jpeg", 1000, stranger)).status).toBe(404);
    expect((await register(`tubs/${tubId}/uploads/x.jpg`, stranger)).status).toBe(404);
  });
});

describe("tub settings", () => {
  it("creates a tub in US gallons stored in litres, then archives it", async () => {
    const { action } = await importRoute("routes/tubs/new.tsx");
    const r = await callRoute(action!, { url: "/tubs/new", user: owner, form: { name: "Deck tub", volume: "400", volumeUnit: "USgal", sanitiser: "bromine", batchId, timeZone: "Europe/London", shape: "round", diameter: "200", depth: "80" } });
    expect(r.status).toBe(302);
    const id = r.location!.split("/")[2].split("?")[0];
    const t = await db.query.tub.findFirst({ where: eq(s.tub.id, id) });
    // 1 US gallon = 3.785411784 L exactly (NIST Handbook 44, Appendix C)
    expect(t!.volumeLitres).toBeCloseTo(400 * 3.785411784, 6);
    expect(t!.volumeUnit).toBe("USgal");
    expect(t!.batchId).toBe(batchId);
    // π (100 cm)² × 80 cm = 2,513,274 cm³ = 2513 L
    expect((t!.shape as { estimateLitres: number }).estimateLitres).toBe(2513);

    const edit = await importRoute("routes/tubs/edit.tsx");
    const a = await callRoute(edit.action!, { url: "/x", params: { tubId: id }, user: owner, form: { intent: "archive" } });
    expect(a.status).toBe(302);
    expect((await db.query.tub.findFirst({ where: eq(s.tub.id, id) }))!.archivedAt).toBeTruthy();
  });

  it("refuses a missing name and an impossible volume in plain words", async () => {
    const { action } = await importRoute("routes/tubs/new.tsx");
    const r = await callRoute(action!, { url: "/tubs/new", user: owner, form: { name: "", volume: "5", volumeUnit: "L", sanitiser: "chlorine" } });
    expect(r.status).toBe(400);
    expect((r.data as { fields: Record<string, string> }).fields.name).toMatch(/Give the tub a name/);
    const v = await callRoute(action!, { url: "/tubs/new", user: owner, form: { name: "X", volume: "5", volumeUnit: "L", sanitiser: "chlorine" } });
    expect((v.data as { fields: Record<string, string> }).fields.volume).toMatch(/between 100 and 20,000 litres/);
  });
});
