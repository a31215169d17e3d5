// Reading off the request path, against real PostgreSQL, pg-boss and s3rver: registration stores
// the photo and a pending reading and queues one job in one transaction; the same photo registered
// twice at once gives one reading; a worker killed in the middle of a read is replaced and the job
// retried into one reading; a registration cut off after the photo row (an older crash) resumes;
// a read that fails for good shows "we could not read this photo" and takes typed values.
import { spawn, type ChildProcess } from "node:child_process";
import { readFileSync } from "node:fs";
import path from "node:path";
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as s from "~/db/schema";
import { COULD_NOT_READ, readPendingReading } from "~/features/readings/read-job.server";
import { appBoss } from "~/jobs/boss.server";
import { READ_QUEUE, READ_RETRY } from "~/jobs/queues";
import { db } from "~/lib/db.server";
import { headObject } from "~/lib/storage.server";
import { thumbKey } from "~/features/photos/intake.server";
import { parseChart } from "~/reading";
import { renderStripPhoto } from "../render/strip-photo";
import { asRenderChart } from "../render/types";
import { callRoute, createTub, createUser, type TestUser, createChartBatch } from "../support/fixtures";
import { importRoute } from "../support/routes";

const chartJson = JSON.parse(readFileSync("calibration/demo-3pad.json", "utf8"));
let owner: TestUser;
let tubId: string;
let batchId: string;
const children: ChildProcess[] = [];

async function upload(bytes: Buffer) {
  const { action } = await importRoute("routes/api/tubs.uploads.ts");
  const p = await callRoute(action!, { url: "/x", params: { tubId }, user: owner, json: { contentType: "image/jpeg", size: bytes.length } });
  const { url, key } = p.data as { url: string; key: string };
  expect((await fetch(url, { method: "PUT", body: new Uint8Array(bytes), headers: { "content-type": "image/jpeg" } })).status).toBe(200);
  return key;
}
async function register(key: string) {
  const { action } = await importRoute("routes/api/tubs.photos.ts");
  return callRoute(action!, { url: "/x", params: { tubId }, user: owner, json: { key } });
}
const sql = (text: string, values: unknown[] = []) => db.$client.query(text, values);
const readingsOf = async (photoId: string) => db.select().from(s.reading).where(eq(s.reading.photoId, photoId));

function startReadWorker() {
  const child = spawn(path.join("node_modules", ".bin", "tsx"), ["tests/support/read-worker.ts"], { env: process.env, stdio: ["ignore", "pipe", "pipe"] });
  children.push(child);
  let out = "";
  child.stdout!.on("data", (d) => (out += d));
  child.stderr!.on("data", (d) => (out += d));
  const ready = new Promise<void>((resolve, reject) => {
    const t = setInterval(() => {
      if (out.includes("read worker ready")) (clearInterval(t), resolve());
      if (child.exitCode !== null) (clearInterval(t), reject(new Error(`read worker exited: ${out}`)));
    }, 50);
  });
  return { child, ready, log: () => out };
}

async function waitFor<T>(what: string, fn: () => Promise<T | null | undefined | false>, timeoutMs = 60_000, everyMs = 25): Promise<T> {
  const start = Date.now();
  while (Date.now() - start < timeoutMs) {
    const v = await fn();
    if (v) return v;
    await new Promise((r) => setTimeout(r, everyMs));
  }
  throw new Error(`timed out waiting for ${what}`);
}

beforeAll(async () => {
  owner = await createUser("owner");
  const chart = parseChart(chartJson);
  const made = await createChartBatch(`Jobs chart ${owner.id.slice(0, 6)}`, "J-1", chart);
  batchId = made.batchId;
  tubId = (await createTub(owner.id, { batchId })).id;
});

afterAll(async () => {
  for (const c of children) if (c.exitCode === null) c.kill("SIGKILL");
  const boss = await appBoss();
  await boss.updateQueue(READ_QUEUE, { expireInSeconds: READ_RETRY.expireInSeconds } as never);
});

describe("registration", () => {
  it("answers at once with a pending reading and queues exactly one job", async () => {
    const { jpeg } = await renderStripPhoto(asRenderChart(chartJson), { seed: 31, surface: "paper" });
    const r = await register(await upload(jpeg));
    expect(r.status, JSON.stringify(r.data)).toBe(201);
    const out = r.data as { readingId: string; photoId: string; status: string };
    expect(out.status).toBe("pending");
    const jobs = await sql(`select id from pgboss.job where name = $1 and singleton_key = $2`, [READ_QUEUE, out.readingId]);
    expect(jobs.rowCount).toBe(1);
    // The review screen's status route: pending, waiting its turn; after the read, read.
    const status = await importRoute("routes/api/tubs.reading-status.ts");
    const st = await callRoute(status.loader!, { url: "/x", params: { tubId, readingId: out.readingId }, user: owner });
    expect(st.data).toMatchObject({ status: "pending", stage: "queued" });
    expect(await readPendingReading(out.readingId)).toBe("read");
    expect(await readPendingReading(out.readingId)).toBe("already-done"); // a second run writes nothing
    const after = await callRoute(status.loader!, { url: "/x", params: { tubId, readingId: out.readingId }, user: owner });
    expect(after.data).toMatchObject({ status: "read", stage: "done" });
    const pads = await db.select().from(s.readingPad).where(eq(s.readingPad.readingId, out.readingId));
    expect(pads).toHaveLength(3);
    // Crops are addressed by the reading.
    const crop = await importRoute("routes/tubs/reading-crop.ts");
    const c = await callRoute(crop.loader!, { url: "/x", params: { tubId, readingId: out.readingId, analyte: "ph" }, user: owner });
    expect(c.response!.headers.get("content-type")).toBe("image/webp");
    await c.response!.arrayBuffer();
    const stranger = await createUser("owner");
    expect((await callRoute(status.loader!, { url: "/x", params: { tubId, readingId: out.readingId }, user: stranger })).status).toBe(404);
    expect((await callRoute(crop.loader!, { url: "/x", params: { tubId, readingId: out.readingId, analyte: "ph" }, user: stranger })).status).toBe(404);
  });

  it("the same photo registered twice at the same moment gives one reading and one job", async () => {
    const { jpeg } = await renderStripPhoto(asRenderChart(chartJson), { seed: 32, surface: "paper" });
    const [k1, k2] = [await upload(jpeg), await upload(jpeg)];
    // A double tap (the same key twice) and a retry with a new upload of the same bytes, all at once.
    const results = await Promise.all([register(k1), register(k1), register(k2), register(k2)]);
    for (const r of results) expect([200, 201], JSON.stringify(r.data)).toContain(r.status);
    const ids = new Set(results.map((r) => (r.data as { readingId: string }).readingId));
    expect(ids.size).toBe(1);
    expect(results.filter((r) => !(r.data as { duplicate: boolean }).duplicate)).toHaveLength(1);
    const photoId = (results[0].data as { photoId: string }).photoId;
    expect(await readingsOf(photoId)).toHaveLength(1);
    const [readingId] = ids;
    expect((await sql(`select id from pgboss.job where name = $1 and singleton_key = $2`, [READ_QUEUE, readingId])).rowCount).toBe(1);
  });

  it("a registration cut off after the photo row (no reading) resumes on retry, without an error", async () => {
    const { jpeg } = await renderStripPhoto(asRenderChart(chartJson), { seed: 33, surface: "paper" });
    const key = await upload(jpeg);
    const first = await register(key);
    const { photoId, readingId } = first.data as { photoId: string; readingId: string };
    // The state an interrupted registration of an older version left: a photo without a reading.
    await sql(`delete from pgboss.job where name = $1 and singleton_key = $2`, [READ_QUEUE, readingId]);
    await sql(`delete from reading where id = $1`, [readingId]);
    const again = await register(await upload(jpeg));
    expect(again.status, JSON.stringify(again.data)).toBe(201);
    const out = again.data as { photoId: string; readingId: string; status: string };
    expect(out.photoId).toBe(photoId);
    expect(out.status).toBe("pending");
    expect(await readPendingReading(out.readingId)).toBe("read");
    expect(await readingsOf(photoId)).toHaveLength(1);
  });
});

describe("the reading job", () => {
  it("killed in the middle of a read, is retried by the next worker and yields one reading", async () => {
    const boss = await appBoss();
    // Short expiry so the dead worker's job is given up in seconds, not minutes.
    await boss.updateQueue(READ_QUEUE, { expireInSeconds: 2 } as never);
    const { jpeg } = await renderStripPhoto(asRenderChart(chartJson), { seed: 34, surface: "paper", width: 2448, height: 3264, quality: 92 });
    const first = startReadWorker();
    await first.ready;
    const r = await register(await upload(jpeg));
    const { readingId, photoId } = r.data as { readingId: string; photoId: string };
    await waitFor("the job to start", async () => (await sql(`select 1 from pgboss.job where name = $1 and singleton_key = $2 and state = 'active'`, [READ_QUEUE, readingId])).rowCount, 60_000, 10);
    first.child.kill("SIGKILL");
    await new Promise((resolve) => first.child.once("exit", resolve));
    const mid = (await readingsOf(photoId))[0];
    expect(mid.status, "killed before the read finished").toBe("pending");

    const second = startReadWorker();
    await second.ready;
    const done = await waitFor("the retried read", async () => {
      const [row] = await readingsOf(photoId);
      return row.status !== "pending" ? row : null;
    }, 90_000, 250);
    expect(done.status).toBe("read");
    expect(await readingsOf(photoId)).toHaveLength(1);
    const pads = await db.select().from(s.readingPad).where(eq(s.readingPad.readingId, readingId));
    expect(pads.map((p) => p.analyte).sort()).toEqual(["free_chlorine", "ph", "total_alkalinity"]);
    // The photo was decoded once in a reader process of the pool: its size in pixels and its thumbnail are kept.
    const photo = await db.query.photo.findFirst({ where: eq(s.photo.id, photoId) });
    expect(photo!.width).toBeGreaterThan(0);
    expect(photo!.height).toBeGreaterThan(0);
    expect(await headObject(thumbKey(photo!.s3Key))).toBeTruthy();
    // The first worker died with the reading still pending, so the second worker's run is the retry:
    // the outcome above (one reading, read, every pad) is what matters, however pg-boss counts it.
    second.child.kill("SIGTERM");
  }, 240_000);

  it("a read that fails for good shows 'we could not read this photo' with the photo and a form", async () => {
    const { jpeg } = await renderStripPhoto(asRenderChart(chartJson), { seed: 35, surface: "paper" });
    const r = await register(await upload(jpeg));
    const { readingId } = r.data as { readingId: string };
    const broken = async () => {
      throw new Error("reader process stopped: exit 1");
    };
    await expect(readPendingReading(readingId, { reader: broken })).rejects.toThrow(/reader process/); // retried by pg-boss
    expect(await readPendingReading(readingId, { reader: broken, finalAttempt: true })).toBe("failed");
    const row = await db.query.reading.findFirst({ where: and(eq(s.reading.id, readingId)) });
    expect(row!.status).toBe("failed");
    expect(row!.error).toBe(COULD_NOT_READ);
    const review = await importRoute("routes/tubs/reading.tsx");
    const page = await callRoute(review.loader!, { url: "/x", params: { tubId, readingId }, user: owner });
    const d = page.data as { reading: { status: string; photoId: string; error: string }; pads: { analyte: string }[] };
    expect(d.reading.status).toBe("failed");
    expect(d.reading.photoId).toBeTruthy();
    expect(d.pads.map((p) => p.analyte)).toEqual(["free_chlorine", "ph", "total_alkalinity"]);
    const saved = await callRoute(review.action!, { url: "/x", params: { tubId, readingId }, user: owner, form: { intent: "confirm", "typed:ph": "7.4" } });
    expect(saved.status).toBe(302);
  });
});
