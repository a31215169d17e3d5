// A strip batch's photos (chart card, reference-solution strips) sent the way the browser sends
// them: the presigned upload from the batch's uploads endpoint, a PUT straight to storage, then
// (for a chart photo) the registration.
import { expect } from "vitest";
import { callRoute, type TestUser } from "./fixtures";
import { importRoute } from "./routes";

export async function presignBatchUpload(user: TestUser | null, batchId: string, contentType: string, size: number) {
  const { action } = await importRoute("routes/api/chart-batches.uploads.ts");
  return callRoute(action!, { url: `/api/chart-batches/${batchId}/uploads`, params: { batchId }, user, json: { contentType, size } });
}

export async function registerBatchPhoto(user: TestUser | null, batchId: string, key: string) {
  const { action } = await importRoute("routes/api/chart-batches.photos.ts");
  return callRoute(action!, { url: `/api/chart-batches/${batchId}/photos`, params: { batchId }, user, json: { key } });
}

/** Presigned upload and PUT of one photo of the batch: its upload key. */
export async function uploadBatchPhoto(user: TestUser, batchId: string, bytes: Buffer, contentType = "image/jpeg") {
  const p = await presignBatchUpload(user, batchId, contentType, bytes.length);
  expect(p.status, JSON.stringify(p.data)).toBe(200);
  const { url, key } = p.data as { url: string; key: string };
  const put = await fetch(url, { method: "PUT", body: new Uint8Array(bytes), headers: { "content-type": contentType } });
  expect(put.status).toBe(200);
  return key;
}

/** A chart-card photo uploaded and registered: the photo's id. */
export async function sendChartPhoto(user: TestUser, batchId: string, bytes: Buffer, contentType = "image/jpeg") {
  const key = await uploadBatchPhoto(user, batchId, bytes, contentType);
  const r = await registerBatchPhoto(user, batchId, key);
  expect(r.status, JSON.stringify(r.data)).toBe(201);
  return (r.data as { photoId: string }).photoId;
}
