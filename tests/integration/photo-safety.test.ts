// A registered photo cannot be turned into something else: the presigned PUT signs the type and
// the length, the server keeps its own copy of the checked bytes under a key the browser never had
// a URL for, and the photo, thumbnail and crop routes serve only the registered image type with
// nosniff and a sandboxing Content-Security-Policy, whatever storage says the object is.
// Also: refused uploads leave nothing in storage, and chart-card and reference-solution photos go
// through the same intake as strip photos (presigned upload, the limit refused before any byte is
// sent, the real type checked on the bytes (and, for chart photos, truncation), refused objects deleted,
// abandoned ones swept).
import { readFileSync } from "node:fs";
import { HeadObjectCommand, PutObjectCommand } from "@aws-sdk/client-s3";
import { eq } from "drizzle-orm";
import sharp from "sharp";
import { beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { db } from "~/lib/db.server";
import { sweepUploads } from "~/features/photos/intake.server";
import { bucket, s3 } from "~/lib/storage.server";
import { parseChart } from "~/reading";
import { renderStripPhoto } from "../render/strip-photo";
import { asRenderChart } from "../render/types";
import { callRoute, createTub, createUser, type TestUser, createChartBatch } from "../support/fixtures";
import { presignBatchUpload, registerBatchPhoto, uploadBatchPhoto } from "../support/batch-photos";
import { createChart } from "~/features/charts/charts.server";
import { env } from "~/lib/env.server";
import { importRoute } from "../support/routes";

const chartJson = JSON.parse(readFileSync("calibration/demo-3pad.json", "utf8"));
const HTML = "<!doctype html><html><body><script>document.title='script ran'</script><p>not a photo</p></body></html>";

let owner: TestUser;
let tubId: string;
let jpeg: Buffer;

async function presign(contentType: string, size: number) {
  const { action } = await importRoute("routes/api/tubs.uploads.ts");
  return callRoute(action!, { url: `/api/tubs/${tubId}/uploads`, params: { tubId }, user: owner, json: { contentType, size } });
}
async function register(key: string) {
  const { action } = await importRoute("routes/api/tubs.photos.ts");
  return callRoute(action!, { url: `/api/tubs/${tubId}/photos`, params: { tubId }, user: owner, json: { key } });
}
async function exists(key: string) {
  try {
    await s3().send(new HeadObjectCommand({ Bucket: bucket(), Key: key }));
    return true;
  } catch {
    return false;
  }
}

beforeAll(async () => {
  owner = await createUser("owner");
  const chart = parseChart(chartJson);
  const made = await createChartBatch(`Safety chart ${owner.id.slice(0, 6)}`, "S-1", chart);
  tubId = (await createTub(owner.id, { batchId: made.batchId })).id;
  jpeg = (await renderStripPhoto(asRenderChart(chartJson), { seed: 11, surface: "paper", cast: "daylight" })).jpeg;
});

describe("a registered photo is immutable and served only as an image", () => {
  it("signs the content type and length into the presigned PUT", async () => {
    const p = await presign("image/jpeg", jpeg.length);
    expect(p.status).toBe(200);
    const url = new URL((p.data as { url: string }).url);
    // AWS Signature Version 4, query-string authentication: X-Amz-SignedHeaders lists what the signature covers.
    const signed = (url.searchParams.get("X-Amz-SignedHeaders") ?? "").split(";");
    expect(signed).toEqual(expect.arrayContaining(["content-length", "content-type", "host"]));
    expect(Number(url.searchParams.get("X-Amz-Expires"))).toBeLessThanOrEqual(300);
  });

  it("an HTML file PUT to the upload URL after registration is never served, and never as HTML", async () => {
    const p = await presign("image/jpeg", jpeg.length);
    const { url, key } = p.data as { url: string; key: string };
    expect((await fetch(url, { method: "PUT", body: new Uint8Array(jpeg), headers: { "content-type": "image/jpeg" } })).status).toBe(200);
    const r = await register(key);
    expect(r.status, JSON.stringify(r.data)).toBe(201);
    const { photoId, readingId } = r.data as { photoId: string; readingId: string };
    // The photo is kept under its own key, not the one the browser had a URL for.
    const row = await db.query.photo.findFirst({ where: eq(s.photo.id, photoId) });
    expect(row!.s3Key).not.toBe(key);
    expect(row!.s3Key).not.toMatch(/uploads/);

    // The attack: the owner sends HTML to the same presigned URL. (s3rver does not check
    // signatures, so locally it is accepted; real S3 refuses it as the type is signed.)
    await fetch(url, { method: "PUT", body: HTML, headers: { "content-type": "text/html" } });
    // Even an overwrite of the kept object itself (storage compromised) is served as the registered type.
    const photoRoute = await importRoute("routes/tubs/photo.ts");
    const served = await callRoute(photoRoute.loader!, { url: "/x", params: { tubId, photoId }, user: owner });
    expect(served.status).toBe(200);
    const h = served.response!.headers;
    expect(h.get("content-type")).toBe("image/jpeg");
    expect(h.get("x-content-type-options")).toBe("nosniff");
    expect(h.get("content-security-policy")).toMatch(/sandbox/);
    expect(h.get("content-security-policy")).toMatch(/default-src 'none'/);
    expect(Buffer.from(await served.response!.arrayBuffer()).equals(jpeg)).toBe(true);

    await s3().send(new PutObjectCommand({ Bucket: bucket(), Key: row!.s3Key, Body: HTML, ContentType: "text/html" }));
    const tampered = await callRoute(photoRoute.loader!, { url: "/x", params: { tubId, photoId }, user: owner });
    expect(tampered.response!.headers.get("content-type")).toBe("image/jpeg");
    expect(tampered.response!.headers.get("content-security-policy")).toMatch(/sandbox/);
    await tampered.response!.arrayBuffer();
    await s3().send(new PutObjectCommand({ Bucket: bucket(), Key: row!.s3Key, Body: jpeg, ContentType: "image/jpeg" }));

    const thumb = await callRoute(photoRoute.loader!, { url: "/x?size=thumb", params: { tubId, photoId }, user: owner });
    expect(thumb.response!.headers.get("content-type")).toBe("image/webp");
    expect(thumb.response!.headers.get("x-content-type-options")).toBe("nosniff");
    await thumb.response!.arrayBuffer();
    expect(readingId).toBeTruthy();
  });
});

describe("refused uploads leave nothing behind", () => {
  // A strip photo that ends early starts like a photo: it is taken in, and the reading job finds
  // it cut short and says so, the photo kept (tests/integration/uploads.test.ts).
  it("deletes an upload that is not an image and one that is another type than declared", async () => {
    for (const [bytes, code] of [
      [Buffer.from("plain text, not a photo\n".repeat(40)), "not_image"],
      [Buffer.from(HTML), "not_image"],
      [await sharp(jpeg).png().toBuffer(), "wrong_type"], // PNG bytes sent as a JPEG
    ] as const) {
      const p = await presign("image/jpeg", bytes.length);
      const { url, key } = p.data as { url: string; key: string };
      await fetch(url, { method: "PUT", body: new Uint8Array(bytes), headers: { "content-type": "image/jpeg" } });
      const r = await register(key);
      expect(r.status, code).toBe(400);
      expect((r.data as { code: string }).code).toBe(code);
      expect(await exists(key)).toBe(false);
    }
  });
});

describe("abandoned uploads are swept", () => {
  it("deletes upload objects older than an hour, and keeps the photos", async () => {
    const p = await presign("image/jpeg", jpeg.length);
    const { url, key } = p.data as { url: string; key: string };
    await fetch(url, { method: "PUT", body: new Uint8Array(jpeg), headers: { "content-type": "image/jpeg" } });
    expect(await sweepUploads(new Date(), { scope: { tubId } })).toBe(0); // a fresh upload stays
    expect(await exists(key)).toBe(true);
    const later = new Date(Date.now() + 61 * 60 * 1000);
    expect(await sweepUploads(later, { scope: { tubId } })).toBeGreaterThanOrEqual(1);
    expect(await exists(key)).toBe(false);
    const kept = await db.select().from(s.photo).where(eq(s.photo.tubId, tubId));
    for (const k of kept) expect(await exists(k.s3Key)).toBe(true);
  });
});

describe("chart-card and reference-solution photos: the same intake", () => {
  let tech: TestUser;
  let chart: { chartId: string; batchId: string };
  beforeAll(async () => {
    tech = await createUser("technician");
    chart = await createChart(tech, { name: `Intake chart ${tech.id.slice(0, 6)}`, lot: "I-1", expiresOn: null, definition: chartJson });
  });

  it("refuses a file over the limit or of another type before any byte is sent, and signs type and length", async () => {
    const max = env().MAX_PHOTO_BYTES;
    const big = await presignBatchUpload(tech, chart.batchId, "image/jpeg", max + 1);
    expect(big.status).toBe(400);
    expect((big.data as { code: string }).code).toBe("too_large");
    const svg = await presignBatchUpload(tech, chart.batchId, "image/svg+xml", 2_000);
    expect((svg.data as { code: string }).code).toBe("wrong_type");
    const ok = await presignBatchUpload(tech, chart.batchId, "image/png", 2_000);
    expect(ok.status).toBe(200);
    const url = new URL((ok.data as { url: string }).url);
    expect((url.searchParams.get("X-Amz-SignedHeaders") ?? "").split(";")).toEqual(expect.arrayContaining(["content-length", "content-type"]));
    expect((ok.data as { key: string }).key).toMatch(new RegExp(`^uploads/batches/${chart.batchId}/[0-9a-f-]{36}\\.png$`));
  });

  it("a chart photo is checked on its bytes; each refused upload is deleted and no photo recorded", async () => {
    const svgScript = Buffer.from('<svg xmlns="http://www.w3.org/2000/svg" width="600" height="400"><script>alert(1)</script><rect width="600" height="400"/></svg>');
    const small = await sharp({ create: { width: 200, height: 120, channels: 3, background: "#ddd" } }).jpeg().toBuffer();
    for (const [bytes, type, code] of [
      [svgScript, "image/png", "wrong_type"], // SVG with a script, called a PNG (sharp decodes SVG: refused as not a photo type)
      [await sharp(jpeg).png().toBuffer(), "image/jpeg", "wrong_type"], // PNG bytes called a JPEG
      [jpeg.subarray(0, Math.floor(jpeg.length * 0.6)), "image/jpeg", "truncated"],
      [small, "image/jpeg", "too_small"],
    ] as const) {
      const key = await uploadBatchPhoto(tech, chart.batchId, bytes, type);
      const r = await registerBatchPhoto(tech, chart.batchId, key);
      expect(r.status, code).toBe(400);
      expect((r.data as { code: string }).code, JSON.stringify(r.data)).toBe(code);
      expect(await exists(key)).toBe(false);
    }
    expect(await db.select().from(s.photo).where(eq(s.photo.batchId, chart.batchId))).toEqual([]);
  });

  it("a registered chart photo is kept under the batch's key by content, once, and served only as its type", async () => {
    const card = await sharp({ create: { width: 640, height: 480, channels: 3, background: "#f3f1ea" } }).jpeg().toBuffer();
    const first = await registerBatchPhoto(tech, chart.batchId, await uploadBatchPhoto(tech, chart.batchId, card));
    const again = await registerBatchPhoto(tech, chart.batchId, await uploadBatchPhoto(tech, chart.batchId, card));
    expect(first.status).toBe(201);
    const { photoId } = first.data as { photoId: string };
    expect((again.data as { photoId: string }).photoId).toBe(photoId);
    const row = (await db.query.photo.findFirst({ where: eq(s.photo.id, photoId) }))!;
    expect(row.purpose).toBe("chart");
    expect(row.s3Key).toBe(`batches/${chart.batchId}/photos/${row.sha256}.jpg`);
    const route = await importRoute("routes/api/chart-photo.ts");
    const served = await callRoute(route.loader!, { url: "/x", params: { photoId }, user: tech });
    expect(served.response!.headers.get("content-type")).toBe("image/jpeg");
    expect(served.response!.headers.get("x-content-type-options")).toBe("nosniff");
    expect(served.response!.headers.get("content-security-policy")).toMatch(/sandbox/);
    await served.response!.arrayBuffer();
  });

  it("reference-solution photos: read through the intake, named when refused, never kept; abandoned uploads swept", async () => {
    const mod = await importRoute("routes/charts/calibrate.tsx");
    const params = { chartId: chart.chartId, batchId: chart.batchId };
    const url = `/charts/${chart.chartId}/batches/${chart.batchId}/calibrate`;
    const bad = await uploadBatchPhoto(tech, chart.batchId, jpeg.subarray(0, Math.floor(jpeg.length * 0.5)));
    const good = await uploadBatchPhoto(tech, chart.batchId, jpeg);
    const r = await callRoute(mod.action!, { url, params, user: tech, form: { intent: "solutions", key_0: good, value_0_ph: "7.6", key_1: bad, value_1_ph: "7.2" } });
    expect(r.status).toBe(400);
    expect((r.data as { form: string }).form).toMatch(/^Photo 2: Only part of that photo is there/);
    expect(await exists(bad)).toBe(false);
    const forged = await callRoute(mod.action!, { url, params, user: tech, form: { intent: "solutions", key_0: `uploads/tubs/${tubId}/${crypto.randomUUID()}.jpg`, value_0_ph: "7.6" } });
    expect((forged.data as { form: string }).form).toMatch(/^Photo 1: That upload does not belong here/);
    const ok = await callRoute(mod.action!, { url, params, user: tech, form: { intent: "solutions", key_0: good, value_0_ph: "7.6" } });
    expect(ok.status, JSON.stringify(ok.data)).toBe(200);
    expect((ok.data as { proposal: { changes: unknown[] } }).proposal.changes.length).toBeGreaterThan(0);
    // Transient: no photo row, no kept copy; the upload stays for a second refit until the sweep.
    expect(await db.select().from(s.photo).where(eq(s.photo.batchId, chart.batchId))).toHaveLength(1); // the chart card above
    expect(await exists(good)).toBe(true);
    expect(await sweepUploads(new Date(Date.now() + 61 * 60 * 1000), { scope: { batchId: chart.batchId } })).toBeGreaterThanOrEqual(1);
    expect(await exists(good)).toBe(false);
  });
});
