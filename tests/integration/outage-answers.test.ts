// What a user gets while a service is down, and that the app comes back by itself:
// - photo storage stopped (a real s3rver of this test's own, stopped and started again):
//   registering a photo is a plain 503 "storage is unavailable, your photo is safe on your
//   phone, try again", never a 500, and the same upload registers once storage is back;
// - the database unreachable: the production server (app/ops/server.mjs) answers the "try again
//   in a moment" page with 503 and a Retry-After header, as it does for the JSON routes.
import { spawn, type ChildProcess } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { eq } from "drizzle-orm";
import S3rver from "s3rver";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import * as s from "~/db/schema";
import { createChart } from "~/features/charts/charts.server";
import { PHOTO_MESSAGES } from "~/features/photos/rules";
import { db } from "~/lib/db.server";
import { env } from "~/lib/env.server";
import { TEST_PORTS } from "~/ops/ports";
import { waitForPort } from "~/ops/services";
import { registerBatchPhoto, uploadBatchPhoto } from "../support/batch-photos";
import { callRoute, createTub, createUser, type TestUser } from "../support/fixtures";
import { importRoute } from "../support/routes";

// This file's own storage, on a port of this test slot's own, set before anything reads the environment.
const store = vi.hoisted(() => {
  const port = 4579 + 40 + Math.min(8, Math.max(0, Number(process.env.DIPWELL_TEST_SLOT ?? 0) || 0));
  const before = process.env.S3_ENDPOINT;
  process.env.S3_ENDPOINT = `http://127.0.0.1:${port}`;
  return { port, before };
});

// The test setup may have read the environment already (its cache is per test file): point it here too.
const storedEndpoint = env().S3_ENDPOINT;
env().S3_ENDPOINT = `http://127.0.0.1:${store.port}`;

const dir = mkdtempSync(path.join(tmpdir(), "dipwell-outage-s3-"));
let server: S3rver | null = null;

async function startStorage() {
  server = new S3rver({ port: store.port, address: "127.0.0.1", silent: true, directory: dir, configureBuckets: [{ name: process.env.S3_BUCKET ?? "dipwell-photos", configs: [] }] });
  await server.run();
}
async function stopStorage() {
  server!.httpServer?.closeAllConnections();
  await server!.close();
  server = null;
}

afterAll(async () => {
  if (server) await stopStorage();
  rmSync(dir, { recursive: true, force: true });
  env().S3_ENDPOINT = storedEndpoint;
  if (store.before === undefined) delete process.env.S3_ENDPOINT;
  else process.env.S3_ENDPOINT = store.before;
});

describe("photo storage stopped", () => {
  let owner: TestUser, tech: TestUser;
  let tubId: string, batchId: string;
  let jpeg: Buffer;

  beforeAll(async () => {
    await startStorage();
    owner = await createUser("owner");
    tech = await createUser("technician");
    const chart = await createChart(tech, { name: `Outage chart ${owner.id.slice(0, 6)}`, lot: "O-1", expiresOn: null, definition: JSON.parse(readFileSync("calibration/demo-3pad.json", "utf8")) });
    batchId = chart.batchId;
    tubId = (await createTub(owner.id, { batchId })).id;
    jpeg = await sharp({ create: { width: 640, height: 480, channels: 3, background: "#f1efe8" } }).jpeg().toBuffer();
  });

  async function presignStrip() {
    const { action } = await importRoute("routes/api/tubs.uploads.ts");
    return callRoute(action!, { url: `/api/tubs/${tubId}/uploads`, params: { tubId }, user: owner, json: { contentType: "image/jpeg", size: jpeg.length } });
  }
  async function registerStrip(key: string) {
    const { action } = await importRoute("routes/api/tubs.photos.ts");
    return callRoute(action!, { url: `/api/tubs/${tubId}/photos`, params: { tubId }, user: owner, json: { key } });
  }

  it("registering is a plain 503 while storage is down, and works with the same upload once it is back", async () => {
    const p = await presignStrip();
    const { url, key } = p.data as { url: string; key: string };
    expect((await fetch(url, { method: "PUT", body: new Uint8Array(jpeg), headers: { "content-type": "image/jpeg" } })).status).toBe(200);
    const chartKey = await uploadBatchPhoto(tech, batchId, jpeg);

    await stopStorage();
    const down = await registerStrip(key);
    expect(down.status).toBe(503);
    expect(down.data).toEqual({ code: "storage_unavailable", message: PHOTO_MESSAGES.storageDown });
    expect(PHOTO_MESSAGES.storageDown).toMatch(/storage is unavailable.*safe on your phone.*try again/i);
    const chartDown = await registerBatchPhoto(tech, batchId, chartKey);
    expect(chartDown.status).toBe(503);
    expect((chartDown.data as { message: string }).message).toBe(PHOTO_MESSAGES.storageDown);
    // Nothing half-recorded.
    expect(await db.select().from(s.photo).where(eq(s.photo.tubId, tubId))).toEqual([]);

    await startStorage();
    const back = await registerStrip(key);
    expect(back.status, JSON.stringify(back.data)).toBe(201);
    expect((back.data as { duplicate: boolean }).duplicate).toBe(false);
    expect((await registerBatchPhoto(tech, batchId, chartKey)).status).toBe(201);
    expect(await db.select().from(s.photo).where(eq(s.photo.tubId, tubId))).toHaveLength(1);
  });
});

describe("the database unreachable, through the production server", () => {
  let app: ChildProcess | null = null;
  const port = TEST_PORTS.app + 40;

  afterAll(() => {
    app?.kill("SIGTERM");
  });

  it("the 'try again in a moment' page is a 503 with Retry-After, like the JSON answer", async () => {
    const signedIn = await createUser("owner");
    const build = process.env.DIPWELL_BUILD_DIR ?? "build";
    app = spawn(process.execPath, ["app/ops/server.mjs", `./${build}/server/index.js`], {
      cwd: process.cwd(),
      env: { ...process.env, NODE_ENV: "production", PORT: String(port), HOST: "127.0.0.1", DATABASE_URL: "postgres://dipwell@127.0.0.1:1/dipwell" },
      stdio: "ignore",
    });
    await waitForPort(port, "the app on an unreachable database");
    const base = `http://127.0.0.1:${port}`;
    const page = await fetch(`${base}/tubs`, { headers: { cookie: signedIn.cookie }, redirect: "manual" });
    expect(page.status).toBe(503);
    expect(page.headers.get("content-type")).toMatch(/text\/html/);
    expect(await page.text()).toMatch(/try again in a moment/i);
    expect(page.headers.get("retry-after")).toBe("5");
    const api = await fetch(`${base}/api/tubs/${crypto.randomUUID()}/trends`, { headers: { cookie: signedIn.cookie } });
    expect(api.status).toBe(503);
    expect(api.headers.get("retry-after")).toBe("5");
    expect((await api.json()).message).toMatch(/try again in a moment/i);
  });
});
